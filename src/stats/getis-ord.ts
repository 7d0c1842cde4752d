import type { CsrMatrix } from '../linalg/index.js';
import { InputError } from '../errors.js';
import { conditionalPermutationP } from './conditional-permutation.js';
import { normalTwoSided } from './distributions.js';
import type { LocalStatistic } from './local-types.js';
import { formatCount } from '../core/count.js';

/**
 * Getis–Ord local statistics (Getis & Ord 1992; Ord & Getis 1995, eqs. 2–3), with their moments under
 * randomisation.
 *
 * Gᵢ (the area itself left out): Gᵢ = Σ_{j≠i} w_ij x_j / Σ_{j≠i} x_j, on the weights as given;
 *   E[Gᵢ] = Wᵢ/(n − 1), Var[Gᵢ] = s(i)² ((n − 1) S₁ᵢ − Wᵢ²) / ((n − 2) (Σ_{j≠i} x_j)²),
 *   with Wᵢ = Σ_{j≠i} w_ij, S₁ᵢ = Σ_{j≠i} w_ij², s(i)² the variance (divisor n − 1) of the other values.
 * Gᵢ* (the area included): the same over all j with w_ii = 1 on binary weights (each neighbour 1, the
 *   area itself 1), E = Wᵢ* / n, Var = s² (n S₁ᵢ* − Wᵢ*²) / ((n − 1)(Σ x_j)²), s² with divisor n.
 * z = (G − E)/√Var, two-sided normal p. The values must not be negative (the statistic is a share of
 * the total); with `permutations`, the conditional permutation pseudo p.
 */
export function getisOrd(
  x: Float64Array,
  w: CsrMatrix,
  opts: { star?: boolean; permutations?: number; seed?: number; onProgress?: (done: number, total: number) => void } = {},
): LocalStatistic {
  const n = x.length;
  if (n !== w.n) throw new InputError(`The variable has ${formatCount(n)} values but the weights cover ${formatCount(w.n)} areas; use one value per area.`);
  if (n < 3) throw new InputError(`Local statistics need at least 3 areas; there are ${n}.`);
  for (let i = 0; i < n; i++) {
    if (!(x[i] >= 0)) throw new InputError(`Getis–Ord statistics need values of zero or more; area ${i + 1} has ${x[i]}. Use a count, a rate or another non-negative measure.`);
  }
  const star = opts.star === true;
  const weights = star ? binaryWithSelf(w) : w;
  let total = 0;
  let totalSq = 0;
  for (let i = 0; i < n; i++) {
    total += x[i];
    totalSq += x[i] * x[i];
  }
  if (!(total > 0)) throw new InputError('Getis–Ord statistics need at least one value above zero.');
  const value = new Float64Array(n);
  const expected = new Float64Array(n);
  const variance = new Float64Array(n);
  const z = new Float64Array(n);
  const p = new Float64Array(n);
  const neighbourCount = new Int32Array(n);
  const scale = new Float64Array(n);
  const offset = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sum = 0;
    let wSum = 0;
    let w2Sum = 0;
    let count = 0;
    for (let q = weights.rowPtr[i]; q < weights.rowPtr[i + 1]; q++) {
      const j = weights.colIdx[q];
      const wij = weights.values[q];
      if (j === i && !star) continue;
      if (j !== i) count++;
      sum += wij * x[j];
      wSum += wij;
      w2Sum += wij * wij;
    }
    neighbourCount[i] = count;
    // Gᵢ leaves the area out of the reference set too; Gᵢ* keeps it
    const m = star ? n : n - 1;
    const ref = star ? total : total - x[i];
    const refSq = star ? totalSq : totalSq - x[i] * x[i];
    const mean = ref / m;
    const s2 = Math.max(0, refSq / m - mean * mean);
    value[i] = ref > 0 ? sum / ref : NaN;
    scale[i] = ref > 0 ? 1 / ref : NaN;
    offset[i] = star ? x[i] / ref : 0;
    if (count === 0 || !(ref > 0)) {
      expected[i] = variance[i] = z[i] = p[i] = NaN;
      continue;
    }
    expected[i] = wSum / m;
    variance[i] = (s2 * (m * w2Sum - wSum * wSum)) / ((m - 1) * ref * ref);
    z[i] = (value[i] - expected[i]) / Math.sqrt(variance[i]);
    p[i] = normalTwoSided(z[i]);
  }
  const permutations = opts.permutations ?? 0;
  const seed = opts.seed ?? 1;
  const result: LocalStatistic = { kind: star ? 'gistar' : 'gi', value, expected, variance, z, p, permutations, seed, neighbourCount };
  if (permutations > 0) {
    result.pPermutation = conditionalPermutationP(weights, x, scale, offset, value, expected, permutations, seed, opts.onProgress);
  }
  return result;
}

/** Each neighbour weighted 1 and the area itself added with weight 1 (the Gᵢ* convention). */
function binaryWithSelf(w: CsrMatrix): CsrMatrix {
  const n = w.n;
  const rowPtr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) {
    let self = false;
    for (let q = w.rowPtr[i]; q < w.rowPtr[i + 1]; q++) if (w.colIdx[q] === i) self = true;
    rowPtr[i + 1] = rowPtr[i] + (w.rowPtr[i + 1] - w.rowPtr[i]) + (self ? 0 : 1);
  }
  const colIdx = new Int32Array(rowPtr[n]);
  const values = new Float64Array(rowPtr[n]).fill(1);
  for (let i = 0; i < n; i++) {
    let out = rowPtr[i];
    let placed = false;
    for (let q = w.rowPtr[i]; q < w.rowPtr[i + 1]; q++) {
      const j = w.colIdx[q];
      if (!placed && j >= i) {
        colIdx[out++] = i;
        placed = true;
        if (j === i) continue;
      }
      colIdx[out++] = j;
    }
    if (!placed) colIdx[out++] = i;
  }
  return { n, rowPtr, colIdx, values };
}
