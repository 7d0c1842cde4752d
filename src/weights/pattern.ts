import type { CsrMatrix } from '../linalg/csr.js';

/**
 * Growable list of directed links (i, j, value) on typed arrays. Links are gathered here from
 * every builder, then turned into a CSR matrix with rows sorted by column and duplicates merged.
 */
export class LinkList {
  rows = new Int32Array(1024);
  cols = new Int32Array(1024);
  vals = new Float64Array(1024);
  length = 0;

  push(i: number, j: number, value = 1): void {
    if (this.length === this.rows.length) this.grow();
    this.rows[this.length] = i;
    this.cols[this.length] = j;
    this.vals[this.length] = value;
    this.length++;
  }

  /** Adds (i, j) and (j, i) with the same value. */
  pushBoth(i: number, j: number, value = 1): void {
    this.push(i, j, value);
    this.push(j, i, value);
  }

  private grow(): void {
    const size = this.rows.length * 2;
    const rows = new Int32Array(size);
    rows.set(this.rows);
    const cols = new Int32Array(size);
    cols.set(this.cols);
    const vals = new Float64Array(size);
    vals.set(this.vals);
    this.rows = rows;
    this.cols = cols;
    this.vals = vals;
  }
}

/**
 * CSR matrix from a link list by counting sort on rows, then sorting each row by column.
 * Self-links are dropped; a repeated (i, j) keeps its first value (builders only repeat a link
 * when they find it twice, with the same value).
 */
export function csrFromLinks(n: number, links: LinkList): CsrMatrix {
  const { rows, cols, vals, length } = links;
  const count = new Int32Array(n + 1);
  for (let p = 0; p < length; p++) if (rows[p] !== cols[p]) count[rows[p] + 1]++;
  for (let i = 0; i < n; i++) count[i + 1] += count[i];
  const fill = count.slice(0, n);
  const tmpCol = new Int32Array(count[n]);
  const tmpVal = new Float64Array(count[n]);
  for (let p = 0; p < length; p++) {
    const i = rows[p];
    if (i === cols[p]) continue;
    const q = fill[i]++;
    tmpCol[q] = cols[p];
    tmpVal[q] = vals[p];
  }
  // sort each row by column and drop repeats
  const rowPtr = new Int32Array(n + 1);
  const colIdx = new Int32Array(count[n]);
  const values = new Float64Array(count[n]);
  let order = new Int32Array(16);
  let nnz = 0;
  for (let i = 0; i < n; i++) {
    const start = count[i];
    const len = count[i + 1] - start;
    if (order.length < len) order = new Int32Array(len * 2);
    const idx = order.subarray(0, len);
    for (let k = 0; k < len; k++) idx[k] = k;
    idx.sort((a, b) => tmpCol[start + a] - tmpCol[start + b] || a - b);
    let last = -1;
    for (let k = 0; k < len; k++) {
      const c = tmpCol[start + idx[k]];
      if (c === last) continue;
      last = c;
      colIdx[nnz] = c;
      values[nnz] = tmpVal[start + idx[k]];
      nnz++;
    }
    rowPtr[i + 1] = nnz;
  }
  return { n, rowPtr, colIdx: colIdx.slice(0, nnz), values: values.slice(0, nnz) };
}

/** Same pattern with every value set to `value`. */
export function withConstantValues(m: CsrMatrix, value = 1): CsrMatrix {
  return { n: m.n, rowPtr: m.rowPtr, colIdx: m.colIdx, values: new Float64Array(m.colIdx.length).fill(value) };
}

/** Number of neighbours of each area. */
export function rowCounts(m: CsrMatrix): Int32Array {
  const out = new Int32Array(m.n);
  for (let i = 0; i < m.n; i++) out[i] = m.rowPtr[i + 1] - m.rowPtr[i];
  return out;
}

/** Position of entry (i, j) in colIdx, or -1; binary search since rows are sorted by column. */
export function findEntry(m: CsrMatrix, i: number, j: number): number {
  let lo = m.rowPtr[i];
  let hi = m.rowPtr[i + 1] - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const c = m.colIdx[mid];
    if (c === j) return mid;
    if (c < j) lo = mid + 1;
    else hi = mid - 1;
  }
  return -1;
}

/**
 * True when the matrix equals its transpose: same pattern, and values agreeing to a relative
 * 1e-12 (values computed from the same distance in either direction may differ in the last bit).
 */
export function isSymmetric(m: CsrMatrix): boolean {
  for (let i = 0; i < m.n; i++) {
    for (let p = m.rowPtr[i]; p < m.rowPtr[i + 1]; p++) {
      const j = m.colIdx[p];
      if (j < i) continue;
      const q = findEntry(m, j, i);
      if (q < 0) return false;
      const a = m.values[p];
      const b = m.values[q];
      if (Math.abs(a - b) > 1e-12 * Math.max(Math.abs(a), Math.abs(b))) return false;
    }
  }
  return true;
}

/** Pattern of W + Wᵀ (values 1), used for components and island checks on asymmetric weights. */
export function symmetrisedPattern(m: CsrMatrix): CsrMatrix {
  const links = new LinkList();
  for (let i = 0; i < m.n; i++) {
    for (let p = m.rowPtr[i]; p < m.rowPtr[i + 1]; p++) links.pushBoth(i, m.colIdx[p]);
  }
  return csrFromLinks(m.n, links);
}
