import type { CsrMatrix } from '../../src/linalg/csr.js';

/** CSR from 0-based neighbour lists, binary (1) or row-standardised (1/|N(i)|). */
export function csrFromNeighbours(neighbours: number[][], transform: 'binary' | 'row'): CsrMatrix {
  const n = neighbours.length;
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let i = 0; i < n; i++) {
    const list = [...new Set(neighbours[i])].filter((j) => j !== i).sort((a, b) => a - b);
    for (const j of list) {
      cols.push(j);
      vals.push(transform === 'row' ? 1 / list.length : 1);
    }
    rowPtr[i + 1] = cols.length;
  }
  return { n, rowPtr, colIdx: Int32Array.from(cols), values: Float64Array.from(vals) };
}

/** Rook neighbours on a rows×cols lattice, cells numbered row by row. */
export function rookNeighbours(rows: number, cols: number): number[][] {
  const out: number[][] = [];
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const list: number[] = [];
      if (r > 0) list.push((r - 1) * cols + c);
      if (c > 0) list.push(r * cols + c - 1);
      if (c < cols - 1) list.push(r * cols + c + 1);
      if (r < rows - 1) list.push((r + 1) * cols + c);
      out.push(list);
    }
  }
  return out;
}

/** Row-standardised rook weights and their symmetric binary base. */
export function rookGrid(rows: number, cols: number): { w: CsrMatrix; base: CsrMatrix } {
  const nb = rookNeighbours(rows, cols);
  return { w: csrFromNeighbours(nb, 'row'), base: csrFromNeighbours(nb, 'binary') };
}

/** Dense row-major copy, for checks against ml-matrix. */
export function toDenseRows(w: CsrMatrix): number[][] {
  const out = Array.from({ length: w.n }, () => new Array<number>(w.n).fill(0));
  for (let i = 0; i < w.n; i++) for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) out[i][w.colIdx[p]] = w.values[p];
  return out;
}
