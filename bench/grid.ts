/** Rook-contiguity grids for benchmarks and tests: binary B, row-standardised W, S = D^-1/2 B D^-1/2. */
import type { CsrMatrix } from '../src/linalg/csr.js';
import { seededRandom } from '../src/linalg/random.js';

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

/** Irregular planar-like graph: random points, each linked to points within a radius (symmetric). */
export function randomGeometric(n: number, radius: number, seed: number) {
  const u = seededRandom(seed);
  const x = new Float64Array(n), y = new Float64Array(n);
  for (let i = 0; i < n; i++) { x[i] = u(); y[i] = u(); }
  const nb: number[][] = Array.from({ length: n }, () => []);
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      if ((x[i] - x[j]) ** 2 + (y[i] - y[j]) ** 2 < radius * radius) { nb[i].push(j); nb[j].push(i); }
    }
  }
  // keep every area linked: join isolated points to their nearest neighbour
  for (let i = 0; i < n; i++) {
    if (nb[i].length > 0) continue;
    let best = -1, bestD = Infinity;
    for (let j = 0; j < n; j++) if (j !== i) { const d = (x[i] - x[j]) ** 2 + (y[i] - y[j]) ** 2; if (d < bestD) { bestD = d; best = j; } }
    nb[i].push(best); nb[best].push(i);
  }
  return { ...weightsFromNeighbours(nb), x, y };
}


/** k-nearest-neighbour weights (row-standardised, not symmetric) on random points. */
export function randomKnn(n: number, k: number, seed: number): { w: CsrMatrix; x: Float64Array; y: Float64Array } {
  const u = seededRandom(seed);
  const x = new Float64Array(n), y = new Float64Array(n);
  for (let i = 0; i < n; i++) { x[i] = u(); y[i] = u(); }
  const rowPtr = new Int32Array(n + 1);
  const colIdx = new Int32Array(n * k);
  const values = new Float64Array(n * k).fill(1 / k);
  for (let i = 0; i < n; i++) {
    const order = Array.from({ length: n }, (_, j) => j).filter((j) => j !== i)
      .sort((a, b) => (x[a] - x[i]) ** 2 + (y[a] - y[i]) ** 2 - ((x[b] - x[i]) ** 2 + (y[b] - y[i]) ** 2));
    const chosen = order.slice(0, k).sort((a, b) => a - b);
    colIdx.set(chosen, i * k);
    rowPtr[i + 1] = (i + 1) * k;
  }
  return { w: { n, rowPtr, colIdx, values }, x, y };
}
