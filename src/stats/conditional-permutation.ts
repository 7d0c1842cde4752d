import type { CsrMatrix } from '../linalg/index.js';
import { seededRandom } from './random.js';

/**
 * Conditional permutation inference for local statistics (Anselin 1995, §4.2). For area i the
 * statistic under permutation r is a_i · Σₘ w_i,m · v[σᵣ(m)] + c_i, where σᵣ draws |Nᵢ| distinct
 * areas other than i: the area keeps its own value, the other n − 1 values are reshuffled over its
 * neighbours. One set of R draws of the largest neighbour count is made once and shared by every
 * area (the first |Nᵢ| of a uniform draw without replacement are a uniform draw of that size; an
 * index at or past i is moved up by one to skip i), so the cost is R · Σ|Nᵢ|, not R · n².
 *
 * Pseudo p = (M + 1)/(R + 1), M the permuted statistics at least as extreme as the observed one in the
 * observed direction: ≥ when observed ≥ expected, ≤ otherwise (see PERMUTATION_RULE).
 */
export function conditionalPermutationP(
  w: CsrMatrix,
  v: Float64Array,
  scale: Float64Array,
  offset: Float64Array,
  observed: Float64Array,
  expected: Float64Array,
  permutations: number,
  seed: number,
  onProgress?: (done: number, total: number) => void,
): Float64Array {
  const n = w.n;
  const { rowPtr, colIdx, values } = w;
  let kMax = 0;
  for (let i = 0; i < n; i++) kMax = Math.max(kMax, rowPtr[i + 1] - rowPtr[i] - (hasSelf(w, i) ? 1 : 0));
  const draws = drawWithoutReplacement(n - 1, kMax, permutations, seed);
  const out = new Float64Array(n).fill(NaN);
  const step = Math.max(1, Math.floor(n / 100));
  for (let i = 0; i < n; i++) {
    if (onProgress && i % step === 0) onProgress(i, n);
    const start = rowPtr[i];
    const end = rowPtr[i + 1];
    // the area's own entry (Gᵢ*) is held in `offset`, so it is left out of the reshuffled sum
    let k = 0;
    for (let p = start; p < end; p++) if (colIdx[p] !== i) k++;
    if (k === 0 || !Number.isFinite(observed[i])) continue;
    const weights = new Float64Array(k);
    for (let p = start, m = 0; p < end; p++) if (colIdx[p] !== i) weights[m++] = values[p];
    const a = scale[i];
    const c = offset[i];
    const obs = observed[i];
    const upper = obs >= expected[i];
    // ties with the observed value count as at least as extreme
    const tolerance = 1e-12 * Math.max(1, Math.abs(obs));
    let extreme = 0;
    for (let r = 0, base = 0; r < permutations; r++, base += kMax) {
      let s = 0;
      for (let m = 0; m < k; m++) {
        const j = draws[base + m];
        s += weights[m] * v[j >= i ? j + 1 : j];
      }
      const stat = a * s + c;
      if (upper ? stat >= obs - tolerance : stat <= obs + tolerance) extreme++;
    }
    out[i] = (extreme + 1) / (permutations + 1);
  }
  onProgress?.(n, n);
  return out;
}

function hasSelf(w: CsrMatrix, i: number): boolean {
  for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) if (w.colIdx[p] === i) return true;
  return false;
}

/** R rows of k distinct integers from 0..m − 1, each row uniform (partial Fisher–Yates on one pool). */
function drawWithoutReplacement(m: number, k: number, rows: number, seed: number): Int32Array {
  const random = seededRandom(seed);
  const pool = new Int32Array(m);
  for (let j = 0; j < m; j++) pool[j] = j;
  const out = new Int32Array(rows * k);
  for (let r = 0; r < rows; r++) {
    // each step picks uniformly among the not yet chosen entries, whatever order the pool is in
    for (let t = 0; t < k; t++) {
      const j = t + Math.floor(random() * (m - t));
      const x = pool[j];
      pool[j] = pool[t];
      pool[t] = x;
      out[r * k + t] = x;
    }
  }
  return out;
}
