/**
 * Checks that the numbers handed to the models can be carried in double precision, and that what the
 * models return describes the data rather than rounding noise. Each refusal names the column, row,
 * neighbour rule or model at fault, so odd data ends in a message instead of an internal error.
 */
import { InputError } from '../errors.js';
import { sayList } from '../core/words.js';
import type { SpatialWeights } from '../weights/types.js';
import { inSentence, areasNeeded, type ModelEntry } from '../models/index.js';
import { formatCount } from '../core/count.js';

/**
 * Largest magnitude accepted in a model column or a weight. Sums of squares of n values of size m
 * reach n·m²; at 1e100 that stays far below the double range (about 1.8e308) for any n, while a
 * value near 1e155 already overflows when squared and summed.
 */
export const LARGEST_VALUE = 1e100;
/** Smallest non-zero magnitude of a column's largest value; below it products underflow to zero. */
export const SMALLEST_SCALE = 1e-100;
/** A residual sum of squares at or below this share of the total is rounding noise (R² = 1). */
export const PERFECT_FIT_SHARE = 1e-20;

export interface ColumnPlace {
  ids: string[];
  rows: number[];
  rowKind?: 'row' | 'feature';
}

/** Every model column: magnitudes inside the representable range, and a spread above rounding. */
export function checkModelColumns(columns: Map<string, Float64Array>, place: ColumnPlace): void {
  const rowWord = place.rowKind === 'feature' ? 'feature' : 'row';
  for (const [name, v] of columns) {
    let largest = 0;
    let at = -1;
    let min = Infinity;
    let max = -Infinity;
    for (let i = 0; i < v.length; i++) {
      const a = Math.abs(v[i]);
      if (a > largest) { largest = a; at = i; }
      if (v[i] < min) min = v[i];
      if (v[i] > max) max = v[i];
    }
    if (largest > LARGEST_VALUE) {
      throw new InputError(
        `Column "${name}", ${rowWord} ${place.rows[at]} (area ${place.ids[at]}): the value ${v[at]} is beyond the range the calculations can carry ` +
        `(values above ${LARGEST_VALUE} in size overflow when squared and summed); rescale the column (for example divide it by a power of ten) and run again.`,
        { column: name, row: place.rows[at] },
      );
    }
    if (largest > 0 && largest < SMALLEST_SCALE) {
      throw new InputError(
        `Column "${name}" holds only zeros and values smaller than ${SMALLEST_SCALE} (largest ${v[at]}, ${rowWord} ${place.rows[at]}), ` +
        `which the calculations cannot tell apart from zero: the column is in effect constant. Rescale it (for example multiply it by a power of ten) or remove it.`,
        { column: name },
      );
    }
    if (largest > 0 && max > min && max - min <= 1e-13 * largest) {
      throw new InputError(
        `Column "${name}" varies only in its last digits (from ${min} to ${max}), below what double precision can resolve: ` +
        `the column is in effect constant. Subtract a round figure near ${min} from it, or remove it.`,
        { column: name },
      );
    }
  }
}

/**
 * The neighbour weights as built: at least one link, every weight finite and representable, every
 * area with links keeping a positive total (a rule whose weights overflow or underflow leaves rows
 * of infinities or zeros).
 */
export function checkWeights(w: SpatialWeights, ruleWords: string): void {
  if (w.colIdx.length === 0) {
    throw new InputError(`No area has a neighbour under ${ruleWords}: every area is without neighbours, so there is no spatial structure to test or model; choose a rule that links areas (a lower order, a wider band or more nearest neighbours).`);
  }
  for (let i = 0; i < w.n; i++) {
    let sum = 0;
    for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) {
      const value = w.values[p];
      if (!Number.isFinite(value) || Math.abs(value) > LARGEST_VALUE) {
        throw new InputError(
          `The weight from area ${w.ids[i]} to area ${w.ids[w.colIdx[p]]} under ${ruleWords} is ${value}, beyond the range the calculations can carry ` +
          `(weights overflow above ${LARGEST_VALUE}); rescale the weights or choose a smaller power.`,
        );
      }
      sum += value;
    }
    if (w.rowPtr[i + 1] > w.rowPtr[i] && !(sum > 0 && Number.isFinite(sum))) {
      throw new InputError(
        `The weights of area ${w.ids[i]} under ${ruleWords} overflow or underflow (after the transform they add up to ${sum}); rescale the weights or choose a smaller power.`,
      );
    }
  }
}

/**
 * True when the plain regression fits exactly (residuals at rounding level): R² = 1 means the outcome
 * is a linear function of the explanatory columns, and every residual test would describe rounding.
 */
export function isPerfectFit(y: Float64Array, residuals: Float64Array): boolean {
  let mean = 0;
  for (const v of y) mean += v;
  mean /= y.length;
  let total = 0;
  let rss = 0;
  for (let i = 0; i < y.length; i++) {
    total += (y[i] - mean) ** 2;
    rss += residuals[i] ** 2;
  }
  return rss <= PERFECT_FIT_SHARE * total;
}

export function perfectFitError(y: string, x: string[]): InputError {
  return new InputError(
    `The outcome "${y}" is exactly a straight-line combination of ${x.map((c) => `"${c}"`).join(', ')} (R² = 1: the fit leaves no error, only rounding noise). ` +
    `There is nothing left for neighbours to explain, and tests on the residuals would measure rounding errors. Check that the outcome was not computed from the explanatory columns.`,
    { column: y },
  );
}

/**
 * Spatial models need spare observations beyond their coefficients, the residual variance and their
 * spatial parameters (`models`: the asked-for models with spatial parameters).
 */
export function checkSpatialModelSize(n: number, k: number, models: readonly ModelEntry[]): void {
  const short = models.filter((m) => n < areasNeeded(m, k));
  if (short.length > 0) {
    const needed = Math.max(...short.map((m) => areasNeeded(m, k)));
    throw new InputError(
      `There are ${formatCount(n)} areas for ${k} coefficients (n = ${n}, k = ${k}): the ${labels(short)} also estimate${short.length > 1 ? '' : 's'} the error variance and a spatial parameter, ` +
      `which needs at least ${formatCount(needed)} areas. Use more areas, fewer explanatory columns, or only the plain regression.`,
    );
  }
}

/**
 * Directed links that never lead back to an area (a chain, a tree) make W nilpotent: every eigenvalue
 * is 0, ln|I − ρW| = 0 for every ρ and the spatial parameter has no bounded range to search.
 */
export function checkSpatialRange(range: { lower: number; upper: number }, ruleWords: string, models: readonly ModelEntry[]): void {
  if (models.length === 0 || (Number.isFinite(range.lower) && Number.isFinite(range.upper))) return;
  throw new InputError(
    `Under ${ruleWords} the links never lead back to an area they started from (no loop: every eigenvalue of the weights is 0), ` +
    `so the spatial parameter has no bounded range and the ${labels(models)} cannot be estimated. ` +
    `List each link in both directions, or run only the plain regression and its tests.`,
  );
}

/** "the spatial lag model", "the spatial lag model and spatial error model" */
function labels(models: readonly ModelEntry[]): string {
  return sayList(models.map((m) => inSentence(m.label)));
}
