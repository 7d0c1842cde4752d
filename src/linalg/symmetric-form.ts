/**
 * The one symmetric form of W: S symmetric with W = T S T⁻¹, T diagonal, so W and S share their
 * eigenvalues (Ord 1975, "Estimation methods for models of spatial interaction", JASA 70). For a
 * row-standardised W = D⁻¹C of a symmetric C, S = D^-1/2 C D^-1/2 and T = D^-1/2. With T, solves
 * with I − ρW go through the Cholesky factor of I − ρS: (I − ρW)⁻¹ = T (I − ρS)⁻¹ T⁻¹. The dense
 * eigenvalues, the sparse Cholesky and the Lanczos range all take S from here.
 */
import { isSymmetric, rowSums, type CsrMatrix } from './csr.js';

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

/**
 * The symmetric matrix S similar to W and the diagonal t with W = T S T⁻¹. `given` may be S itself,
 * or the symmetric base C of a row-standardised W = D⁻¹C (then S = D^-1/2 C D^-1/2). Null when
 * neither fits; W itself serves when it is symmetric.
 */
export function symmetricForm(w: CsrMatrix, given: CsrMatrix | null): { s: CsrMatrix; t: Float64Array } | null {
  const n = w.n;
  if (given === null) return isSymmetric(w) ? { s: w, t: new Float64Array(n).fill(1) } : null;
  if (given.n !== n) throw new Error(`the symmetric form has order ${given.n}, W has ${n}`);
  if (!isSymmetric(given)) return null;
  const direct = diagonalSimilarity(w, given);
  if (direct) return { s: given, t: direct };
  const s = scaledByRowSums(given);
  if (!s) return null;
  const t = diagonalSimilarity(w, s);
  return t ? { s, t } : null;
}

/**
 * S = D^-1/2 C D^-1/2 for a symmetric C with row sums D (the symmetric form of its row-standardised
 * W = D⁻¹C); null when a row that has entries sums to zero or less. Rows of areas without neighbours
 * stay empty.
 */
export function scaledByRowSums(c: CsrMatrix): CsrMatrix | null {
  const { n, rowPtr, colIdx } = c;
  const sums = rowSums(c);
  const scale = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    if (rowPtr[i + 1] > rowPtr[i] && !(sums[i] > 0)) return null;
    scale[i] = sums[i] > 0 ? 1 / Math.sqrt(sums[i]) : 0;
  }
  const values = new Float64Array(colIdx.length);
  for (let i = 0; i < n; i++) {
    for (let p = rowPtr[i], pEnd = rowPtr[i + 1]; p < pEnd; p++) values[p] = scale[i] * c.values[p] * scale[colIdx[p]];
  }
  return { n, rowPtr, colIdx, values };
}
