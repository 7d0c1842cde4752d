import type { CsrMatrix } from '../linalg/index.js';
import type { SpatialWeights, WeightsSummary } from './types.js';
import { isSymmetric } from './pattern.js';

/**
 * Connected components of the neighbour graph, links taken in both directions (union–find with
 * path halving and union by size). Areas without neighbours are components of their own.
 * Labels run 0, 1, … in order of each component's lowest area index.
 */
export function connectedComponents(w: CsrMatrix): { count: number; label: Int32Array } {
  const n = w.n;
  const parent = new Int32Array(n);
  const size = new Int32Array(n).fill(1);
  for (let i = 0; i < n; i++) parent[i] = i;
  const find = (a: number): number => {
    while (parent[a] !== a) {
      parent[a] = parent[parent[a]];
      a = parent[a];
    }
    return a;
  };
  for (let i = 0; i < n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      let a = find(i);
      let b = find(w.colIdx[p]);
      if (a === b) continue;
      if (size[a] < size[b]) [a, b] = [b, a];
      parent[b] = a;
      size[a] += size[b];
    }
  }
  const label = new Int32Array(n).fill(-1);
  const rootLabel = new Int32Array(n).fill(-1);
  let count = 0;
  for (let i = 0; i < n; i++) {
    const r = find(i);
    if (rootLabel[r] < 0) rootLabel[r] = count++;
    label[i] = rootLabel[r];
  }
  return { count, label };
}

/** Counts that describe a weights matrix: links, neighbour-count distribution, withoutNeighbours, components. */
export function summarizeWeights(w: SpatialWeights): WeightsSummary {
  const n = w.n;
  const counts = new Int32Array(n);
  for (let i = 0; i < n; i++) counts[i] = w.rowPtr[i + 1] - w.rowPtr[i];
  const links = w.rowPtr[n];
  const sorted = Int32Array.from(counts).sort();
  const median = n === 0 ? 0 : n % 2 === 1 ? sorted[(n - 1) >> 1] : (sorted[n / 2 - 1] + sorted[n / 2]) / 2;
  const histogram: [number, number][] = [];
  for (let k = 0; k < n; ) {
    let e = k;
    while (e < n && sorted[e] === sorted[k]) e++;
    histogram.push([sorted[k], e - k]);
    k = e;
  }
  // as in the weights contract: an area without neighbours has an empty row (its spatial lag is 0)
  const withoutNeighbours: string[] = [];
  for (let i = 0; i < n; i++) if (counts[i] === 0) withoutNeighbours.push(w.ids[i]);
  return {
    n,
    links,
    density: n > 0 ? links / (n * n) : 0,
    minNeighbours: n > 0 ? sorted[0] : 0,
    meanNeighbours: n > 0 ? links / n : 0,
    medianNeighbours: median,
    maxNeighbours: n > 0 ? sorted[n - 1] : 0,
    histogram,
    withoutNeighbours,
    components: connectedComponents(w).count,
    symmetric: isSymmetric(w),
  };
}
