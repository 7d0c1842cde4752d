/**
 * The local-statistics cell functions as pure functions of cell ranges (see logic.ts for the range
 * rules). Decisions follow the engine's: conditional permutation p-values, then the chosen
 * multiple-testing control (Benjamini–Hochberg by default).
 */
import { InputError } from '../../src/errors.js';
import { LOCAL_CATEGORY_LABEL } from '../../src/pipeline/index.js';
import {
  controlMultipleTests, getisOrd, localMoranCategories, localMoranTest, type MultipleTestingControl,
} from '../../src/stats/index.js';
import { readColumns, weightsFromRange, type Grid, type NeighbourOptions } from './logic.js';

export interface LocalCellOptions extends NeighbourOptions {
  permutations?: number;
  seed?: number;
  /** level of the control (default 0.05) */
  level?: number;
  /** "fdr" (default), "bonferroni" or "none" */
  control?: string;
}

function settings(o: LocalCellOptions): { permutations: number; seed: number; control: MultipleTestingControl } {
  const permutations = o.permutations ?? 999;
  if (!Number.isInteger(permutations) || permutations < 0 || permutations > 99_999) {
    throw new InputError(`The number of permutations must be a whole number from 0 to 99999; got ${permutations}.`);
  }
  const seed = o.seed ?? 1;
  if (!Number.isInteger(seed) || seed < 0 || seed > 4_294_967_295) throw new InputError(`The seed must be a whole number from 0 to 4294967295; got ${seed}.`);
  const level = o.level ?? 0.05;
  if (!(level > 0 && level < 1)) throw new InputError(`The level must lie between 0 and 1; got ${level}.`);
  const method = (o.control ?? 'fdr').trim().toLowerCase();
  if (method !== 'fdr' && method !== 'bonferroni' && method !== 'none') throw new InputError(`The control must be "fdr", "bonferroni" or "none"; got "${o.control}".`);
  return { permutations, seed, control: { method, level } };
}

const blankIfNaN = (x: number): number | string => (Number.isFinite(x) ? x : '');

/**
 * Local Moran per area: [statistic, z, p, group] rows in the order of the IDs, where p is the
 * permutation p (the analytic one with 0 permutations) and the group is decided after control.
 */
export function localMoranRows(values: Grid, ids: Grid, neighbours: Grid, o: LocalCellOptions = {}): (number | string)[][] {
  const cols = readColumns(values, ids);
  const w = weightsFromRange(cols.ids, neighbours, o);
  const s = settings(o);
  const r = localMoranTest(cols.values, w, { permutations: s.permutations, seed: s.seed });
  const p = r.pPermutation ?? r.p;
  const decided = controlMultipleTests(p, s.control).significant;
  const groups = localMoranCategories(cols.values, w, decided);
  return cols.ids.map((_, i) => [r.value[i], blankIfNaN(r.z[i]), blankIfNaN(p[i]), LOCAL_CATEGORY_LABEL[groups[i]]]);
}

/** Getis–Ord Gi* per area: [z, p, finding] rows; binary weights with the area itself included. */
export function giStarRows(values: Grid, ids: Grid, neighbours: Grid, o: LocalCellOptions = {}): (number | string)[][] {
  const cols = readColumns(values, ids);
  const w = weightsFromRange(cols.ids, neighbours, o);
  const s = settings(o);
  const r = getisOrd(cols.values, w, { star: true, permutations: s.permutations, seed: s.seed });
  const p = r.pPermutation ?? r.p;
  const decided = controlMultipleTests(p, s.control).significant;
  return cols.ids.map((_, i) => [
    blankIfNaN(r.z[i]), blankIfNaN(p[i]),
    r.neighbourCount[i] === 0 ? 'no neighbours' : !decided[i] ? 'not significant' : r.z[i] > 0 ? 'cluster of high values' : 'cluster of low values',
  ]);
}
