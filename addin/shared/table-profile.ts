/** What the data step shows about a table: column kinds, the likely ID column, where a cell is. Pure. */
import Papa from 'papaparse';
import { InputError } from '../../src/errors.js';
import type { NamedBytesLike } from '../../src/pipeline/index.js';
import type { SheetValue, TableSnapshot } from './types.js';

export type ColumnKind = 'numbers' | 'text' | 'mixed' | 'empty';

export interface ColumnProfile {
  name: string;
  kind: ColumnKind;
  numbers: number;
  texts: number;
  blanks: number;
  /** every row has a value and no value repeats */
  unique: boolean;
}

export interface TableProfile {
  n: number;
  columns: ColumnProfile[];
  suggestedId?: string;
  /** columns usable in a model: numbers with at most a few blanks */
  numeric: string[];
}

const isBlank = (c: SheetValue | undefined) => c === null || c === undefined || (typeof c === 'string' && c.trim() === '');
const NUMBER_TEXT = /^\s*[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\s*$/;
const ID_NAME = /(^|[_\s-])(id|code|key|geoid|fips)($|[_\s-])|^id/i;

export function profileTable(t: TableSnapshot): TableProfile {
  const columns = t.headers.map((name, k): ColumnProfile => {
    let numbers = 0, texts = 0, blanks = 0;
    const seen = new Set<string>();
    let unique = true;
    for (const row of t.rows) {
      const c = row[k];
      if (isBlank(c)) { blanks++; unique = false; continue; }
      if (typeof c === 'number' || (typeof c === 'string' && NUMBER_TEXT.test(c))) numbers++;
      else texts++;
      const key = String(c).trim();
      if (seen.has(key)) unique = false;
      seen.add(key);
    }
    const kind: ColumnKind = numbers + texts === 0 ? 'empty' : texts === 0 ? 'numbers' : numbers === 0 ? 'text' : 'mixed';
    return { name, kind, numbers, texts, blanks, unique };
  });
  const candidates = columns.filter((c) => c.unique && c.kind !== 'empty' && t.rows.length > 0);
  const suggested =
    candidates.find((c) => ID_NAME.test(c.name)) ??
    candidates.find((c) => c.kind === 'text') ??
    candidates.find((c) => c.kind === 'numbers' && t.rows.every((r) => Number.isInteger(Number(r[t.headers.indexOf(c.name)]))));
  return { n: t.rows.length, columns, suggestedId: suggested?.name, numeric: columns.filter((c) => c.kind === 'numbers').map((c) => c.name) };
}

/** Spreadsheet column letters for a 1-based position. */
export function columnLetters(position: number): string {
  let s = '';
  for (let n = position; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
  return s;
}

/** A1 address of the cell of `column` on sheet row `row`, or of the row's first cell when the column is unknown. */
export function cellOf(t: TableSnapshot, row: number, column?: string): string {
  const k = column === undefined ? 0 : Math.max(0, t.headers.indexOf(column));
  return `${columnLetters(t.firstColumn + k)}${row}`;
}

/**
 * The table as CSV bytes for the engine, with blank lines where the sheet has rows above the
 * header or blank rows between, so the engine's row numbers are the sheet's.
 */
export function tableAsCsv(t: TableSnapshot): NamedBytesLike {
  const lines: string[] = [];
  const pad = (upTo: number) => { while (lines.length < upTo - 1) lines.push(''); };
  const cell = (c: SheetValue) => (c === null ? '' : typeof c === 'number' ? String(c) : String(c));
  pad(t.headerRow);
  lines.push(Papa.unparse([t.headers], { newline: '\n' }));
  t.rows.forEach((r, i) => {
    pad(t.rowNumbers[i]);
    const text = Papa.unparse([t.headers.map((_, k) => cell(r[k] ?? null))], { newline: '\n' });
    // a row of empty cells unparses to commas only; keep it as a line so numbering holds
    lines.push(text);
  });
  return { name: `sheet "${t.sheet}"`, bytes: new TextEncoder().encode(lines.join('\n') + '\n') };
}

/**
 * Points from two coordinate columns, as a GeoJSON layer the engine reads like any boundary file.
 * Rows without both coordinates are refused by cell.
 */
export function pointsLayer(t: TableSnapshot, idColumn: string, xColumn: string, yColumn: string): NamedBytesLike {
  const [ki, kx, ky] = [idColumn, xColumn, yColumn].map((c) => t.headers.indexOf(c));
  if (ki < 0 || kx < 0 || ky < 0) throw new InputError('Choose the ID column and both coordinate columns first.');
  const features = t.rows.map((r, i) => {
    const num = (k: number, name: string) => {
      const v = r[k];
      const x = typeof v === 'number' ? v : typeof v === 'string' && NUMBER_TEXT.test(v) ? Number(v) : NaN;
      if (!Number.isFinite(x)) {
        throw new InputError(`Cell ${cellOf(t, t.rowNumbers[i], name)} of sheet "${t.sheet}" has no number for the coordinate column ${name}.`, { row: t.rowNumbers[i], column: name });
      }
      return x;
    };
    return { type: 'Feature', properties: { [idColumn]: r[ki] }, geometry: { type: 'Point', coordinates: [num(kx, xColumn), num(ky, yColumn)] } };
  });
  const text = JSON.stringify({ type: 'FeatureCollection', features });
  return { name: `points from columns ${xColumn} and ${yColumn}.geojson`, bytes: new TextEncoder().encode(text) };
}
