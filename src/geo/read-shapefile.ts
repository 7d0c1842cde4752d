/**
 * Shapefile sets (.shp + .dbf, optional .prj and .cpg). Records are decoded by the `shapefile`
 * package, which already turns ring orientation into polygons (clockwise rings are outer rings,
 * counter-clockwise rings holes). Two gaps are filled here:
 * - it puts each hole into the first outer ring containing it, not the smallest, so a hole in an
 *   island that lies inside another part's hole can land in the wrong part: holes are regrouped to
 *   the smallest containing outer ring (regroupHoles);
 * - it never compares the .shp and .dbf record counts, rejects line layers only implicitly, and
 *   decodes text without reporting bad bytes: see shp-bytes.ts and dbf-bytes.ts.
 * Records flagged deleted in the .dbf are read like any other (as the package does).
 */
import * as shapefile from 'shapefile';
import { InputError } from '../errors.js';
import type { AreaLayer, CoordinateKind } from './types.js';
import { featuresToAreas } from './features-to-areas.js';
import { claimFromPrj, decideCoordinates } from './coordinate-kind.js';
import { encodingFromCpg, firstInvalidUtf8, readDbfLayout } from './dbf-bytes.js';
import { readShpLayout } from './shp-bytes.js';
import { ringSignedArea } from './ring-checks.js';

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

  const encoding = chooseEncoding(parts, dbfLayout, warnings);
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
  for (const f of features as { properties: Record<string, unknown>; geometry: { type: string; coordinates: unknown } | null }[]) {
    for (const key in f.properties) {
      const v = f.properties[key];
      if (v instanceof Date) f.properties[key] = isoDate(v);
    }
    if (f.geometry?.type === 'MultiPolygon') f.geometry.coordinates = regroupHoles(f.geometry.coordinates as number[][][][]);
  }

  const converted = featuresToAreas({ type: 'FeatureCollection', features }, shp.name);
  const claim = parts.prj ? claimFromPrj(new TextDecoder('utf-8').decode(parts.prj.bytes), parts.prj.name) : null;
  if (parts.prj && !claim) warnings.push(`${parts.prj.name} was not understood; the coordinate ranges decide instead.`);
  const decision = decideCoordinates(converted.bounds, claim, shp.name, override);
  return {
    sourceName: shp.name,
    areas: converted.areas,
    propertyNames: converted.propertyNames, // the package keeps the .dbf field order
    coordinates: decision.coordinates,
    coordinateEvidence: parts.prj || override ? decision.coordinateEvidence : `${shp.name} comes without a .prj file. ${decision.coordinateEvidence}`,
    warnings: [...warnings, ...converted.warnings, ...decision.warnings],
  };
}

function chooseEncoding(parts: ShapefileParts, layout: ReturnType<typeof readDbfLayout>, warnings: string[]): string {
  if (parts.cpg) {
    const label = new TextDecoder('utf-8').decode(parts.cpg.bytes);
    const encoding = encodingFromCpg(label);
    if (encoding) return encoding;
    warnings.push(`${parts.cpg.name} names an unknown code page "${label.trim()}"; the text encoding is guessed instead.`);
  }
  const bad = firstInvalidUtf8(parts.dbf.bytes, layout);
  if (!bad) return 'utf-8';
  warnings.push(
    `${parts.dbf.name} has text that is not valid UTF-8 (first in field ${bad.field}` +
      `${bad.record > 0 ? `, feature ${bad.record}` : ', its name'}); it was read as Windows-1252. ` +
      'If letters look wrong, add a .cpg file naming the code page.',
  );
  return 'windows-1252';
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

/** Reassigns every hole to the smallest outer ring that contains it; keeps parts without a container. */
export function regroupHoles(polygons: number[][][][]): number[][][][] {
  if (polygons.length < 2 || polygons.every((p) => p.length === 1)) return polygons;
  const outers = polygons.map((p) => p[0]);
  const sizes = outers.map((r) => Math.abs(ringSignedArea(r)));
  const result: number[][][][] = outers.map((r) => [r]);
  for (const polygon of polygons) {
    for (let h = 1; h < polygon.length; h++) {
      const hole = polygon[h];
      let best = -1;
      for (let k = 0; k < outers.length; k++) {
        if ((best < 0 || sizes[k] < sizes[best]) && ringHoldsRing(outers[k], hole)) best = k;
      }
      if (best >= 0) result[best].push(hole);
      else result.push([hole]);
    }
  }
  return result;
}

/** Whether `inner`'s first vertex that is not on `outer`'s boundary lies inside `outer` (even-odd rule). */
function ringHoldsRing(outer: number[][], inner: number[][]): boolean {
  for (const p of inner) {
    const side = pointInRing(outer, p[0], p[1]);
    if (side !== 0) return side > 0;
  }
  return false;
}

/** 1 inside, -1 outside, 0 on the boundary. */
function pointInRing(ring: number[][], x: number, y: number): number {
  let inside = false;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const xi = ring[i][0], yi = ring[i][1], xj = ring[j][0], yj = ring[j][1];
    const cross = (xj - xi) * (y - yi) - (yj - yi) * (x - xi);
    if (cross === 0 && Math.min(xi, xj) <= x && x <= Math.max(xi, xj) && Math.min(yi, yj) <= y && y <= Math.max(yi, yj)) return 0;
    if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside ? 1 : -1;
}
