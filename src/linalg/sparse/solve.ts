/**
 * Solves with a stored supernodal Cholesky factor: M x = b with M = P L Lᵀ Pᵀ. The panels of each
 * supernode are m×k row-major (rows in the supernode's row structure).
 */
import type { SymbolicFactor } from './symbolic.js';
import type { NumericFactor } from './frontal.js';

/** x = M⁻¹ b in the original ordering; `work` is scratch of length n. */
export function choleskySolve(sym: SymbolicFactor, f: NumericFactor, b: Float64Array, x: Float64Array, work = new Float64Array(sym.n)): Float64Array {
  const { n, perm, superCount, superFirst, rowPtr, rows } = sym;
  const { panels, panelPtr } = f;
  const y = work;
  for (let k = 0; k < n; k++) y[k] = b[perm[k]];
  // forward: L z = y
  for (let s = 0; s < superCount; s++) {
    const first = superFirst[s], k = superFirst[s + 1] - first;
    const r0 = rowPtr[s], m = rowPtr[s + 1] - r0;
    const at = panelPtr[s];
    for (let c = 0; c < k; c++) {
      const row = at + c * k;
      let sum = y[first + c];
      for (let p = 0; p < c; p++) sum -= panels[row + p] * y[first + p];
      y[first + c] = sum / panels[row + c];
    }
    for (let t = k; t < m; t++) {
      const row = at + t * k;
      let sum = 0;
      for (let p = 0; p < k; p++) sum += panels[row + p] * y[first + p];
      y[rows[r0 + t]] -= sum;
    }
  }
  // backward: Lᵀ x = z
  for (let s = superCount - 1; s >= 0; s--) {
    const first = superFirst[s], k = superFirst[s + 1] - first;
    const r0 = rowPtr[s], m = rowPtr[s + 1] - r0;
    const at = panelPtr[s];
    for (let t = k; t < m; t++) {
      const row = at + t * k;
      const v = y[rows[r0 + t]];
      if (v !== 0) for (let p = 0; p < k; p++) y[first + p] -= panels[row + p] * v;
    }
    for (let c = k - 1; c >= 0; c--) {
      const row = at + c * k;
      const v = (y[first + c] /= panels[row + c]);
      for (let p = 0; p < c; p++) y[first + p] -= panels[row + p] * v;
    }
  }
  for (let k = 0; k < n; k++) x[perm[k]] = y[k];
  return x;
}
