/**
 * Solves with the kept multifrontal LU factor of I − ρW (lu-logdet.ts): x = U⁻¹L⁻¹(P b) then
 * unpermuted. Per supernode s (k columns, m rows) the panel holds its k rows of U, with L's
 * multipliers left of the diagonal, then L's m − k rows below (k entries each).
 * Every entry of y is computed as a running sum in one order (y − Σ_p l_p y_p, p ascending;
 * backward, t ascending, then the division by the pivot), whatever the number of right-hand sides:
 * a column of a block solve equals the single solve of it bit for bit. The running sums stay in
 * registers (four columns at a time in a block), so y is loaded and stored once per row rather
 * than once per factor entry — which is where a triangular solve spends its time.
 */
import type { SymbolicFactor } from './symbolic.js';

/** x = (LU)⁻¹ b for one right-hand side; `y` is scratch of length n. */
export function luSolveOne(sym: SymbolicFactor, panelStart: Float64Array, panels: Float64Array, b: Float64Array, x: Float64Array, y: Float64Array): Float64Array {
  const { n, perm, superCount, superFirst, rowPtr, rows } = sym;
  for (let j = 0; j < n; j++) y[j] = b[perm[j]];
  for (let s = 0; s < superCount; s++) {
    const f = superFirst[s], k = superFirst[s + 1] - f;
    const r0 = rowPtr[s], m = rowPtr[s + 1] - r0;
    const at = panelStart[s] | 0; // an int32 index (the kept factor stays below 2³¹ doubles): V8 indexes faster than by a double
    for (let c = 1; c < k; c++) {
      const row = at + c * m;
      let acc = y[f + c];
      for (let p = 0; p < c; p++) acc -= panels[row + p] * y[f + p];
      y[f + c] = acc;
    }
    for (let t = k, row = at + k * m; t < m; t++, row += k) {
      const dst = rows[r0 + t];
      let acc = y[dst];
      for (let p = 0; p < k; p++) acc -= panels[row + p] * y[f + p];
      y[dst] = acc;
    }
  }
  for (let s = superCount - 1; s >= 0; s--) {
    const f = superFirst[s], k = superFirst[s + 1] - f;
    const r0 = rowPtr[s], m = rowPtr[s + 1] - r0;
    const at = panelStart[s] | 0; // an int32 index (the kept factor stays below 2³¹ doubles): V8 indexes faster than by a double
    for (let c = k - 1; c >= 0; c--) {
      const row = at + c * m;
      let acc = y[f + c];
      for (let t = c + 1; t < m; t++) acc -= panels[row + t] * y[rows[r0 + t]];
      y[f + c] = acc / panels[row + c];
    }
  }
  for (let j = 0; j < n; j++) x[perm[j]] = y[j];
  return x;
}

/**
 * X = (LU)⁻¹ B for r right-hand sides stored interleaved (B[i·r + c] is row i of column c); each
 * factor entry is read once for every four columns. `y` is scratch of length n·r.
 */
export function luSolveBlock(sym: SymbolicFactor, panelStart: Float64Array, panels: Float64Array, b: Float64Array, r: number, x: Float64Array, y: Float64Array): Float64Array {
  if (r === 1) return luSolveOne(sym, panelStart, panels, b, x, y);
  const { n, perm, superCount, superFirst, rowPtr, rows } = sym;
  const r4 = r - (r % 4);
  for (let j = 0; j < n; j++) for (let q = 0, from = perm[j] * r, to = j * r; q < r; q++) y[to + q] = b[from + q];
  for (let s = 0; s < superCount; s++) {
    const f = superFirst[s], k = superFirst[s + 1] - f;
    const r0 = rowPtr[s], m = rowPtr[s + 1] - r0;
    const at = panelStart[s] | 0; // an int32 index (the kept factor stays below 2³¹ doubles): V8 indexes faster than by a double
    const yf = f * r;
    // row t of the supernode: its own columns (t < k, the multipliers left of the diagonal), then below
    for (let t = 1; t < m; t++) {
      const count = t < k ? t : k;
      const row = t < k ? at + t * m : at + k * m + (t - k) * k;
      const dst = (t < k ? f + t : rows[r0 + t]) * r;
      let q = 0;
      for (; q < r4; q += 4) {
        let a0 = y[dst + q], a1 = y[dst + q + 1], a2 = y[dst + q + 2], a3 = y[dst + q + 3];
        for (let p = 0, src = yf + q; p < count; p++, src += r) {
          const l = panels[row + p];
          a0 -= l * y[src]; a1 -= l * y[src + 1]; a2 -= l * y[src + 2]; a3 -= l * y[src + 3];
        }
        y[dst + q] = a0; y[dst + q + 1] = a1; y[dst + q + 2] = a2; y[dst + q + 3] = a3;
      }
      for (; q < r; q++) {
        let a = y[dst + q];
        for (let p = 0, src = yf + q; p < count; p++, src += r) a -= panels[row + p] * y[src];
        y[dst + q] = a;
      }
    }
  }
  for (let s = superCount - 1; s >= 0; s--) {
    const f = superFirst[s], k = superFirst[s + 1] - f;
    const r0 = rowPtr[s], m = rowPtr[s + 1] - r0;
    const at = panelStart[s] | 0; // an int32 index (the kept factor stays below 2³¹ doubles): V8 indexes faster than by a double
    for (let c = k - 1; c >= 0; c--) {
      const row = at + c * m, dst = (f + c) * r;
      const pivot = panels[row + c];
      let q = 0;
      for (; q < r4; q += 4) {
        let a0 = y[dst + q], a1 = y[dst + q + 1], a2 = y[dst + q + 2], a3 = y[dst + q + 3];
        for (let t = c + 1; t < m; t++) {
          const u = panels[row + t], src = rows[r0 + t] * r + q;
          a0 -= u * y[src]; a1 -= u * y[src + 1]; a2 -= u * y[src + 2]; a3 -= u * y[src + 3];
        }
        y[dst + q] = a0 / pivot; y[dst + q + 1] = a1 / pivot; y[dst + q + 2] = a2 / pivot; y[dst + q + 3] = a3 / pivot;
      }
      for (; q < r; q++) {
        let a = y[dst + q];
        for (let t = c + 1; t < m; t++) a -= panels[row + t] * y[rows[r0 + t] * r + q];
        y[dst + q] = a / pivot;
      }
    }
  }
  for (let j = 0; j < n; j++) for (let q = 0, from = j * r, to = perm[j] * r; q < r; q++) x[to + q] = y[from + q];
  return x;
}
