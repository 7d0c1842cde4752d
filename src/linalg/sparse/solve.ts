/**
 * Solves with a stored supernodal Cholesky factor: M x = b with M = P L Lᵀ Pᵀ. The panels of each
 * supernode are m×k row-major (rows in the supernode's row structure).
 */
import type { SymbolicFactor } from './symbolic.js';
import type { NumericFactor } from './frontal.js';

/**
 * X = M⁻¹ B for r right-hand sides at once, stored interleaved (B[i·r + c] is row i of column c),
 * in the original ordering. Each panel entry is loaded once for every four columns, and the
 * updates below a supernode's diagonal block accumulate in registers, which is where a triangular
 * solve spends its time. `work` is scratch of length n·r.
 */
export function choleskySolveBlock(sym: SymbolicFactor, f: NumericFactor, b: Float64Array, r: number, x: Float64Array, work: Float64Array = new Float64Array(sym.n * r)): Float64Array {
  const { n, perm, superCount, superFirst, rowPtr, rows } = sym;
  const { panels, panelPtr } = f;
  const y = work;
  for (let k = 0; k < n; k++) {
    const from = perm[k] * r, to = k * r;
    for (let c = 0; c < r; c++) y[to + c] = b[from + c];
  }
  const r4 = r - (r % 4);
  // forward: L z = y
  for (let s = 0; s < superCount; s++) {
    const first = superFirst[s], k = superFirst[s + 1] - first;
    const r0 = rowPtr[s], m = rowPtr[s + 1] - r0;
    const at = panelPtr[s];
    const yf = first * r;
    for (let c = 0; c < k; c++) {
      const row = at + c * k, yc = (first + c) * r;
      for (let p = 0; p < c; p++) {
        const l = panels[row + p], yp = (first + p) * r;
        for (let q = 0; q < r; q++) y[yc + q] -= l * y[yp + q];
      }
      const d = 1 / panels[row + c];
      for (let q = 0; q < r; q++) y[yc + q] *= d;
    }
    for (let t = k; t < m; t++) {
      const row = at + t * k, yt = rows[r0 + t] * r;
      let q = 0;
      for (; q < r4; q += 4) {
        let a0 = 0, a1 = 0, a2 = 0, a3 = 0;
        for (let p = 0, yp = yf + q; p < k; p++, yp += r) {
          const l = panels[row + p];
          a0 += l * y[yp]; a1 += l * y[yp + 1]; a2 += l * y[yp + 2]; a3 += l * y[yp + 3];
        }
        y[yt + q] -= a0; y[yt + q + 1] -= a1; y[yt + q + 2] -= a2; y[yt + q + 3] -= a3;
      }
      for (; q < r; q++) {
        let a = 0;
        for (let p = 0, yp = yf + q; p < k; p++, yp += r) a += panels[row + p] * y[yp];
        y[yt + q] -= a;
      }
    }
  }
  // backward: Lᵀ x = z
  for (let s = superCount - 1; s >= 0; s--) {
    const first = superFirst[s], k = superFirst[s + 1] - first;
    const r0 = rowPtr[s], m = rowPtr[s + 1] - r0;
    const at = panelPtr[s];
    const yf = first * r;
    for (let t = k; t < m; t++) {
      const row = at + t * k, yt = rows[r0 + t] * r;
      let q = 0;
      for (; q < r4; q += 4) {
        const v0 = y[yt + q], v1 = y[yt + q + 1], v2 = y[yt + q + 2], v3 = y[yt + q + 3];
        if (v0 === 0 && v1 === 0 && v2 === 0 && v3 === 0) continue;
        for (let p = 0, yp = yf + q; p < k; p++, yp += r) {
          const l = panels[row + p];
          y[yp] -= l * v0; y[yp + 1] -= l * v1; y[yp + 2] -= l * v2; y[yp + 3] -= l * v3;
        }
      }
      for (; q < r; q++) {
        const v = y[yt + q];
        if (v === 0) continue;
        for (let p = 0, yp = yf + q; p < k; p++, yp += r) y[yp] -= panels[row + p] * v;
      }
    }
    for (let c = k - 1; c >= 0; c--) {
      const row = at + c * k, yc = (first + c) * r;
      const d = 1 / panels[row + c];
      for (let q = 0; q < r; q++) y[yc + q] *= d;
      for (let p = 0; p < c; p++) {
        const l = panels[row + p], yp = (first + p) * r;
        for (let q = 0; q < r; q++) y[yp + q] -= l * y[yc + q];
      }
    }
  }
  for (let k = 0; k < n; k++) {
    const from = k * r, to = perm[k] * r;
    for (let c = 0; c < r; c++) x[to + c] = y[from + c];
  }
  return x;
}
