import { csrEntry, type CsrMatrix } from '../linalg/index.js';

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
 * CSR matrix from a link list: two stable counting sorts (by column, then by row) give rows
 * sorted by column in O(links + n). Self-links are dropped; a repeated (i, j) keeps its first
 * value (builders only repeat a link when they find it twice, with the same value).
 */
export function csrFromLinks(n: number, links: LinkList): CsrMatrix {
  const { rows, cols, vals, length } = links;
  const byCol = new Int32Array(n + 1);
  for (let p = 0; p < length; p++) byCol[cols[p] + 1]++;
  for (let j = 0; j < n; j++) byCol[j + 1] += byCol[j];
  const order1 = new Int32Array(length);
  for (let p = 0; p < length; p++) order1[byCol[cols[p]]++] = p;
  const rowPtr = new Int32Array(n + 1);
  for (let p = 0; p < length; p++) if (rows[p] !== cols[p]) rowPtr[rows[p] + 1]++;
  for (let i = 0; i < n; i++) rowPtr[i + 1] += rowPtr[i];
  const fill = rowPtr.slice(0, n);
  const colIdx = new Int32Array(rowPtr[n]);
  const values = new Float64Array(rowPtr[n]);
  for (let k = 0; k < length; k++) {
    const p = order1[k];
    const i = rows[p];
    if (i === cols[p]) continue;
    const q = fill[i]++;
    colIdx[q] = cols[p];
    values[q] = vals[p];
  }
  // squeeze out repeats (adjacent now that rows are sorted)
  let nnz = 0;
  let start = 0;
  for (let i = 0; i < n; i++) {
    const end = rowPtr[i + 1];
    for (let q = start; q < end; q++) {
      if (q > start && colIdx[q] === colIdx[q - 1]) continue;
      colIdx[nnz] = colIdx[q];
      values[nnz] = values[q];
      nnz++;
    }
    start = end;
    rowPtr[i + 1] = nnz;
  }
  return { n, rowPtr, colIdx: colIdx.slice(0, nnz), values: values.slice(0, nnz) };
}

/**
 * Symmetric binary CSR from sorted, repeat-free pair keys i·n + j (i < j). Walking the keys in
 * order appends to every row in ascending column order, so no sort is needed.
 */
export function csrFromSortedPairs(n: number, keys: Float64Array): CsrMatrix {
  const rowPtr = new Int32Array(n + 1);
  for (let k = 0; k < keys.length; k++) {
    const i = Math.floor(keys[k] / n);
    rowPtr[i + 1]++;
    rowPtr[keys[k] - i * n + 1]++;
  }
  for (let i = 0; i < n; i++) rowPtr[i + 1] += rowPtr[i];
  const fill = rowPtr.slice(0, n);
  const colIdx = new Int32Array(rowPtr[n]);
  for (let k = 0; k < keys.length; k++) {
    const i = Math.floor(keys[k] / n);
    const j = keys[k] - i * n;
    colIdx[fill[i]++] = j;
    colIdx[fill[j]++] = i;
  }
  return { n, rowPtr, colIdx, values: new Float64Array(rowPtr[n]).fill(1) };
}

/** One symmetry check for the engine, with one tolerance (src/linalg/csr.ts). */
export { isSymmetric } from '../linalg/index.js';

/**
 * A symmetric C with m = D⁻¹C for a diagonal D, when there is one: the weights of a list written
 * already row-standardised (w_ij = c_ij / r_i from symmetric links c) give C back, so that the
 * exact algebra for symmetric forms still applies. Along each link, r_j = r_i w_ij / w_ji (one free
 * scale per connected group, set to 1 at its first area); every link is then checked to 1e-10.
 * Null when the pattern is not symmetric or no such scaling fits.
 */
export function symmetricBehind(m: CsrMatrix): CsrMatrix | null {
  const n = m.n;
  const r = new Float64Array(n).fill(NaN);
  const queue = new Int32Array(n);
  for (let root = 0; root < n; root++) {
    if (!Number.isNaN(r[root])) continue;
    r[root] = 1;
    let head = 0, tail = 0;
    queue[tail++] = root;
    while (head < tail) {
      const i = queue[head++];
      for (let p = m.rowPtr[i], pEnd = m.rowPtr[i + 1]; p < pEnd; p++) {
        const j = m.colIdx[p];
        const back = csrEntry(m, j, i); // 0 when j does not link back to i
        if (!(back > 0) || !(m.values[p] > 0)) return null;
        if (Number.isNaN(r[j])) {
          r[j] = (r[i] * m.values[p]) / back;
          queue[tail++] = j;
        }
      }
    }
  }
  const values = new Float64Array(m.values.length);
  for (let i = 0; i < n; i++) {
    for (let p = m.rowPtr[i], pEnd = m.rowPtr[i + 1]; p < pEnd; p++) values[p] = r[i] * m.values[p];
  }
  const c: CsrMatrix = { n, rowPtr: m.rowPtr, colIdx: m.colIdx, values };
  for (let i = 0; i < n; i++) {
    for (let p = m.rowPtr[i], pEnd = m.rowPtr[i + 1]; p < pEnd; p++) {
      const back = csrEntry(c, c.colIdx[p], i);
      if (Math.abs(values[p] - back) > 1e-10 * Math.max(values[p], back)) return null;
    }
  }
  return c;
}
