/**
 * Fill-reducing orderings for the sparse Cholesky factor of I − ρS.
 *
 * Nested dissection (George 1973): split the areas into two halves by a small vertex separator,
 * order each half recursively, and the separator last. On planar neighbour graphs (grids, real
 * tessellations) this gives far less fill than minimum degree. Two ways to find the separator:
 *  - from the areas' coordinates: cut at the median of the wider axis; the separator is the set of
 *    areas on the smaller side of the cut that touch the other side;
 *  - from the graph alone: breadth-first level structure from a pseudo-peripheral area; the median
 *    level separates the levels before it from those after it.
 * Written by hand: no kept JavaScript library offers graph orderings for sparse factorisation.
 */
import type { CsrMatrix } from '../csr.js';

/** Symmetric neighbour pattern without the diagonal. */
export interface Graph {
  n: number;
  ptr: Int32Array;
  adj: Int32Array;
}

/** The pattern of A + Aᵀ without the diagonal. */
export function graphOf(a: CsrMatrix): Graph {
  const { n, rowPtr, colIdx } = a;
  const deg = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    for (let p = rowPtr[i], pEnd = rowPtr[i + 1]; p < pEnd; p++) {
      const j = colIdx[p];
      if (j !== i) { deg[i]++; deg[j]++; }
    }
  }
  const ptr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) ptr[i + 1] = ptr[i] + deg[i];
  const fill = ptr.slice(0, n);
  const raw = new Int32Array(ptr[n]);
  for (let i = 0; i < n; i++) {
    for (let p = rowPtr[i], pEnd = rowPtr[i + 1]; p < pEnd; p++) {
      const j = colIdx[p];
      if (j !== i) { raw[fill[i]++] = j; raw[fill[j]++] = i; }
    }
  }
  // drop duplicates (an entry present in both A and Aᵀ appears twice)
  const mark = new Int32Array(n).fill(-1);
  const outPtr = new Int32Array(n + 1);
  const out = new Int32Array(ptr[n]);
  let q = 0;
  for (let i = 0; i < n; i++) {
    for (let p = ptr[i], pEnd = ptr[i + 1]; p < pEnd; p++) {
      const j = raw[p];
      if (mark[j] !== i) { mark[j] = i; out[q++] = j; }
    }
    outPtr[i + 1] = q;
  }
  return { n, ptr: outPtr, adj: out.slice(0, q) };
}

const LEAF_SIZE = 16;

/**
 * Nested dissection from coordinates. Returns perm with perm[k] = the area eliminated k-th.
 */
export function coordinateDissection(g: Graph, x: Float64Array, y: Float64Array): Int32Array {
  const { n, ptr, adj } = g;
  const perm = new Int32Array(n);
  const side = new Int32Array(n); // stamp: which part an area belongs to during one split
  let stamp = 0;
  let next = n; // fill perm from the end: separators go last
  const all = new Int32Array(n);
  for (let i = 0; i < n; i++) all[i] = i;

  // explicit stack of subsets; each popped subset places its separator at the current end,
  // then pushes its halves so that they are ordered before it
  const stack: Int32Array[] = [all];
  while (stack.length > 0) {
    const set = stack.pop()!;
    const m = set.length;
    if (m <= LEAF_SIZE) {
      for (let t = m - 1; t >= 0; t--) perm[--next] = set[t];
      continue;
    }
    let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
    for (let t = 0; t < m; t++) {
      const v = set[t];
      if (x[v] < x0) x0 = x[v];
      if (x[v] > x1) x1 = x[v];
      if (y[v] < y0) y0 = y[v];
      if (y[v] > y1) y1 = y[v];
    }
    const useX = x1 - x0 >= y1 - y0;
    const key = useX ? x : y;
    const other = useX ? y : x;
    const sorted = Array.from(set).sort((a, b) => key[a] - key[b] || other[a] - other[b] || a - b);
    const half = m >> 1;
    const stampA = ++stamp, stampB = ++stamp;
    for (let t = 0; t < m; t++) side[sorted[t]] = t < half ? stampA : stampB;
    // boundary of each side towards the other; the smaller one is the separator
    const edgeA: number[] = [], edgeB: number[] = [];
    for (let t = 0; t < m; t++) {
      const v = sorted[t];
      const mine = side[v];
      const theirs = mine === stampA ? stampB : stampA;
      for (let p = ptr[v], pEnd = ptr[v + 1]; p < pEnd; p++) {
        if (side[adj[p]] === theirs) { (mine === stampA ? edgeA : edgeB).push(v); break; }
      }
    }
    const sep = edgeA.length <= edgeB.length ? edgeA : edgeB;
    const sepStamp = ++stamp;
    for (const v of sep) side[v] = sepStamp;
    for (let t = sep.length - 1; t >= 0; t--) perm[--next] = sep[t];
    const partA: number[] = [], partB: number[] = [];
    for (let t = 0; t < m; t++) {
      const v = sorted[t];
      if (side[v] === stampA) partA.push(v);
      else if (side[v] === stampB) partB.push(v);
    }
    if (partA.length > 0) stack.push(Int32Array.from(partA));
    if (partB.length > 0) stack.push(Int32Array.from(partB));
  }
  return perm;
}

/**
 * Nested dissection from the graph alone, by breadth-first level structures.
 * Returns perm with perm[k] = the area eliminated k-th.
 */
export function levelDissection(g: Graph): Int32Array {
  const { n, ptr, adj } = g;
  const perm = new Int32Array(n);
  const inSet = new Int32Array(n); // stamp of the subset an area currently belongs to
  const level = new Int32Array(n);
  const queue = new Int32Array(n);
  let stamp = 0;
  let next = n;
  const all = new Int32Array(n);
  for (let i = 0; i < n; i++) all[i] = i;
  const stack: Int32Array[] = [all];

  /** BFS inside the stamped subset; returns the number reached, levels in `level`. */
  const bfs = (root: number, s: number, visit: number): number => {
    let head = 0, tail = 0;
    queue[tail++] = root;
    inSet[root] = visit;
    level[root] = 0;
    while (head < tail) {
      const v = queue[head++];
      for (let p = ptr[v], pEnd = ptr[v + 1]; p < pEnd; p++) {
        const u = adj[p];
        if (inSet[u] === s) { inSet[u] = visit; level[u] = level[v] + 1; queue[tail++] = u; }
      }
    }
    return tail;
  };

  while (stack.length > 0) {
    const set = stack.pop()!;
    const m = set.length;
    if (m <= LEAF_SIZE) {
      for (let t = m - 1; t >= 0; t--) perm[--next] = set[t];
      continue;
    }
    // pseudo-peripheral root: repeat BFS from the last area reached while the depth grows
    let root = set[0];
    let depth = -1;
    let reached = 0;
    for (let round = 0; round < 4; round++) {
      const s = ++stamp;
      for (let t = 0; t < m; t++) inSet[set[t]] = s;
      reached = bfs(root, s, ++stamp);
      const far = queue[reached - 1];
      const d = level[far];
      if (d <= depth) break;
      depth = d;
      root = far;
    }
    const s = ++stamp;
    for (let t = 0; t < m; t++) inSet[set[t]] = s;
    const visit = ++stamp;
    reached = bfs(root, s, visit);
    if (reached < m) {
      // disconnected: split off the reached component, no separator needed
      const comp = queue.slice(0, reached);
      const rest: number[] = [];
      for (let t = 0; t < m; t++) if (inSet[set[t]] !== visit) rest.push(set[t]);
      stack.push(comp, Int32Array.from(rest));
      continue;
    }
    // the level at which half the areas have been reached is the separator
    const half = m >> 1;
    const sepLevel = level[queue[half]];
    if (sepLevel === 0) {
      for (let t = m - 1; t >= 0; t--) perm[--next] = set[t];
      continue;
    }
    const sep: number[] = [], before: number[] = [], after: number[] = [];
    for (let t = 0; t < reached; t++) {
      const v = queue[t];
      const l = level[v];
      if (l < sepLevel) before.push(v);
      else if (l === sepLevel) sep.push(v);
      else after.push(v);
    }
    for (let t = sep.length - 1; t >= 0; t--) perm[--next] = sep[t];
    if (before.length > 0) stack.push(Int32Array.from(before));
    if (after.length > 0) stack.push(Int32Array.from(after));
  }
  return perm;
}

/** True when p holds each of 0..n−1 exactly once. */
export function isPermutation(p: Int32Array, n: number): boolean {
  if (p.length !== n) return false;
  const seen = new Uint8Array(n);
  for (let k = 0; k < n; k++) {
    const v = p[k];
    if (v < 0 || v >= n || seen[v]) return false;
    seen[v] = 1;
  }
  return true;
}

/** True when both coordinate arrays have one finite value per area (then they may order the areas). */
export function usableCoordinates(c: { x: Float64Array; y: Float64Array } | undefined, n: number): c is { x: Float64Array; y: Float64Array } {
  if (!c || c.x.length !== n || c.y.length !== n) return false;
  for (let i = 0; i < n; i++) if (!Number.isFinite(c.x[i]) || !Number.isFinite(c.y[i])) return false;
  return true;
}
