/**
 * Reading the cell ranges a custom function receives (2-D arrays, empty cells as null or ""). Whole
 * columns (A:A) and ranges that run past the data arrive with blank rows at the end: those are cut,
 * across all the area ranges of one call together, so that the values, the IDs and the explanatory
 * columns keep the same rows. A blank inside the data stays an error that names its cell.
 */
import { InputError } from '../../src/errors.js';
import { formatCount } from '../../src/core/index.js';

/** One cell as a custom function receives it (empty cells arrive as null or ""). */
export type CellValue = string | number | boolean | null | undefined;
export type Grid = CellValue[][];

export function isBlank(c: CellValue): boolean {
  return c === null || c === undefined || (typeof c === 'string' && c.trim() === '');
}

export function asNumber(c: CellValue): number | null {
  if (typeof c === 'number') return Number.isFinite(c) ? c : null;
  if (typeof c === 'string' && /^\s*[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\s*$/.test(c)) return Number(c);
  return null;
}

export function idText(c: CellValue): string {
  return typeof c === 'number' ? String(c) : String(c ?? '').trim();
}

function rowIsBlank(row: readonly CellValue[] | undefined): boolean {
  return !row || row.every(isBlank);
}

/** A range as given, checked to be a non-empty 2-D array. */
function asGrid(range: Grid, what: string): Grid {
  if (!Array.isArray(range) || range.length === 0 || !range.every(Array.isArray)) {
    throw new InputError(`${what} is empty; select the cells that hold it.`);
  }
  return range;
}

/**
 * Cuts the blank rows at the end of several ranges that describe the same areas, together: every
 * range keeps rows up to the last row that is filled in any of them. A single-row range (a row of
 * values laid out across) is left alone.
 */
export function trimTogether(ranges: readonly Grid[], names: readonly string[]): Grid[] {
  const grids = ranges.map((r, i) => asGrid(r, names[i]));
  let last = 0;
  for (const g of grids) {
    if (g.length === 1) continue;
    for (let r = g.length - 1; r >= last; r--) {
      if (!rowIsBlank(g[r])) { last = r + 1; break; }
    }
  }
  return grids.map((g) => (g.length === 1 ? g : g.slice(0, Math.max(last, 1))));
}

/** Cuts blank rows at the end and blank columns at the right of one range (the neighbour range). */
export function trimBlankEdges(range: Grid): Grid {
  let rows = range.length;
  while (rows > 0 && rowIsBlank(range[rows - 1])) rows--;
  let cols = 0;
  for (let r = 0; r < rows; r++) {
    const row = range[r];
    for (let c = row.length - 1; c >= cols; c--) {
      if (!isBlank(row[c])) { cols = c + 1; break; }
    }
  }
  const out: Grid = new Array(rows);
  for (let r = 0; r < rows; r++) {
    const row = range[r];
    out[r] = row.length === cols ? row : Array.from({ length: cols }, (_, c) => row[c] ?? null);
  }
  return out;
}

/** A one-column (or one-row) range as a flat list, refusing a block several cells wide both ways. */
export function flatten(range: Grid, what: string): CellValue[] {
  if (!Array.isArray(range) || range.length === 0) throw new InputError(`${what} is empty; select one column of cells.`);
  const rows = range.length;
  const cols = Math.max(...range.map((r) => r.length));
  if (rows > 1 && cols > 1) throw new InputError(`${what} is ${formatCount(rows)} rows by ${formatCount(cols)} columns; select a single column.`);
  return rows === 1 ? [...range[0]] : range.map((r) => r[0]);
}

/** Whether the first cell of a column reads as a header: filled and not a number. */
export function hasHeader(cells: readonly CellValue[]): boolean {
  return cells.length > 0 && !isBlank(cells[0]) && asNumber(cells[0]) === null;
}

/**
 * The area IDs, checked: none blank, none repeated. `offset` is the position in the range of the
 * first ID (2 when a header row was read), so that messages name the cell the analyst sees.
 */
export function readIds(cells: readonly CellValue[], offset: number): string[] {
  const seen = new Map<string, number>();
  const names: string[] = new Array(cells.length);
  for (let i = 0; i < cells.length; i++) {
    const cell = i + offset;
    const name = idText(cells[i]);
    if (name === '') throw new InputError(`Cell ${cell} of the ID range is empty; every area needs an ID.`, { row: cell });
    const earlier = seen.get(name);
    if (earlier !== undefined) throw new InputError(`The ID ${name} appears twice in the ID range (cells ${earlier} and ${cell}); IDs must be unique.`, { row: cell });
    seen.set(name, cell);
    names[i] = name;
  }
  return names;
}

/** Numbers of one column, one per area; a blank or text cell is refused with its position. */
export function readNumbers(cells: readonly CellValue[], offset: number, what: string): Float64Array {
  const out = new Float64Array(cells.length);
  for (let i = 0; i < cells.length; i++) {
    const x = asNumber(cells[i]);
    if (x === null) {
      const cell = i + offset;
      const shown = isBlank(cells[i]) ? 'is empty' : `holds "${String(cells[i])}", not a number`;
      throw new InputError(`Cell ${cell} of ${what} ${shown}; every area needs a number.`, { row: cell });
    }
    out[i] = x;
  }
  return out;
}
