/**
 * Builds the corpus's small input files in code: grids of squares as GeoJSON, CSV text, zips
 * (fflate), workbooks (exceljs), point shapefiles (test/fixtures/geo/make-shapefile.ts) and the
 * Columbus shapefile bytes (test/fixtures/columbus). Everything is deterministic.
 */
import { readFileSync } from 'node:fs';
import { unzipSync, zipSync } from 'fflate';
import ExcelJS from 'exceljs';
import type { NamedBytes } from '../../src/geo/index.js';
import { squareRing } from '../fixtures/weights/shapes.js';

export type { NamedBytes };

const enc = new TextEncoder();
export const text = (name: string, s: string): NamedBytes => ({ name, bytes: enc.encode(s) });
export const json = (name: string, v: unknown): NamedBytes => text(name, JSON.stringify(v));

/** Deterministic uniform numbers in [0, 1) (32-bit linear congruential generator, Numerical Recipes constants). */
export function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
}

export interface GridRow { code: string; y: number; x1: number; x2: number }

/** Invented district values for an r × c grid: y = 10 + 2·x1 − x2 + noise, codes D01, D02, … */
export function gridRows(r = 4, c = 4, seed = 7): GridRow[] {
  const u = lcg(seed);
  const out: GridRow[] = [];
  for (let i = 0; i < r * c; i++) {
    const x1 = Math.round(u() * 1000) / 100;
    const x2 = Math.round(u() * 500) / 100;
    out.push({ code: `D${String(i + 1).padStart(2, '0')}`, x1, x2, y: Math.round((10 + 2 * x1 - x2 + 3 * (u() - 0.5)) * 100) / 100 });
  }
  return out;
}

export interface GridOptions {
  rows?: number;
  cols?: number;
  /** lower-left corner and cell size; default a 0.5° grid at 12°E, 48°N (geographic) */
  x0?: number;
  y0?: number;
  size?: number;
  /** gap between cells (withoutNeighbours when > 0) */
  gap?: number;
  /** properties per cell (default gridRows) */
  props?: Record<string, unknown>[];
}

export { squareRing };

/** A FeatureCollection of square cells, row by row; cell i carries props[i]. */
export function gridCollection(opts: GridOptions = {}): { type: 'FeatureCollection'; features: any[] } {
  const rows = opts.rows ?? 4, cols = opts.cols ?? 4;
  const x0 = opts.x0 ?? 12, y0 = opts.y0 ?? 48, s = opts.size ?? 0.5, gap = opts.gap ?? 0;
  const props = opts.props ?? gridRows(rows, cols);
  const features = [];
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      const k = i * cols + j;
      features.push({
        type: 'Feature',
        properties: { ...props[k] },
        geometry: { type: 'Polygon', coordinates: [squareRing(x0 + j * (s + gap), y0 + i * (s + gap), s)] },
      });
    }
  }
  return { type: 'FeatureCollection', features };
}

/** GeoJSON of the grid after `edit` changes it in place. */
export function gridFile(name = 'districts.geojson', edit?: (fc: ReturnType<typeof gridCollection>) => void, opts: GridOptions = {}): NamedBytes {
  const fc = gridCollection(opts);
  edit?.(fc);
  return json(name, fc);
}

/** CSV text from a header and rows; cells are written as given (no quoting unless asked). */
export function csvFile(name: string, header: string[], rows: (string | number)[][]): NamedBytes {
  return text(name, [header.join(','), ...rows.map((r) => r.join(','))].join('\n') + '\n');
}

/** The grid's attributes as a CSV table (code,y,x1,x2), after `edit` changes the row cells. */
export function gridCsv(name = 'table.csv', edit?: (rows: (string | number)[][]) => void, r = 4, c = 4): NamedBytes {
  const rows: (string | number)[][] = gridRows(r, c).map((g) => [g.code, g.y, g.x1, g.x2]);
  edit?.(rows);
  return csvFile(name, ['code', 'y', 'x1', 'x2'], rows);
}

/** The grid as a boundary without attributes beyond its code (for table joins). */
export function gridCodesOnly(name = 'districts.geojson', codes?: string[]): NamedBytes {
  const base = gridRows();
  return gridFile(name, undefined, { props: base.map((g, i) => ({ code: codes ? codes[i] : g.code })) });
}

export function zipOf(name: string, entries: Record<string, Uint8Array>): NamedBytes {
  return { name, bytes: zipSync(entries, { level: 6 }) };
}

/**
 * Rewrites the uncompressed size recorded for `entry` in a zip's local and central headers (ZIP
 * File Format Specification, APPNOTE 6.3: local header size at offset 22, central header at 24),
 * so a tiny archive claims to expand to `claimed` bytes, as a zip bomb would.
 */
export function claimSize(zip: Uint8Array, entry: string, claimed: number): Uint8Array {
  const out = zip.slice();
  const v = new DataView(out.buffer);
  const nameBytes = enc.encode(entry);
  const matches = (at: number, nameAt: number) => nameBytes.every((b, i) => out[at + nameAt + i] === b);
  for (let at = 0; at + 46 < out.length; at++) {
    const sig = v.getUint32(at, true);
    if (sig === 0x04034b50 && v.getUint16(at + 26, true) === nameBytes.length && matches(at, 30)) v.setUint32(at + 22, claimed, true);
    if (sig === 0x02014b50 && v.getUint16(at + 28, true) === nameBytes.length && matches(at, 46)) v.setUint32(at + 24, claimed, true);
  }
  return out;
}

/** An .xlsx with the given sheets (first row = header). */
export async function xlsxFile(name: string, sheets: Record<string, (string | number | null)[][]>): Promise<NamedBytes> {
  const wb = new ExcelJS.Workbook();
  for (const [sheet, rows] of Object.entries(sheets)) {
    const ws = wb.addWorksheet(sheet);
    for (const r of rows) ws.addRow(r);
  }
  const buf = await wb.xlsx.writeBuffer();
  return { name, bytes: new Uint8Array(buf as ArrayBuffer) };
}

export function gridSheet(edit?: (rows: (string | number | null)[][]) => void): (string | number | null)[][] {
  const rows: (string | number | null)[][] = [['code', 'y', 'x1', 'x2'], ...gridRows().map((g) => [g.code, g.y, g.x1, g.x2])];
  edit?.(rows);
  return rows;
}

const COLUMBUS = new URL('../fixtures/columbus/', import.meta.url);
/** The Columbus shapefile parts (see test/fixtures/columbus/LICENCE.md). */
export function columbus(): Record<'shp' | 'shx' | 'dbf', Uint8Array> {
  const read = (ext: string) => new Uint8Array(readFileSync(new URL(`columbus.${ext}`, COLUMBUS)));
  return { shp: read('shp'), shx: read('shx'), dbf: read('dbf') };
}

/** A .dbf whose header claims `count` records (the bytes are cut to match, so only the count differs). */
export function dbfWithRecords(dbf: Uint8Array, count: number): Uint8Array {
  const v = new DataView(dbf.buffer, dbf.byteOffset, dbf.byteLength);
  const headerLength = v.getUint16(8, true);
  const recordLength = v.getUint16(10, true);
  const out = new Uint8Array(headerLength + count * recordLength + 1);
  out.set(dbf.subarray(0, Math.min(dbf.length, out.length - 1)));
  out[out.length - 1] = 0x1a;
  new DataView(out.buffer).setUint32(4, count, true);
  return out;
}

/**
 * Changes fields of `entry`'s local and central headers in a zip (APPNOTE 6.3: general-purpose
 * flags at offsets 6 / 8, compression method at 8 / 10, the name at 30 / 46): `flags` are OR-ed in,
 * `method` replaces the method, `rename` replaces the name by one of the same length.
 */
export function patchZipEntry(zip: Uint8Array, entry: string, change: { flags?: number; method?: number; rename?: string; nth?: number }): Uint8Array {
  const out = zip.slice();
  const v = new DataView(out.buffer);
  const nameBytes = enc.encode(entry);
  const matches = (at: number, nameAt: number) => nameBytes.every((b, i) => out[at + nameAt + i] === b);
  let seenLocal = 0, seenCentral = 0;
  for (let at = 0; at + 46 < out.length; at++) {
    const sig = v.getUint32(at, true);
    const local = sig === 0x04034b50 && v.getUint16(at + 26, true) === nameBytes.length && matches(at, 30);
    const central = sig === 0x02014b50 && v.getUint16(at + 28, true) === nameBytes.length && matches(at, 46);
    if (!local && !central) continue;
    const k = local ? seenLocal++ : seenCentral++;
    if (change.nth !== undefined && k !== change.nth) continue;
    const flagsAt = local ? 6 : 8;
    if (change.flags) v.setUint16(at + flagsAt, v.getUint16(at + flagsAt, true) | change.flags, true);
    if (change.method !== undefined) v.setUint16(at + flagsAt + 2, change.method, true);
    if (change.rename) out.set(enc.encode(change.rename), at + (local ? 30 : 46));
  }
  return out;
}

/** Replaces text inside one part of a zip (e.g. a sheet's name in xl/workbook.xml) and zips it again. */
export function editZipPart(zip: Uint8Array, part: string, edit: (text: string) => string): Uint8Array {
  const entries = unzipSync(zip);
  entries[part] = enc.encode(edit(new TextDecoder().decode(entries[part])));
  return zipSync(entries, { level: 6 });
}
