/**
 * Shapefile sets (.shp + .dbf, optional .prj and .cpg). Records are decoded by the `shapefile`
 * package. Two gaps are filled here:
 * - its grouping of rings into polygons trusts ring orientation and a point-on-segment test that
 *   can miss a hole strictly inside its outer ring: every record's rings are grouped again by
 *   containment (nestRings in ring-nesting.ts);
 * - it never compares the .shp and .dbf record counts, rejects line layers only implicitly, and
 *   decodes text without reporting bad bytes: see shp-bytes.ts and dbf-bytes.ts.
 * Records flagged deleted in the .dbf are left out with their shapes (the package would read them
 * as data), and a note names them.
 */
import * as shapefile from 'shapefile';
import { InputError, listSome } from '../errors.js';
import type { AreaLayer, CoordinateKind } from './types.js';
import { featuresToAreas } from './features-to-areas.js';
import { claimFromPrj, decideCoordinates } from './coordinate-kind.js';
import { codePageOfDriver, encodingFromCpg, firstInvalidUtf8, readDbfLayout } from './dbf-bytes.js';
import { readShpLayout } from './shp-bytes.js';
import { decodeSingleByte, SINGLE_BYTE_CODE_PAGES, windows1252Bytes } from './single-byte.js';
import { nestRings } from './ring-nesting.js';
import { formatCount } from '../core/count.js';

export interface ShapefileParts {
  shp: { name: string; bytes: Uint8Array };
  dbf: { name: string; bytes: Uint8Array };
  prj?: { name: string; bytes: Uint8Array };
  cpg?: { name: string; bytes: Uint8Array };
}

export async function layerFromShapefile(parts: ShapefileParts, override?: CoordinateKind): Promise<AreaLayer> {
  const { shp, dbf } = parts;
  const warnings: string[] = [];
  const shpLayout = readShpLayout(shp.bytes, shp.name);
  const dbfLayout = readDbfLayout(dbf.bytes, dbf.name);
  if (shpLayout.recordCount !== dbfLayout.recordCount) {
    throw new InputError(
      `${shp.name} has ${shpLayout.recordCount} shapes but ${dbf.name} has ${dbfLayout.recordCount} attribute rows; ` +
        'the two files of a shapefile must have one row per shape. Were they copied from different exports?',
      { file: dbf.name },
    );
  }
  if (shpLayout.recordCount === 0) throw new InputError(`${shp.name} holds no shapes.`, { file: shp.name });

  const chosen = chooseEncoding(parts, dbfLayout, warnings);
  const { encoding } = chosen;
  // Windows-1252 too is decoded by its table (Node's TextDecoder reads it as ISO-8859-1)
  const codePage = chosen.codePage ?? (encoding === 'windows-1252' ? 1252 : undefined);
  const readNotes = [...warnings];
  let features: unknown[];
  try {
    const source = await shapefile.open(exactBuffer(shp.bytes), exactBuffer(dbf.bytes), { encoding });
    features = [];
    for (;;) {
      const next = await source.read();
      if (next.done) break;
      features.push(next.value);
    }
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(`${shp.name} could not be read (${e instanceof Error ? e.message : String(e)}).`, { file: shp.name });
  }
  // a code page decoded by table: the text was read byte for byte as Windows-1252
  // (each byte its own character) and is decoded again by the code page's table
  if (codePage !== undefined) {
    const again = (t: string) => decodeSingleByte(windows1252Bytes(t), codePage);
    for (const f of features as { properties: Record<string, unknown> }[]) {
      const props: Record<string, unknown> = Object.create(null);
      for (const key of Object.keys(f.properties)) {
        const v = f.properties[key];
        props[again(key)] = typeof v === 'string' ? again(v) : v;
      }
      f.properties = props;
    }
  }
  const againstOrientation: number[] = [];
  let featureNumber = 0;
  for (const f of features as { properties: Record<string, unknown>; geometry: { type: string; coordinates: unknown } | null }[]) {
    featureNumber++;
    for (const key in f.properties) {
      const v = f.properties[key];
      if (v instanceof Date) f.properties[key] = isoDate(v);
    }
    if (f.geometry?.type === 'Polygon' || f.geometry?.type === 'MultiPolygon') {
      const rings = f.geometry.type === 'Polygon' ? f.geometry.coordinates as number[][][] : (f.geometry.coordinates as number[][][][]).flat();
      const nested = nestRings(rings);
      if (nested.againstOrientation > 0) againstOrientation.push(featureNumber);
      f.geometry = nested.polygons.length === 1
        ? { type: 'Polygon', coordinates: nested.polygons[0] }
        : { type: 'MultiPolygon', coordinates: nested.polygons };
    }
  }
  if (againstOrientation.length > 0) {
    warnings.push(
      `${shp.name}: ${formatCount(againstOrientation.length)} feature(s) have rings wound against the shapefile rule (clockwise outer rings, ` +
        `counter-clockwise holes): ${listSome(againstOrientation.map((k) => `feature ${k}`))}. Each ring lying inside another ring ` +
        'of its feature was read as a hole, each other ring as an outer ring.',
    );
  }

  let featureNumbers: number[] | undefined;
  if (dbfLayout.deleted.length > 0) {
    const gone = new Set(dbfLayout.deleted);
    featureNumbers = [];
    const kept: unknown[] = [];
    features.forEach((f, i) => { if (!gone.has(i + 1)) { kept.push(f); featureNumbers!.push(i + 1); } });
    if (kept.length === 0) throw new InputError(`${dbf.name} marks every record as deleted; there are no areas left to read.`, { file: dbf.name });
    features = kept;
    readNotes.push(
      `${dbf.name} marks ${formatCount(dbfLayout.deleted.length)} record(s) as deleted (${listSome(dbfLayout.deleted.map((k) => `feature ${k}`))}); ` +
        'they were left out with their shapes, as they would be in a GIS. Pack the table to remove them for good, or restore them if they belong.',
    );
  }
  if (dbfLayout.fields.some((f) => f.name === '__proto__')) {
    readNotes.push(`${dbf.name} has a field named "__proto__", which cannot be read as a column; rename the field to use it.`);
  }
  for (const note of readNotes) if (!warnings.includes(note)) warnings.push(note);
  const converted = featuresToAreas({ type: 'FeatureCollection', features }, shp.name, featureNumbers ? { featureNumbers } : {});
  const claim = parts.prj ? claimFromPrj(new TextDecoder('utf-8').decode(parts.prj.bytes), parts.prj.name) : null;
  if (parts.prj && !claim) warnings.push(`${parts.prj.name} was not understood; the coordinate ranges decide instead.`);
  const decision = decideCoordinates(converted.bounds, claim, shp.name, override, converted.areas);
  return {
    sourceName: shp.name,
    areas: converted.areas,
    propertyNames: converted.propertyNames, // the package keeps the .dbf field order
    coordinates: decision.coordinates,
    coordinateEvidence: parts.prj || override ? decision.coordinateEvidence : `${shp.name} comes without a .prj file. ${decision.coordinateEvidence}`,
    ...(decision.guessed ? { coordinatesGuessed: true } : {}),
    ...(decision.unit ? { coordinateUnit: decision.unit } : {}),
    warnings: [...warnings, ...converted.warnings, ...decision.warnings],
    ...(readNotes.length ? { readNotes } : {}),
  };
}

/**
 * The text encoding of the .dbf: the .cpg file's code page when there is one; else UTF-8 when all its
 * text is valid UTF-8 (text in another code page almost never is); else the code page its header's
 * language driver byte names; else Windows-1252. Every choice but the first two is noted.
 */
function chooseEncoding(parts: ShapefileParts, layout: ReturnType<typeof readDbfLayout>, warnings: string[]): { encoding: string; codePage?: number } {
  if (parts.cpg) {
    const label = new TextDecoder('utf-8').decode(parts.cpg.bytes);
    const encoding = encodingFromCpg(label);
    if (encoding) return { encoding };
    const dos = /^\s*(?:cp|ibm|oem|dos)?\s*-?(\d{3})\s*$/i.exec(label);
    if (dos && SINGLE_BYTE_CODE_PAGES.includes(Number(dos[1]))) return { encoding: 'windows-1252', codePage: Number(dos[1]) };
    warnings.push(`${parts.cpg.name} names an unknown code page "${label.trim()}"; the text encoding is guessed instead.`);
  }
  const bad = firstInvalidUtf8(parts.dbf.bytes, layout);
  if (!bad) return { encoding: 'utf-8' };
  const where = `first in field ${bad.field}${bad.record > 0 ? `, feature ${bad.record}` : ', its name'}`;
  const declared = codePageOfDriver(layout.languageDriver);
  if (declared?.decoder) {
    warnings.push(
      `${parts.dbf.name} has text that is not valid UTF-8 (${where}); it was read with code page ${declared.codePage}, which its header names. ` +
        'If letters look wrong, add a .cpg file naming the code page.',
    );
    return { encoding: declared.decoder };
  }
  if (declared && SINGLE_BYTE_CODE_PAGES.includes(declared.codePage)) {
    warnings.push(
      `${parts.dbf.name} has text that is not valid UTF-8 (${where}); it was read with the MS-DOS code page ${declared.codePage}, which its header names. ` +
        'If letters look wrong, add a .cpg file naming the code page.',
    );
    return { encoding: 'windows-1252', codePage: declared.codePage };
  }
  warnings.push(
    `${parts.dbf.name} has text that is not valid UTF-8 (${where}); it was read as Windows-1252` +
      (declared ? ` (its header names the MS-DOS code page ${declared.codePage}, which cannot be decoded exactly here)` : '') +
      '. If letters look wrong, add a .cpg file naming the code page.',
  );
  return { encoding: 'windows-1252' };
}

/** A Uint8Array covering its whole buffer (the package reads from offset 0 of what it is given). */
function exactBuffer(b: Uint8Array): Uint8Array {
  return b.byteOffset === 0 && b.byteLength === b.buffer.byteLength ? b : b.slice();
}

function isoDate(d: Date): string | null {
  if (Number.isNaN(d.getTime())) return null;
  const pad = (n: number, w = 2) => String(n).padStart(w, '0');
  // The package builds dates in local time from YYYYMMDD, so local components give the stored date back.
  return `${pad(d.getFullYear(), 4)}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
}
