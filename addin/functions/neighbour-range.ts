/**
 * The neighbour range of a cell function, in either of the two forms people keep in sheets, told
 * apart by shape:
 *  - a list of links: origin ID, neighbour ID and (optionally) weight on each row, two or three
 *    columns wide, with or without a header row (the neighbour sheet the sidebar writes);
 *  - a weights matrix: one row and one column per area, in the order of the ID range (n × n), or
 *    with the IDs along the top and down the left side (n + 1 × n + 1; either header alone also
 *    works), in any order. A blank cell is no link; the diagonal must be 0.
 * Both are read by the engine's edge-list reader, so the two forms give the same weights exactly.
 */
import Papa from 'papaparse';
import { Recent, twoHashes } from './recent.js';
import { InputError } from '../../src/errors.js';
import { readEdgeList, type SpatialWeights } from '../../src/weights/index.js';
import { asNumber, idText, isBlank, trimBlankEdges, type CellValue, type Grid } from './ranges.js';
import { formatCount } from '../../src/core/index.js';

export interface NeighbourOptions {
  /** Rescale each area's weights to sum to 1; otherwise the weights are used as listed. */
  rowStandardise?: boolean;
}

const SOURCE = 'the neighbour range';

/** Which form a neighbour range has, decided by its shape for n areas. */
export type NeighbourForm =
  | { kind: 'links' }
  | { kind: 'matrix'; headerRow: boolean; headerColumn: boolean };

/** Column letters for messages about a matrix cell ("column 3"), counted from the range's first column. */
function cellName(r: number, c: number): string {
  return `row ${r + 1}, column ${c + 1} of ${SOURCE}`;
}

function matrixShapes(rows: number, cols: number, n: number): { headerRow: boolean; headerColumn: boolean }[] {
  const shapes: { headerRow: boolean; headerColumn: boolean }[] = [];
  for (const headerRow of [false, true]) {
    for (const headerColumn of [false, true]) {
      if (rows === n + (headerRow ? 1 : 0) && cols === n + (headerColumn ? 1 : 0)) shapes.push({ headerRow, headerColumn });
    }
  }
  return shapes;
}

/** A matrix body (no headers) whose cells are all numbers or blank and whose diagonal is zero. */
function looksLikeMatrix(grid: Grid, shape: { headerRow: boolean; headerColumn: boolean }, n: number): boolean {
  const r0 = shape.headerRow ? 1 : 0;
  const c0 = shape.headerColumn ? 1 : 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const cell = grid[r0 + i][c0 + j];
      if (isBlank(cell)) continue;
      const x = asNumber(cell);
      if (x === null) return false;
      if (!shape.headerRow && !shape.headerColumn && i === j && x !== 0) return false;
    }
  }
  return true;
}

/**
 * The form of a trimmed neighbour range for n areas. Wider than three columns it must be a matrix;
 * two or three columns wide it is a list of links, unless (three areas or fewer) it also has a
 * matrix's shape and reads as one.
 */
export function neighbourForm(grid: Grid, n: number): NeighbourForm {
  const rows = grid.length;
  const cols = rows ? grid[0].length : 0;
  const shapes = matrixShapes(rows, cols, n);
  if (cols <= 3) {
    if (cols < 2) throw new InputError(`${SOURCE} has ${cols} column; give origin ID and neighbour ID (and weight) columns, or a matrix with one row and one column per area.`);
    const fits = shapes.find((s) => looksLikeMatrix(grid, s, n));
    return fits ? { kind: 'matrix', ...fits } : { kind: 'links' };
  }
  if (shapes.length === 0) {
    throw new InputError(
      `${SOURCE} is ${formatCount(rows)} rows by ${formatCount(cols)} columns, which is neither a list of links (two or three columns: origin ID, neighbour ID, weight) ` +
      `nor a matrix for the ${formatCount(n)} areas of the ID range (${n} × ${n}, or ${n + 1} × ${n + 1} with the IDs along the top and down the left side).`,
    );
  }
  return { kind: 'matrix', ...shapes[0] };
}

/** Position of each matrix row (or column) among the areas: by its header ID, or in the ID range's order. */
function headerOrder(cells: CellValue[], ids: string[], across: boolean): Int32Array {
  const position = new Map(ids.map((id, i) => [id, i]));
  const order = new Int32Array(cells.length);
  const seen = new Map<number, number>();
  cells.forEach((cell, k) => {
    const id = idText(cell);
    const where = across ? `column ${k + 2} of the top row of ${SOURCE}` : `row ${k + 2} of the left column of ${SOURCE}`;
    if (id === '') throw new InputError(`The matrix header at ${where} is empty; it should hold an area ID.`);
    const i = position.get(id);
    if (i === undefined) throw new InputError(`The matrix header at ${where} holds ${id}, which is not one of the areas of the ID range.`, { feature: id });
    const before = seen.get(i);
    if (before !== undefined) throw new InputError(`The area ${id} heads two ${across ? 'columns' : 'rows'} of the matrix (${before + 2} and ${k + 2}); each area heads one.`, { feature: id });
    seen.set(i, k);
    order[k] = i;
  });
  return order;
}

/** The links of a weights matrix as [origin, neighbour, weight] rows, checked cell by cell. */
function matrixLinks(grid: Grid, ids: string[], shape: { headerRow: boolean; headerColumn: boolean }): string[][] {
  const n = ids.length;
  const r0 = shape.headerRow ? 1 : 0;
  const c0 = shape.headerColumn ? 1 : 0;
  const identity = Int32Array.from({ length: n }, (_, i) => i);
  const colArea = shape.headerRow ? headerOrder(grid[0].slice(c0), ids, true) : identity;
  const rowArea = shape.headerColumn ? headerOrder(grid.slice(r0).map((r) => r[0]), ids, false) : identity;
  const links: string[][] = [];
  for (let a = 0; a < n; a++) {
    const row = grid[r0 + a];
    const i = rowArea[a];
    for (let b = 0; b < n; b++) {
      const cell = row[c0 + b];
      if (isBlank(cell)) continue;
      const x = asNumber(cell);
      if (x === null || x < 0) {
        throw new InputError(`The weight at ${cellName(r0 + a, c0 + b)} is "${String(cell)}"; a matrix cell holds a number of 0 or more (blank or 0 for no link).`, { row: r0 + a + 1 });
      }
      if (x === 0) continue;
      const j = colArea[b];
      if (i === j) {
        throw new InputError(`The matrix gives area ${ids[i]} a weight of ${x} with itself (${cellName(r0 + a, c0 + b)}); an area is never its own neighbour, so the diagonal must be 0 or blank.`, { row: r0 + a + 1 });
      }
      links.push([ids[i], ids[j], String(x)]);
    }
  }
  return links;
}

/** Weights read from the last few neighbour ranges, keyed by the IDs, the transform and the range's cells. */
const kept = new Recent<SpatialWeights>(3);

function rangeKey(ids: string[], neighbours: Grid, rowStandardise: boolean): string {
  const { mix, digest } = twoHashes();
  let cells = 0;
  for (const row of neighbours) {
    if (!Array.isArray(row)) continue;
    for (const c of row) {
      const text = c === null || c === undefined ? '' : typeof c === 'number' ? String(c) : `${typeof c}:${String(c)}`;
      for (let i = 0; i < text.length; i++) mix(text.charCodeAt(i));
      mix(0x1f);
      cells++;
    }
    mix(0x1e);
  }
  return `${rowStandardise ? 'row' : 'as given'}|${neighbours.length}|${cells}|${digest()}|${ids.join('\u0001')}`;
}

/**
 * Weights from a neighbour range, read again only when the range, the IDs or the transform changed:
 * a recalculation after an edit to the values reuses them.
 */
export function weightsFromRange(ids: string[], neighbours: Grid, opts: NeighbourOptions = {}): SpatialWeights {
  if (!Array.isArray(neighbours)) return readWeights(ids, neighbours, opts);
  return kept.get(rangeKey(ids, neighbours, opts.rowStandardise === true), () => readWeights(ids, neighbours, opts));
}

/**
 * Weights from a neighbour range (a list of links or a matrix, see above). The engine's edge-list
 * reader does the checking, so a range and a CSV file are read by the same rules (header row
 * detected, unknown IDs refused); trailing blank rows and columns are cut first.
 */
function readWeights(ids: string[], neighbours: Grid, opts: NeighbourOptions): SpatialWeights {
  if (!Array.isArray(neighbours) || neighbours.length === 0) throw new InputError(`${SOURCE} is empty; select the origin, neighbour and weight columns, or a weights matrix.`);
  // A matrix selected exactly keeps its blank last rows or columns (an area with no links); any
  // other range loses its blank rows at the end and blank columns at the right.
  const rawCols = Math.max(...neighbours.map((r) => (Array.isArray(r) ? r.length : 0)));
  const exact = matrixShapes(neighbours.length, rawCols, ids.length).length > 0 && rawCols > 3;
  const grid = exact ? neighbours.map((r) => Array.from({ length: rawCols }, (_, c) => r[c] ?? null)) : trimBlankEdges(neighbours);
  if (grid.length === 0) throw new InputError(`${SOURCE} is empty; select the origin, neighbour and weight columns, or a weights matrix.`);
  const form = neighbourForm(grid, ids.length);
  const rows = form.kind === 'matrix'
    ? [['origin', 'neighbour', 'weight'], ...matrixLinks(grid, ids, form)]
    : grid.map((r) => r.slice(0, 3).map((c) => (isBlank(c) ? '' : idText(c))));
  if (form.kind === 'matrix' && rows.length === 1) throw new InputError(`${SOURCE} is a matrix with no links: every cell off the diagonal is 0 or blank.`);
  const text = Papa.unparse(rows, { newline: '\n' });
  const w = readEdgeList(text, ids, { transform: opts.rowStandardise ? 'row' : 'as given', source: SOURCE });
  return form.kind === 'matrix' ? { ...w, description: w.description.replace(`read from ${SOURCE}`, `read from a weights matrix`) } : w;
}
