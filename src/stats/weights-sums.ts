import type { CsrMatrix } from '../linalg/index.js';
import { lmTrace } from '../linalg/index.js';

/**
 * The constants of the randomisation moments (Cliff & Ord 1981, §1.5):
 * S₀ = Σᵢⱼ w_ij, S₁ = ½ Σᵢⱼ (w_ij + w_ji)² = Σ w_ij² + Σ w_ij w_ji, S₂ = Σᵢ (w_i· + w_·i)².
 */
export function weightsSums(w: CsrMatrix): { s0: number; s1: number; s2: number } {
  const n = w.n;
  const rowSum = new Float64Array(n);
  const colSum = new Float64Array(n);
  let s0 = 0;
  for (let i = 0; i < n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      rowSum[i] += w.values[p];
      colSum[w.colIdx[p]] += w.values[p];
      s0 += w.values[p];
    }
  }
  let s2 = 0;
  for (let i = 0; i < n; i++) s2 += (rowSum[i] + colSum[i]) ** 2;
  return { s0, s1: lmTrace(w), s2 };
}

/** Deviations from the mean and their sum of squares; throws a plain message when constant. */
export function centred(v: Float64Array): { z: Float64Array; m2: number; m4: number } {
  const n = v.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += v[i];
  mean /= n;
  const z = v.map((x) => x - mean);
  let m2 = 0;
  let m4 = 0;
  for (let i = 0; i < n; i++) {
    m2 += z[i] * z[i];
    m4 += z[i] ** 4;
  }
  return { z, m2, m4 };
}
