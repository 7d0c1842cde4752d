/** Entry point for boundary files: picks the reader from the file names (or the first bytes). */
import { InputError } from '../errors.js';
import type { AreaLayer, CoordinateKind } from './types.js';
import type { NamedBytes } from './named-bytes.js';
import { isZip, unzipBoundary } from './unzip.js';
import { formatBytes } from '../core/words.js';
import { isTopology, layerFromGeoJson, layerFromTopology, parseJsonBytes } from './read-json-boundary.js';
import { layerFromShapefile, type ShapefileParts } from './read-shapefile.js';
import { checkMixedUnits } from './mixed-units.js';

export type { NamedBytes };

export interface ReadBoundaryOptions {
  /** TopoJSON object name, or the base name of one shapefile when several are given. */
  layer?: string;
  /** Cap on input size and on zip expansion; default 1 GiB. */
  maxBytes?: number;
  /** The analyst's statement of the coordinate kind, overriding what the file says or the ranges suggest. */
  coordinates?: CoordinateKind;
}

const DEFAULT_MAX_BYTES = 2 ** 30;

function extension(name: string): string {
  const m = /\.([^./\\]+)$/.exec(name);
  return m ? m[1].toLowerCase() : '';
}

function stem(name: string): string {
  const base = name.split(/[/\\]/).pop() ?? name;
  return base.replace(/\.[^.]*$/, '');
}

export async function readBoundary(files: NamedBytes[], opts: ReadBoundaryOptions = {}): Promise<AreaLayer> {
  const layer = await readLayer(files, opts);
  // Only a layer read as projected can hide degree features among planar ones.
  if (layer.coordinates === 'projected') checkMixedUnits(layer.areas, layer.sourceName);
  return layer;
}

async function readLayer(files: NamedBytes[], opts: ReadBoundaryOptions): Promise<AreaLayer> {
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  if (files.length === 0) throw new InputError('No boundary file was given.');
  let total = 0;
  for (const f of files) {
    if (!f.bytes || f.bytes.length === 0) throw new InputError(`${f.name} is empty (0 bytes).`, { file: f.name });
    total += f.bytes.length;
    if (total > maxBytes) {
      throw new InputError(`${f.name}: the boundary files exceed the ${formatBytes(maxBytes)} size limit.`, { file: f.name });
    }
  }
  const expanded: NamedBytes[] = [];
  for (const f of files) {
    if (isZip(f)) expanded.push(...unzipBoundary(f, maxBytes));
    else expanded.push(f);
  }
  const zipName = files.length === 1 && isZip(files[0]) ? files[0].name : null;

  const byExt = (ext: string) => expanded.filter((f) => extension(f.name) === ext);
  const shps = byExt('shp');
  const dbfs = byExt('dbf');
  const jsons = expanded.filter((f) => ['geojson', 'json', 'topojson'].includes(extension(f.name)) || (extension(f.name) !== 'shp' && extension(f.name) !== 'dbf' && looksLikeJson(f.bytes)));
  if ((shps.length > 0 || dbfs.length > 0) && jsons.length > 0) {
    // both kinds: the one the layer names, else say what is there rather than pick one silently
    const named = opts.layer ? [...shps, ...jsons].filter((f) => matchesLayer(f.name, opts.layer!)) : [];
    if (named.length === 1 && extension(named[0].name) === 'shp') return readShapefileSet(expanded, named, dbfs, zipName, opts);
    if (named.length === 1) return readJsonFile(named[0], opts);
    const where = zipName ? `${zipName} holds` : 'The files given are';
    throw new InputError(
      `${where} both a shapefile (${shps.map((f) => f.name).join(', ') || dbfs.map((f) => f.name).join(', ')}) and ${jsons.map((f) => f.name).join(', ')}; ` +
        'which one holds the areas cannot be told. Name one as the layer (--layer and its file name without the extension), or give the files separately.',
      { file: zipName ?? files[0].name },
    );
  }
  if (shps.length > 0 || dbfs.length > 0) return readShapefileSet(expanded, shps, dbfs, zipName, opts);

  if (jsons.length === 0) {
    const names = files.map((f) => f.name).join(', ');
    throw new InputError(
      `${names}: not a boundary file this tool reads. Give GeoJSON (.geojson/.json), TopoJSON, ` +
        'a shapefile set (.shp with .dbf, optionally .prj and .cpg) or a .zip holding one.',
      { file: files[0].name },
    );
  }
  let chosen = jsons[0];
  if (jsons.length > 1) {
    const named = opts.layer ? jsons.filter((f) => matchesLayer(f.name, opts.layer!)) : [];
    if (named.length !== 1) {
      throw new InputError(
        `Several boundary files were given (${jsons.map((f) => f.name).join(', ')}); choose one by naming it as the layer (its file name without the extension${zipName ? ', or its path inside the zip' : ''}).`,
        { file: zipName ?? jsons[0].name },
      );
    }
    chosen = named[0];
  }
  return readJsonFile(chosen, opts);
}

async function readJsonFile(chosen: NamedBytes, opts: ReadBoundaryOptions): Promise<AreaLayer> {
  const notes: string[] = [];
  const root = parseJsonBytes(chosen.bytes, chosen.name, notes);
  const objectName = opts.layer !== undefined && matchesLayer(chosen.name, opts.layer) ? undefined : opts.layer;
  if (objectName !== undefined && !isTopology(root)) {
    throw new InputError(
      `${chosen.name} is a single GeoJSON layer; the layer "${objectName}" names neither a TopoJSON object nor one of several files, so it cannot be chosen. Leave the layer out.`,
      { file: chosen.name },
    );
  }
  const layer = isTopology(root)
    ? layerFromTopology(root, chosen.name, objectName, opts.coordinates)
    : layerFromGeoJson(root, chosen.name, opts.coordinates);
  return notes.length ? { ...layer, warnings: [...notes, ...layer.warnings], readNotes: notes } : layer;
}

/** The layer names this file: its base name without extension, or its path (inside a zip) with or without it. */
function matchesLayer(name: string, layer: string): boolean {
  const inner = name.includes('.zip/') ? name.slice(name.indexOf('.zip/') + 5) : name;
  const l = layer.trim();
  return stem(name) === l || inner === l || inner.replace(/\.[^./]*$/, '') === l;
}

function looksLikeJson(bytes: Uint8Array): boolean {
  for (let i = 0; i < Math.min(bytes.length, 64); i++) {
    const c = bytes[i];
    if (c === 0x20 || c === 0x09 || c === 0x0a || c === 0x0d || c === 0xef || c === 0xbb || c === 0xbf) continue;
    return c === 0x7b; // '{'
  }
  return false;
}

function readShapefileSet(
  all: NamedBytes[],
  shps: NamedBytes[],
  dbfs: NamedBytes[],
  zipName: string | null,
  opts: ReadBoundaryOptions,
): Promise<AreaLayer> {
  const where = zipName ? `${zipName} holds` : 'The files given hold';
  if (shps.length === 0) {
    throw new InputError(`${where} ${dbfs.map((f) => f.name).join(', ')} but no .shp file with the shapes; add the .shp.`, { file: zipName ?? dbfs[0].name });
  }
  let shp = shps[0];
  if (shps.length > 1) {
    const named = opts.layer ? shps.filter((f) => matchesLayer(f.name, opts.layer!)) : [];
    if (named.length !== 1) {
      throw new InputError(
        `${where} several shapefiles (${shps.map((f) => f.name).join(', ')}); choose one by naming it as the layer (its file name without the extension${zipName ? ', or its path inside the zip' : ''}).`,
        { file: zipName ?? shp.name },
      );
    }
    shp = named[0];
  }
  // the parts beside the .shp (same folder of the zip, same name in any letter case)
  const withoutExt = (name: string) => name.replace(/\.[^./\\]*$/, '').toLowerCase();
  const base = withoutExt(shp.name);
  const partner = (ext: string) => all.find((f) => extension(f.name) === ext && withoutExt(f.name) === base);
  const dbf = partner('dbf') ?? (shps.length === 1 && dbfs.length === 1 ? dbfs[0] : undefined);
  if (!dbf) {
    throw new InputError(
      `${where} ${shp.name} but no matching .dbf file with the attributes; a shapefile needs both (.shx, .prj and .cpg are optional).`,
      { file: zipName ?? shp.name },
    );
  }
  if (opts.layer !== undefined && !matchesLayer(shp.name, opts.layer)) {
    throw new InputError(`${where} one shapefile, ${shp.name}; the layer "${opts.layer}" is not its name, so it cannot be chosen. Leave the layer out.`, { file: zipName ?? shp.name });
  }
  const parts: ShapefileParts = { shp, dbf, prj: partner('prj'), cpg: partner('cpg') };
  return layerFromShapefile(parts, opts.coordinates);
}
