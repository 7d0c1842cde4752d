/** Rook-contiguity grids for benchmarks and tests: binary B, row-standardised W, S = D^-1/2 B D^-1/2. */
import type { CsrMatrix } from '../src/linalg/csr.js';

export interface GridWeights {
  w: CsrMatrix;
  s: CsrMatrix;
  x: Float64Array;
  y: Float64Array;
}

/** Weights from an undirected neighbour list (each pair once or twice; duplicates merged). */
export function weightsFromNeighbours(neighbours: number[][]): { w: CsrMatrix; s: CsrMatrix } {
  const n = neighbours.length;
  const lists = neighbours.map((l, i) => Array.from(new Set(l.filter((j) => j !== i))).sort((a, b) => a - b));
  const rowPtr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) rowPtr[i + 1] = rowPtr[i] + lists[i].length;
  const colIdx = new Int32Array(rowPtr[n]);
  const wv = new Float64Array(rowPtr[n]);
  const sv = new Float64Array(rowPtr[n]);
  for (let i = 0; i < n; i++) {
    const di = lists[i].length;
    lists[i].forEach((j, t) => {
      const p = rowPtr[i] + t;
      colIdx[p] = j;
      wv[p] = 1 / di;
      sv[p] = 1 / Math.sqrt(di * lists[j].length);
    });
  }
  return { w: { n, rowPtr, colIdx, values: wv }, s: { n, rowPtr, colIdx: colIdx.slice(), values: sv } };
}

export function rookGrid(rows: number, cols: number): GridWeights {
  const n = rows * cols;
  const nb: number[][] = new Array(n);
  const x = new Float64Array(n), y = new Float64Array(n);
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const i = r * cols + c;
      const l: number[] = [];
      if (r > 0) l.push(i - cols);
      if (c > 0) l.push(i - 1);
      if (c + 1 < cols) l.push(i + 1);
      if (r + 1 < rows) l.push(i + cols);
      nb[i] = l;
      x[i] = c;
      y[i] = r;
    }
  }
  return { ...weightsFromNeighbours(nb), x, y };
}
