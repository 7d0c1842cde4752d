import { csrMultiply, type CsrMatrix } from '../linalg/index.js';
import { InputError } from '../errors.js';
import { conditionalPermutationP } from './conditional-permutation.js';
import { normalTwoSided } from './distributions.js';
import type { LocalCategory, LocalStatistic } from './local-types.js';
import { centred } from './weights-sums.js';
import { formatCount } from '../core/count.js';

/**
 * Local Moran statistics (Anselin 1995, eq. 7): I_i = (z_i / m₂) Σⱼ w_ij z_j with z the deviations
 * from the mean and m₂ = Σ z_i² / n. With row-standardised W, Σ I_i / n equals global Moran's I.
 */
export function localMoran(v: Float64Array, w: CsrMatrix): Float64Array {
  const n = v.length;
  checkSizes(n, w);
  const { z, m2 } = centred(v);
  if (!(m2 > 0)) throw constantError();
  const wz = csrMultiply(w, z);
  const scale = n / m2;
  return z.map((zi, i) => zi * wz[i] * scale);
}

/**
 * Local Moran's I_i with its moments under total randomisation (Anselin 1995, eqs. 13–14, in the form
 * corrected by Sokal, Oden & Thomson 1998):
 *   E[I_i] = −w_i / (n − 1),
 *   Var[I_i] = w_i(2) (n − b₂)/(n − 1) + (w_i² − w_i(2)) (2b₂ − n)/((n − 1)(n − 2)) − w_i²/(n − 1)²,
 * with w_i = Σⱼ w_ij, w_i(2) = Σⱼ w_ij², b₂ = m₄/m₂², m_r = Σ z^r / n; z = (I − E)/√Var, two-sided
 * normal p. With `permutations`, the conditional permutation pseudo p (see conditional-permutation.ts).
 *
 * `of` (bivariate form, Anselin, Syabri & Smirnov 2002): the area's own standardised value is taken
 * from v, the neighbours' from `of`; the moments then are those of the permutation only.
 */
export function localMoranTest(
  v: Float64Array,
  w: CsrMatrix,
  opts: { permutations?: number; seed?: number; neighbourValues?: Float64Array; onProgress?: (done: number, total: number) => void } = {},
): LocalStatistic {
  const n = v.length;
  checkSizes(n, w);
  if (n < 3) throw new InputError(`Local statistics need at least 3 areas; there are ${n}.`);
  const own = centred(v);
  if (!(own.m2 > 0)) throw constantError();
  const other = opts.neighbourValues ? centred(opts.neighbourValues) : own;
  if (opts.neighbourValues && opts.neighbourValues.length !== n) checkSizes(opts.neighbourValues.length, w);
  if (!(other.m2 > 0)) throw constantError();
  // standardise both to unit second moment, so the bivariate form is on the same footing
  const zOwn = own.z.map((x) => x / Math.sqrt(own.m2 / n));
  const zOther = opts.neighbourValues ? other.z.map((x) => x / Math.sqrt(other.m2 / n)) : zOwn;
  const wz = csrMultiply(w, zOther);
  const b2 = (other.m4 / n) / (other.m2 / n) ** 2;
  const value = new Float64Array(n);
  const expected = new Float64Array(n);
  const variance = new Float64Array(n);
  const zScore = new Float64Array(n);
  const p = new Float64Array(n);
  const neighbourCount = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    let wi = 0;
    let wi2 = 0;
    for (let q = w.rowPtr[i]; q < w.rowPtr[i + 1]; q++) {
      wi += w.values[q];
      wi2 += w.values[q] * w.values[q];
    }
    neighbourCount[i] = w.rowPtr[i + 1] - w.rowPtr[i];
    value[i] = zOwn[i] * wz[i];
    if (neighbourCount[i] === 0) {
      expected[i] = variance[i] = zScore[i] = p[i] = NaN;
      continue;
    }
    // moments of Σⱼ w_ij z_j under randomisation, times z_i (the univariate form) — see the doc comment
    const e = -wi / (n - 1);
    const varI = (wi2 * (n - b2)) / (n - 1) + ((wi * wi - wi2) * (2 * b2 - n)) / ((n - 1) * (n - 2)) - (wi * wi) / ((n - 1) * (n - 1));
    expected[i] = opts.neighbourValues ? NaN : e;
    variance[i] = opts.neighbourValues ? NaN : varI;
    zScore[i] = opts.neighbourValues ? NaN : (value[i] - e) / Math.sqrt(varI);
    p[i] = opts.neighbourValues ? NaN : normalTwoSided(zScore[i]);
  }
  const permutations = opts.permutations ?? 0;
  const seed = opts.seed ?? 1;
  const result: LocalStatistic = { kind: 'moran', value, expected, variance, z: zScore, p, permutations, seed, neighbourCount };
  if (permutations > 0) {
    // I_i = z_i · Σ w_ij z_j: the reshuffled sum is of the neighbour values, scaled by the area's own
    const direction = opts.neighbourValues ? permutationCentre(zOwn, zOther, w) : expected;
    result.pPermutation = conditionalPermutationP(w, zOther, zOwn, new Float64Array(n), value, direction, permutations, seed, opts.onProgress);
  }
  return result;
}

/**
 * The expectation of the bivariate I_i under conditional permutation: z_i · w_i · mean of the other
 * areas' values, used only to tell the observed direction.
 */
function permutationCentre(zOwn: Float64Array, zOther: Float64Array, w: CsrMatrix): Float64Array {
  const n = zOwn.length;
  let total = 0;
  for (let j = 0; j < n; j++) total += zOther[j];
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let wi = 0;
    for (let q = w.rowPtr[i]; q < w.rowPtr[i + 1]; q++) wi += w.values[q];
    out[i] = zOwn[i] * wi * ((total - zOther[i]) / (n - 1));
  }
  return out;
}

/**
 * Where each area sits: its own value against the mean (high / low) and its neighbours' average
 * against the mean, for areas judged significant; the rest are `not-significant`.
 */
export function localMoranCategories(v: Float64Array, w: CsrMatrix, significant: ArrayLike<boolean>, neighbourValues?: Float64Array): LocalCategory[] {
  const n = v.length;
  const own = centred(v).z;
  const lag = csrMultiply(w, neighbourValues ? centred(neighbourValues).z : own);
  const out: LocalCategory[] = new Array(n);
  for (let i = 0; i < n; i++) {
    if (w.rowPtr[i + 1] === w.rowPtr[i]) out[i] = 'no-neighbours';
    else if (!significant[i]) out[i] = 'not-significant';
    else out[i] = own[i] >= 0 ? (lag[i] >= 0 ? 'high-high' : 'high-low') : lag[i] >= 0 ? 'low-high' : 'low-low';
  }
  return out;
}

function checkSizes(n: number, w: CsrMatrix): void {
  if (n !== w.n) throw new InputError(`The variable has ${formatCount(n)} values but the weights cover ${formatCount(w.n)} areas; use one value per area.`);
}

function constantError(): InputError {
  return new InputError('The variable has the same value in every area, so local Moran statistics are undefined; choose a variable that varies.');
}
