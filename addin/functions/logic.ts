/**
 * The cell functions' arithmetic as pure functions of cell ranges (2-D arrays as Excel passes them).
 * No Office here: the thin wrappers in functions.ts turn thrown InputErrors into cell errors.
 * The statistics themselves are the engine's (src/stats, src/weights); this file only reads ranges.
 */
import { InputError } from '../../src/errors.js';
import { moranColumn, gearyC, localMoran } from '../../src/stats/index.js';
import { spatialLag } from '../../src/weights/index.js';
import { weightsFromRange, type NeighbourOptions } from './neighbour-range.js';
import { flatten, hasHeader, readIds, readNumbers, trimTogether, type Grid } from './ranges.js';
import { formatCount } from '../../src/core/index.js';

export type { CellValue, Grid } from './ranges.js';
export { weightsFromRange, type NeighbourOptions } from './neighbour-range.js';

/**
 * Reads the ID column and the value column together. Blank rows at the end of both are cut
 * together (whole columns such as A:A work); a first row whose value is text (not a number) is
 * taken as headers in both. Positions in messages count from the first cell of the range.
 */
export function readColumns(values: Grid, ids: Grid): { ids: string[]; values: Float64Array } {
  const [vr, ir] = trimTogether([values, ids], ['The values range', 'The ID range']);
  let v = flatten(vr, 'The values range');
  let id = flatten(ir, 'The ID range');
  if (v.length !== id.length) {
    throw new InputError(`The values range has ${formatCount(v.length)} cells but the ID range has ${formatCount(id.length)}; select the same rows for both.`);
  }
  let offset = 1;
  if (hasHeader(v)) {
    v = v.slice(1);
    id = id.slice(1);
    offset = 2;
  }
  if (v.length === 0) throw new InputError('The values range holds only a header; select the rows of the areas too.');
  const out = readNumbers(v, offset, 'the values range');
  return { ids: readIds(id, offset), values: out };
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
