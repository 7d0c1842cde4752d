/**
 * Recover the diagonal similarity W = T S T⁻¹ between W and its symmetric form S (for a
 * row-standardised W = D⁻¹B, S = D^-1/2 B D^-1/2 and T = D^-1/2). With T, solves with I − ρW go
 * through the Cholesky factor of I − ρS: (I − ρW)⁻¹ = T (I − ρS)⁻¹ T⁻¹.
 */
import type { CsrMatrix } from '../csr.js';

/** t with W_ij = t_i S_ij / t_j on every entry, or null when W and S are not so related. */
export function diagonalSimilarity(w: CsrMatrix, s: CsrMatrix): Float64Array | null {
  const n = w.n;
  if (s.n !== n || w.rowPtr[n] !== s.rowPtr[n]) return null;
  for (let i = 0; i <= n; i++) if (w.rowPtr[i] !== s.rowPtr[i]) return null;
  for (let p = 0; p < w.rowPtr[n]; p++) if (w.colIdx[p] !== s.colIdx[p]) return null;
  const t = new Float64Array(n).fill(NaN);
  const queue = new Int32Array(n);
  for (let root = 0; root < n; root++) {
    if (!Number.isNaN(t[root])) continue;
    t[root] = 1;
    let head = 0, tail = 0;
    queue[tail++] = root;
    while (head < tail) {
      const i = queue[head++];
      for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
        const j = w.colIdx[p];
        if (Number.isNaN(t[j]) && w.values[p] !== 0 && s.values[p] !== 0) {
          t[j] = (t[i] * s.values[p]) / w.values[p];
          if (!(t[j] > 0 || t[j] < 0) || !Number.isFinite(t[j])) return null;
          queue[tail++] = j;
        }
      }
    }
  }
  for (let i = 0; i < n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      const j = w.colIdx[p];
      const expected = (t[i] * s.values[p]) / t[j];
      if (Math.abs(expected - w.values[p]) > 1e-10 * Math.max(Math.abs(w.values[p]), 1e-300)) return null;
    }
  }
  return t;
}

/** True when a equals its transpose (same pattern, values within 1e-12 relative). */
export function isSymmetricMatrix(a: CsrMatrix): boolean {
  for (let i = 0; i < a.n; i++) {
    for (let p = a.rowPtr[i], pEnd = a.rowPtr[i + 1]; p < pEnd; p++) {
      const j = a.colIdx[p];
      let lo = a.rowPtr[j], hi = a.rowPtr[j + 1] - 1, found = NaN;
      while (lo <= hi) {
        const mid = (lo + hi) >> 1;
        if (a.colIdx[mid] === i) { found = a.values[mid]; break; }
        if (a.colIdx[mid] < i) lo = mid + 1;
        else hi = mid - 1;
      }
      if (!(Math.abs(found - a.values[p]) <= 1e-12 * Math.abs(a.values[p]))) return false;
    }
  }
  return true;
}

/**
 * The symmetric matrix S similar to W and the diagonal t with W = T S T⁻¹. `given` may be S itself,
 * or the symmetric base C of a row-standardised W = D⁻¹C (then S = D^-1/2 C D^-1/2). Null when
 * neither fits; W itself serves when it is symmetric.
 */
export function symmetricForm(w: CsrMatrix, given: CsrMatrix | null): { s: CsrMatrix; t: Float64Array } | null {
  const n = w.n;
  if (given === null) return isSymmetricMatrix(w) ? { s: w, t: new Float64Array(n).fill(1) } : null;
  if (given.n !== n) throw new Error(`the symmetric form has order ${given.n}, W has ${n}`);
  if (!isSymmetricMatrix(given)) return null;
  const direct = diagonalSimilarity(w, given);
  if (direct) return { s: given, t: direct };
  const rowSum = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let p = given.rowPtr[i], pEnd = given.rowPtr[i + 1]; p < pEnd; p++) rowSum[i] += given.values[p];
  const values = new Float64Array(given.values.length);
  for (let i = 0; i < n; i++) {
    for (let p = given.rowPtr[i], pEnd = given.rowPtr[i + 1]; p < pEnd; p++) {
      const j = given.colIdx[p];
      const d = rowSum[i] * rowSum[j];
      if (!(d > 0)) return null;
      values[p] = given.values[p] / Math.sqrt(d);
    }
  }
  const s: CsrMatrix = { n, rowPtr: given.rowPtr, colIdx: given.colIdx, values };
  const t = diagonalSimilarity(w, s);
  return t ? { s, t } : null;
}
