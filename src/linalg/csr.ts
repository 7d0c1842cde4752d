/** Square sparse matrix in compressed sparse row form on typed arrays. */
export interface CsrMatrix {
  readonly n: number;
  /** length n + 1 */
  readonly rowPtr: Int32Array;
  /** column indices, sorted ascending within each row */
  readonly colIdx: Int32Array;
  readonly values: Float64Array;
}

/** out = A v */
export function csrMultiply(a: CsrMatrix, v: Float64Array, out: Float64Array = new Float64Array(a.n)): Float64Array {
  const { n, rowPtr, colIdx, values } = a;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let p = rowPtr[i], pEnd = rowPtr[i + 1]; p < pEnd; p++) s += values[p] * v[colIdx[p]];
    out[i] = s;
  }
  return out;
}

/** out = Aᵀ v */
export function csrMultiplyTransposed(a: CsrMatrix, v: Float64Array, out: Float64Array = new Float64Array(a.n)): Float64Array {
  const { n, rowPtr, colIdx, values } = a;
  out.fill(0);
  for (let i = 0; i < n; i++) {
    const vi = v[i];
    for (let p = rowPtr[i], pEnd = rowPtr[i + 1]; p < pEnd; p++) out[colIdx[p]] += values[p] * vi;
  }
  return out;
}

/** A[i, j] by binary search in row i (columns are sorted); 0 when absent. */
export function csrEntry(a: CsrMatrix, i: number, j: number): number {
  let lo = a.rowPtr[i];
  let hi = a.rowPtr[i + 1] - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const c = a.colIdx[mid];
    if (c === j) return a.values[mid];
    if (c < j) lo = mid + 1;
    else hi = mid - 1;
  }
  return 0;
}

/** The one tolerance for "rows sum to one": |Σ_j w_ij − 1| ≤ 1e-10 (row standardisation rounds far below it). */
export const ROW_SUM_TOLERANCE = 1e-10;

/** Σ_j a_ij for every row i. */
export function rowSums(a: CsrMatrix): Float64Array {
  const out = new Float64Array(a.n);
  for (let i = 0; i < a.n; i++) {
    let s = 0;
    for (let p = a.rowPtr[i], pEnd = a.rowPtr[i + 1]; p < pEnd; p++) s += a.values[p];
    out[i] = s;
  }
  return out;
}

/** True when every entry is ≥ 0. */
export function isNonNegative(a: CsrMatrix): boolean {
  for (let p = 0; p < a.rowPtr[a.n]; p++) if (!(a.values[p] >= 0)) return false;
  return true;
}

/**
 * Entries nonnegative and every row summing to one within ROW_SUM_TOLERANCE (then λmax = 1). Rows
 * without entries (areas without neighbours) pass unless `allowEmptyRows` is false.
 */
export function isRowStochastic(a: CsrMatrix, opts: { allowEmptyRows?: boolean } = {}): boolean {
  const allowEmpty = opts.allowEmptyRows ?? true;
  for (let i = 0; i < a.n; i++) {
    let s = 0;
    for (let p = a.rowPtr[i], pEnd = a.rowPtr[i + 1]; p < pEnd; p++) {
      if (!(a.values[p] >= 0)) return false;
      s += a.values[p];
    }
    if (a.rowPtr[i + 1] === a.rowPtr[i] && allowEmpty) continue;
    if (Math.abs(s - 1) > ROW_SUM_TOLERANCE) return false;
  }
  return true;
}

/** max_i Σ_j |a_ij| (the ∞-norm, a bound on the spectral radius). */
export function maxAbsRowSum(a: CsrMatrix): number {
  let best = 0;
  for (let i = 0; i < a.n; i++) {
    let s = 0;
    for (let p = a.rowPtr[i], pEnd = a.rowPtr[i + 1]; p < pEnd; p++) s += Math.abs(a.values[p]);
    if (s > best) best = s;
  }
  return best;
}

/** Aᵀ in CSR (rows visited in order, so each row of Aᵀ comes out sorted by column). */
export function transpose(a: CsrMatrix): CsrMatrix {
  const n = a.n, nnz = a.rowPtr[n];
  const rowPtr = new Int32Array(n + 1);
  for (let p = 0; p < nnz; p++) rowPtr[a.colIdx[p] + 1]++;
  for (let i = 0; i < n; i++) rowPtr[i + 1] += rowPtr[i];
  const colIdx = new Int32Array(nnz), values = new Float64Array(nnz);
  const next = rowPtr.slice(0, n);
  for (let i = 0; i < n; i++) {
    for (let p = a.rowPtr[i], pEnd = a.rowPtr[i + 1]; p < pEnd; p++) {
      const q = next[a.colIdx[p]]++;
      colIdx[q] = i;
      values[q] = a.values[p];
    }
  }
  return { n, rowPtr, colIdx, values };
}

/**
 * True when A equals its transpose: same pattern, values agreeing to 1e-12 relative (values
 * computed from the same distance in either direction may differ in the last bit).
 */
export function isSymmetric(a: CsrMatrix): boolean {
  for (let i = 0; i < a.n; i++) {
    for (let p = a.rowPtr[i], pEnd = a.rowPtr[i + 1]; p < pEnd; p++) {
      const j = a.colIdx[p];
      let lo = a.rowPtr[j], hi = a.rowPtr[j + 1] - 1, q = -1;
      while (lo <= hi) {
        const mid = (lo + hi) >> 1;
        if (a.colIdx[mid] === i) { q = mid; break; }
        if (a.colIdx[mid] < i) lo = mid + 1;
        else hi = mid - 1;
      }
      if (q < 0) return false;
      const x = a.values[p], y = a.values[q];
      if (Math.abs(x - y) > 1e-12 * Math.max(Math.abs(x), Math.abs(y))) return false;
    }
  }
  return true;
}

/** tr A = Σ a_ii. */
export function traceOf(a: CsrMatrix): number {
  let t = 0;
  for (let i = 0; i < a.n; i++) for (let p = a.rowPtr[i], pEnd = a.rowPtr[i + 1]; p < pEnd; p++) if (a.colIdx[p] === i) t += a.values[p];
  return t;
}

/** tr A² = Σ_ij a_ij a_ji. */
export function traceOfSquare(a: CsrMatrix): number {
  let t = 0;
  for (let i = 0; i < a.n; i++) {
    for (let p = a.rowPtr[i], pEnd = a.rowPtr[i + 1]; p < pEnd; p++) t += a.values[p] * csrEntry(a, a.colIdx[p], i);
  }
  return t;
}

/** tr(WᵀW + WW), the constant T of the Lagrange-multiplier tests. */
export function lmTrace(w: CsrMatrix): number {
  let sum = 0;
  for (let i = 0; i < w.n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      const v = w.values[p];
      sum += v * v + v * csrEntry(w, w.colIdx[p], i);
    }
  }
  return sum;
}
