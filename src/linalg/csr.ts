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
