/**
 * Long tables (the per-area table, the neighbour list) written into the finished .xlsx as a stream.
 *
 * exceljs keeps every cell of a workbook in memory as objects (about 1 KB each) and styles each one
 * on writing: 1.4 million cells at 90,000 areas took 3 GB and most of a minute. Its streaming writer
 * (stream.xlsx.WorkbookWriter) cannot add pictures to a sheet, cannot append to a copy of the
 * user's workbook and runs only in Node, so it cannot serve the maps, the copy or the browser page.
 * Instead exceljs writes the whole workbook as before — every sheet, style, merge, width, picture
 * and page setting through the same writeSheet — with only the first rows of each long table
 * (enough to hold every kind of cell the table has); the remaining rows are then written here,
 * straight into that sheet's XML, reusing the style numbers exceljs gave the first rows' cells, and
 * the zip is rebuilt entry by entry with fflate's streaming deflate. The remaining rows are plain
 * numbers, inline strings and booleans: the only cell XML written by hand, because no kept library
 * writes rows into an existing sheet part.
 */
import { ooxmlText } from './ooxml-text.js';
import { Zip, ZipDeflate, unzipSync } from 'fflate';
import { isSmall, type Cell } from '../report/index.js';
import type { DeferredRows } from './write-sheet.js';

/** Tables longer than this stream their rows; shorter ones go through exceljs cell by cell. */
export const STREAM_ROWS_ABOVE = 5000;

// 't': a number below 0.001 in size, which a four-decimal column shows as 7.924E-04
// (src/report/number-formats.ts, cellFormat), so it needs a template cell, and a style, of its own
type Kind = 'n' | 't' | 's' | 'b';

/** The kind of XML cell a value becomes (null: no cell), as writeSheet's put() decides it. */
function kindOf(v: Cell): Kind | null {
  if (v === null) return null;
  if (typeof v === 'number') return !Number.isFinite(v) ? null : isSmall(v) ? 't' : 'n';
  return typeof v === 'string' ? 's' : 'b';
}

/**
 * How many leading rows exceljs must write so that every (column, kind of value) pair of the table
 * appears at least once: their cells carry the style numbers the streamed rows reuse.
 */
export function templateRowCount(rows: readonly Cell[][]): number {
  // one flag per (column, kind): a million-row table is scanned without building a key per cell
  const KIND = { n: 0, t: 1, s: 2, b: 3 } as const;
  let seen = new Uint8Array(0);
  let need = Math.min(1, rows.length);
  for (let r = 0; r < rows.length; r++) {
    const row = rows[r];
    if (row.length * 4 > seen.length) { const grown = new Uint8Array(row.length * 4); grown.set(seen); seen = grown; }
    for (let c = 0; c < row.length; c++) {
      const k = kindOf(row[c]);
      if (k === null) continue;
      const at = c * 4 + KIND[k];
      if (!seen[at]) { seen[at] = 1; need = r + 1; }
    }
  }
  return need;
}

function columnName(c: number): string {
  let s = '';
  for (let n = c + 1; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
  return s;
}

function columnIndex(letters: string): number {
  let n = 0;
  for (const ch of letters) n = n * 26 + ch.charCodeAt(0) - 64;
  return n - 1;
}

/**
 * Text as XML character data: the five markup characters as entities, and the characters XML cannot
 * carry written as the spreadsheet format's _xHHHH_ escapes (ooxml-text.ts), as every other cell of
 * the results is.
 */
const ESCAPE = /[<>&'"]/g;
const ENTITY: Record<string, string> = { '<': '&lt;', '>': '&gt;', '&': '&amp;', "'": '&apos;', '"': '&quot;' };
const xmlText = (s: string) => ooxmlText(s).replace(ESCAPE, (ch) => ENTITY[ch]);

/** Style number of each (column, kind) pair, read from the cells exceljs wrote for the template rows. */
function templateStyles(sheetXml: string, d: DeferredRows): Map<string, string> {
  const styles = new Map<string, string>();
  const first = d.firstRow - d.from;
  const cellRe = /<c r="([A-Z]+)(\d+)"([^>]*?)\/?>/g;
  for (let m; (m = cellRe.exec(sheetXml));) {
    const row = Number(m[2]);
    if (row < first || row >= d.firstRow) continue;
    const col = columnIndex(m[1]);
    const kind = kindOf(d.block.rows[row - first]?.[col] ?? null);
    const s = /\bs="(\d+)"/.exec(m[3]);
    if (kind && s) styles.set(`${col}:${kind}`, s[1]);
  }
  return styles;
}

/** XML of the deferred rows, in pieces of about `chunkChars` characters. */
function* rowsXml(d: DeferredRows, styles: Map<string, string>, chunkChars = 1 << 20): Generator<string> {
  const cols = d.block.rows.reduce((m, r) => Math.max(m, r.length), 0);
  const names = Array.from({ length: cols }, (_, c) => columnName(c));
  const style = (c: number, k: Kind) => { const s = styles.get(`${c}:${k}`); return s ? ` s="${s}"` : ''; };
  let out = '';
  for (let r = d.from; r < d.block.rows.length; r++) {
    const rowNumber = d.firstRow + r - d.from;
    const cells = d.block.rows[r];
    const height = d.heights?.get(rowNumber);
    out += height === undefined ? `<row r="${rowNumber}">` : `<row r="${rowNumber}" ht="${height}" customHeight="1">`;
    for (let c = 0; c < cells.length; c++) {
      const v = cells[c];
      const k = kindOf(v);
      if (k === null) continue;
      const ref = `${names[c]}${rowNumber}`;
      if (k === 'n' || k === 't') out += `<c r="${ref}"${style(c, k)}><v>${v}</v></c>`;
      else if (k === 'b') out += `<c r="${ref}"${style(c, k)} t="b"><v>${v ? 1 : 0}</v></c>`;
      else {
        const text = xmlText(v as string);
        const space = /^\s|\s$/.test(text) ? ' xml:space="preserve"' : '';
        out += `<c r="${ref}"${style(c, k)} t="inlineStr"><is><t${space}>${text}</t></is></c>`;
      }
    }
    out += '</row>';
    if (out.length >= chunkChars) { yield out; out = ''; }
  }
  if (out) yield out;
}

/** Where the rows after the template belong: before the first row element numbered past them. */
function insertionPoint(sheetXml: string, afterRow: number): number {
  const rowRe = /<row r="(\d+)"/g;
  for (let m; (m = rowRe.exec(sheetXml));) if (Number(m[1]) > afterRow) return m.index;
  const end = sheetXml.indexOf('</sheetData>');
  if (end < 0) throw new Error('the sheet has no sheetData element to stream rows into');
  return end;
}

/**
 * Raw-deflates one zip entry's pieces in order, handing the compressed bytes to `emit`; returns the
 * CRC-32 and length of the uncompressed bytes. The default is fflate's (any host); Node's native
 * zlib is about five times faster (node-deflate.ts), which the command line passes in.
 */
export type EntryDeflate = (pieces: Iterable<Uint8Array>, emit: (compressed: Uint8Array) => void) => Promise<{ crc: number; size: number }>;

/** One entry's pieces: the sheet XML up to each long table's end, its streamed rows, the rest. */
function* entryPieces(xml: string, tables: readonly DeferredRows[]): Generator<Uint8Array> {
  const encoder = new TextEncoder();
  let at = 0;
  for (const d of [...tables].sort((a, b) => a.firstRow - b.firstRow)) {
    const styles = templateStyles(xml, d);
    const cut = insertionPoint(xml, d.firstRow - 1);
    yield encoder.encode(xml.slice(at, cut));
    for (const piece of rowsXml(d, styles)) yield encoder.encode(piece);
    at = cut;
  }
  yield encoder.encode(xml.slice(at));
}

/**
 * Rebuilds the .xlsx exceljs wrote, with the deferred rows streamed into their sheets
 * (`deferred` maps a zip entry such as xl/worksheets/sheet7.xml to its tables' deferred rows).
 */
export async function streamDeferredRows(xlsx: Uint8Array, deferred: ReadonlyMap<string, DeferredRows[]>, deflate?: EntryDeflate): Promise<Uint8Array> {
  const entries = unzipSync(xlsx);
  const chunks: Uint8Array[] = [];
  let failure: Error | null = null;
  const zip = new Zip((err, data) => { if (err) failure = err; else chunks.push(data); });
  for (const [name, bytes] of Object.entries(entries)) {
    const tables = deferred.get(name);
    const pieces = tables ? entryPieces(new TextDecoder().decode(bytes), tables) : [bytes];
    if (!deflate) {
      const entry = new ZipDeflate(name, { level: 1 });
      zip.add(entry);
      for (const piece of pieces) entry.push(piece);
      entry.push(new Uint8Array(0), true);
      continue;
    }
    // fflate writes sizes and CRC in a descriptor after the data, so they may be known only at the end
    const file = {
      filename: name, compression: 8, crc: 0, size: 0,
      ondata: null as unknown as (err: Error | null, data: Uint8Array, final: boolean) => void,
    };
    zip.add(file);
    const { crc, size } = await deflate(pieces, (compressed) => file.ondata(null, compressed, false));
    file.crc = crc; file.size = size;
    file.ondata(null, new Uint8Array(0), true);
  }
  zip.end();
  if (failure) throw failure;
  let size = 0;
  for (const c of chunks) size += c.length;
  const out = new Uint8Array(size);
  let p = 0;
  for (const c of chunks) { out.set(c, p); p += c.length; }
  return out;
}
