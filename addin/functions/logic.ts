/**
 * The cell functions' arithmetic as pure functions of cell ranges (2-D arrays as Excel passes them).
 * No Office here: the thin wrappers in functions.ts turn thrown InputErrors into cell errors.
 * The statistics themselves are the engine's (src/stats, src/weights); this file only reads ranges.
 */
import Papa from 'papaparse';
import { InputError } from '../../src/errors.js';
import { moranColumn, gearyC, localMoran } from '../../src/stats/index.js';
import { readEdgeList, spatialLag, type SpatialWeights } from '../../src/weights/index.js';

/** One cell as a custom function receives it (empty cells arrive as null or ""). */
export type CellValue = string | number | boolean | null | undefined;
export type Grid = CellValue[][];

export interface NeighbourOptions {
  /** Rescale each area's weights to sum to 1; otherwise the weights are used as listed. */
  rowStandardise?: boolean;
}

const NEIGHBOUR_RANGE = 'the neighbour range';

function isBlank(c: CellValue): boolean {
  return c === null || c === undefined || (typeof c === 'string' && c.trim() === '');
}

function asNumber(c: CellValue): number | null {
  if (typeof c === 'number') return Number.isFinite(c) ? c : null;
  if (typeof c === 'string' && /^\s*[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\s*$/.test(c)) return Number(c);
  return null;
}

function idText(c: CellValue): string {
  return typeof c === 'number' ? String(c) : String(c ?? '').trim();
}

/** A one-column (or one-row) range as a flat list, refusing a block several cells wide both ways. */
function flatten(range: Grid, what: string): CellValue[] {
  if (!Array.isArray(range) || range.length === 0) throw new InputError(`${what} is empty; select one column of cells.`);
  const rows = range.length;
  const cols = Math.max(...range.map((r) => r.length));
  if (rows > 1 && cols > 1) throw new InputError(`${what} is ${rows} rows by ${cols} columns; select a single column.`);
  return rows === 1 ? [...range[0]] : range.map((r) => r[0]);
}

/**
 * Reads the ID column and the value column together. A first row whose value is text (not a
 * number) is taken as headers in both. Positions in messages count from the first cell of the range.
 */
export function readColumns(values: Grid, ids: Grid): { ids: string[]; values: Float64Array } {
  let v = flatten(values, 'The values range');
  let id = flatten(ids, 'The ID range');
  if (v.length !== id.length) {
    throw new InputError(`The values range has ${v.length} cells but the ID range has ${id.length}; select the same rows for both.`);
  }
  let offset = 1;
  if (v.length > 0 && !isBlank(v[0]) && asNumber(v[0]) === null) {
    v = v.slice(1);
    id = id.slice(1);
    offset = 2;
  }
  const out = new Float64Array(v.length);
  const seen = new Map<string, number>();
  const names: string[] = [];
  for (let i = 0; i < v.length; i++) {
    const cell = i + offset;
    const x = asNumber(v[i]);
    if (x === null) {
      const shown = isBlank(v[i]) ? 'is empty' : `holds "${String(v[i])}", not a number`;
      throw new InputError(`Cell ${cell} of the values range ${shown}; every area needs a number.`, { row: cell });
    }
    out[i] = x;
    const name = idText(id[i]);
    if (name === '') throw new InputError(`Cell ${cell} of the ID range is empty; every area needs an ID.`, { row: cell });
    const earlier = seen.get(name);
    if (earlier !== undefined) throw new InputError(`The ID ${name} appears twice in the ID range (cells ${earlier} and ${cell}); IDs must be unique.`, { row: cell });
    seen.set(name, cell);
    names.push(name);
  }
  return { ids: names, values: out };
}

/**
 * Weights from a range of links: origin ID, neighbour ID and (optionally) weight per row, such as
 * the neighbour sheet the sidebar writes. The engine's edge-list reader does the checking, so a
 * range and a CSV file are read by the same rules (header row detected, unknown IDs refused).
 */
export function weightsFromRange(ids: string[], neighbours: Grid, opts: NeighbourOptions = {}): SpatialWeights {
  if (!Array.isArray(neighbours) || neighbours.length === 0) throw new InputError('The neighbour range is empty; select the origin, neighbour and weight columns.');
  const width = Math.max(...neighbours.map((r) => r.length));
  if (width < 2) throw new InputError('The neighbour range needs at least two columns: origin ID and neighbour ID (and a weight column).');
  const rows = neighbours.map((r) => r.slice(0, 3).map((c) => (isBlank(c) ? '' : idText(c))));
  const text = Papa.unparse(rows, { newline: '\n' });
  return readEdgeList(text, ids, { transform: opts.rowStandardise ? 'row' : 'as given', source: NEIGHBOUR_RANGE });
}

function prepare(values: Grid, ids: Grid, neighbours: Grid, opts: NeighbourOptions) {
  const cols = readColumns(values, ids);
  const w = weightsFromRange(cols.ids, neighbours, opts);
  return { ...cols, w };
}

/** Moran's I of a column: [I] or, with detail, [I, expected, z, p] (randomisation moments). */
export function moranOfRange(values: Grid, ids: Grid, neighbours: Grid, detail = false, opts: NeighbourOptions = {}): number[][] {
  const { values: v, w } = prepare(values, ids, neighbours, opts);
  const m = moranColumn(v, w);
  return detail ? [[m.I, m.expected, m.z, m.p]] : [[m.I]];
}

/** Seeded permutation p-value of Moran's I (two-sided). */
export function moranPermutationP(
  values: Grid, ids: Grid, neighbours: Grid, permutations = 999, seed = 1, opts: NeighbourOptions = {},
): number {
  const count = Math.round(permutations);
  if (!(count >= 1 && count <= 100000)) throw new InputError(`The number of permutations must be between 1 and 100000; got ${permutations}.`);
  const { values: v, w } = prepare(values, ids, neighbours, opts);
  const m = moranColumn(v, w, { permutations: count, seed: Math.round(seed) });
  return m.permutationP!;
}

/** Spatial lag of a column, one value per area in the ID range's order (spilled down). */
export function lagOfRange(values: Grid, ids: Grid, neighbours: Grid, opts: NeighbourOptions = {}): number[][] {
  const { values: v, w } = prepare(values, ids, neighbours, opts);
  return Array.from(spatialLag(w, v), (x) => [x]);
}

/** Local Moran values, one per area (spilled down). */
export function localMoranOfRange(values: Grid, ids: Grid, neighbours: Grid, opts: NeighbourOptions = {}): number[][] {
  const { values: v, w } = prepare(values, ids, neighbours, opts);
  return Array.from(localMoran(v, w), (x) => [x]);
}

/** Geary's C: [C] or, with detail, [C, expected, z, p]. */
export function gearyOfRange(values: Grid, ids: Grid, neighbours: Grid, detail = false, opts: NeighbourOptions = {}): number[][] {
  const { values: v, w } = prepare(values, ids, neighbours, opts);
  const g = gearyC(v, w);
  return detail ? [[g.C, g.expected, g.z, g.p]] : [[g.C]];
}
