/**
 * Symbolic analysis of the Cholesky factor of a symmetric matrix with a given pattern, done once
 * and reused for every ρ: elimination tree (Liu 1986), postorder, column counts by row subtrees,
 * supernodes (fundamental, then relaxed amalgamation that pads a few zeros to get larger dense
 * blocks, as in Ashcraft & Grimes 1989), and the row structure of every supernode.
 * Written by hand: no kept JavaScript library offers sparse Cholesky.
 */
import type { CsrMatrix } from '../csr.js';
import type { Graph } from './ordering.js';

export interface SymbolicFactor {
  n: number;
  /** perm[k] = original index of the k-th eliminated row/column */
  perm: Int32Array;
  /** iperm[original] = elimination position */
  iperm: Int32Array;
  /** elimination tree in elimination positions, −1 for roots */
  parent: Int32Array;
  /** nonzeros of L per column, diagonal included (without padding) */
  colCount: Int32Array;
  /** exact nnz(L) of the ordering (diagonal included, no padding) */
  nnzL: number;
  /** nnz of the stored supernodal factor, padding included */
  nnzStored: number;
  superCount: number;
  /** first column of each supernode; superFirst[superCount] = n */
  superFirst: Int32Array;
  /** row structure of supernode s: rows[rowPtr[s] .. rowPtr[s+1]), its own columns first, ascending */
  rowPtr: Int32Array;
  rows: Int32Array;
  superParent: Int32Array;
  /** lower-triangle entries of the permuted matrix by column: row position and index into values */
  lowPtr: Int32Array;
  lowRow: Int32Array;
  lowSource: Int32Array;
  /** doubles needed by the stack of update matrices and by the largest front */
  stackSize: number;
  maxFront: number;
}

export function analyse(g: Graph, perm: Int32Array, matrix: CsrMatrix): SymbolicFactor {
  const n = g.n;
  let iperm = new Int32Array(n);
  for (let k = 0; k < n; k++) iperm[perm[k]] = k;

  // elimination tree of the permuted pattern
  let parent = eliminationTree(g, perm, iperm);
  // postorder it, so that every subtree and every supernode is contiguous
  const post = postorder(parent);
  const perm2 = new Int32Array(n);
  for (let k = 0; k < n; k++) perm2[k] = perm[post[k]];
  const ipost = new Int32Array(n);
  for (let k = 0; k < n; k++) ipost[post[k]] = k;
  const parent2 = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    const p = parent[post[k]];
    parent2[k] = p < 0 ? -1 : ipost[p];
  }
  parent = parent2;
  iperm = new Int32Array(n);
  for (let k = 0; k < n; k++) iperm[perm2[k]] = k;

  // column counts: the row pattern of L(i, :) is the subtree of the etree reached from A(i, :)
  const colCount = new Int32Array(n).fill(1);
  const mark = new Int32Array(n).fill(-1);
  for (let i = 0; i < n; i++) {
    mark[i] = i;
    const v = perm2[i];
    for (let p = g.ptr[v], pEnd = g.ptr[v + 1]; p < pEnd; p++) {
      let k = iperm[g.adj[p]];
      if (k >= i) continue;
      while (mark[k] !== i) { colCount[k]++; mark[k] = i; k = parent[k]; }
    }
  }
  let nnzL = 0;
  for (let j = 0; j < n; j++) nnzL += colCount[j];

  // fundamental supernodes: j and j+1 merge when j+1 is the only child of... j's parent and counts nest
  const childCount = new Int32Array(n);
  for (let j = 0; j < n; j++) if (parent[j] >= 0) childCount[parent[j]]++;
  const firsts: number[] = [0];
  for (let j = 1; j < n; j++) {
    const joins = parent[j - 1] === j && childCount[j] === 1 && colCount[j - 1] === colCount[j] + 1;
    if (!joins) firsts.push(j);
  }
  const { superFirst, superParent } = amalgamate(firsts, n, parent, colCount);
  const superCount = superFirst.length - 1;

  // row structure of each supernode: its columns, entries of A below, and children's structures
  const superOf = new Int32Array(n);
  for (let s = 0; s < superCount; s++) for (let j = superFirst[s], jEnd = superFirst[s + 1]; j < jEnd; j++) superOf[j] = s;
  const childHead = new Int32Array(superCount).fill(-1);
  const childNext = new Int32Array(superCount).fill(-1);
  for (let s = superCount - 1; s >= 0; s--) {
    const p = superParent[s];
    if (p >= 0) { childNext[s] = childHead[p]; childHead[p] = s; }
  }
  const rowLists: Int32Array[] = new Array(superCount);
  const rowPtr = new Int32Array(superCount + 1);
  mark.fill(-1);
  const scratch: number[] = [];
  for (let s = 0; s < superCount; s++) {
    const f = superFirst[s], l = superFirst[s + 1];
    scratch.length = 0;
    for (let j = f; j < l; j++) mark[j] = s;
    for (let j = f; j < l; j++) {
      const v = perm2[j];
      for (let p = g.ptr[v], pEnd = g.ptr[v + 1]; p < pEnd; p++) {
        const i = iperm[g.adj[p]];
        if (i >= l && mark[i] !== s) { mark[i] = s; scratch.push(i); }
      }
    }
    for (let c = childHead[s]; c >= 0; c = childNext[c]) {
      const rc = rowLists[c];
      const width = superFirst[c + 1] - superFirst[c];
      for (let t = width; t < rc.length; t++) {
        const i = rc[t];
        if (i >= l && mark[i] !== s) { mark[i] = s; scratch.push(i); }
      }
    }
    scratch.sort((a, b) => a - b);
    const list = new Int32Array(l - f + scratch.length);
    for (let j = f; j < l; j++) list[j - f] = j;
    for (let t = 0; t < scratch.length; t++) list[l - f + t] = scratch[t];
    rowLists[s] = list;
    rowPtr[s + 1] = rowPtr[s] + list.length;
  }
  const rows = new Int32Array(rowPtr[superCount]);
  for (let s = 0; s < superCount; s++) rows.set(rowLists[s], rowPtr[s]);

  // stored nonzeros, the largest front, and the peak of the update-matrix stack (postorder)
  let nnzStored = 0, maxFront = 0, stack = 0, peak = 0;
  const updateSize = new Float64Array(superCount);
  for (let s = 0; s < superCount; s++) {
    const m = rowPtr[s + 1] - rowPtr[s];
    const k = superFirst[s + 1] - superFirst[s];
    nnzStored += m * k - (k * (k - 1)) / 2;
    if (m > maxFront) maxFront = m;
    for (let c = childHead[s]; c >= 0; c = childNext[c]) stack -= updateSize[c];
    updateSize[s] = (m - k) * (m - k);
    stack += updateSize[s];
    if (stack > peak) peak = stack;
  }

  // lower triangle of the permuted matrix by column, pointing into matrix.values
  const lowCount = new Int32Array(n + 1);
  const { rowPtr: aPtr, colIdx: aIdx } = matrix;
  for (let r = 0; r < n; r++) {
    const ir = iperm[r];
    for (let p = aPtr[r], pEnd = aPtr[r + 1]; p < pEnd; p++) {
      const jc = iperm[aIdx[p]];
      if (ir >= jc) lowCount[jc + 1]++;
    }
  }
  for (let j = 0; j < n; j++) lowCount[j + 1] += lowCount[j];
  const lowPtr = lowCount;
  const fillAt = lowPtr.slice(0, n);
  const lowRow = new Int32Array(lowPtr[n]);
  const lowSource = new Int32Array(lowPtr[n]);
  for (let r = 0; r < n; r++) {
    const ir = iperm[r];
    for (let p = aPtr[r], pEnd = aPtr[r + 1]; p < pEnd; p++) {
      const jc = iperm[aIdx[p]];
      if (ir >= jc) { const q = fillAt[jc]++; lowRow[q] = ir; lowSource[q] = p; }
    }
  }

  return {
    n, perm: perm2, iperm, parent, colCount, nnzL, nnzStored, superCount, superFirst, rowPtr, rows,
    superParent, lowPtr, lowRow, lowSource, stackSize: peak, maxFront,
  };
}

/** Elimination tree of P A Pᵀ by Liu's algorithm with path compression. */
export function eliminationTree(g: Graph, perm: Int32Array, iperm: Int32Array): Int32Array {
  const n = g.n;
  const parent = new Int32Array(n).fill(-1);
  const ancestor = new Int32Array(n).fill(-1);
  for (let i = 0; i < n; i++) {
    const v = perm[i];
    for (let p = g.ptr[v], pEnd = g.ptr[v + 1]; p < pEnd; p++) {
      let k = iperm[g.adj[p]];
      while (k !== -1 && k < i) {
        const up = ancestor[k];
        ancestor[k] = i;
        if (up === -1) { parent[k] = i; break; }
        k = up;
      }
    }
  }
  return parent;
}

/** Postorder of a forest given by parent pointers: post[k] = the k-th node visited. */
export function postorder(parent: Int32Array): Int32Array {
  const n = parent.length;
  const head = new Int32Array(n).fill(-1);
  const next = new Int32Array(n).fill(-1);
  for (let j = n - 1; j >= 0; j--) {
    const p = parent[j];
    if (p >= 0) { next[j] = head[p]; head[p] = j; }
  }
  const post = new Int32Array(n);
  const stack = new Int32Array(n);
  let k = 0;
  for (let root = 0; root < n; root++) {
    if (parent[root] !== -1) continue;
    let top = 0;
    stack[0] = root;
    while (top >= 0) {
      const v = stack[top];
      const c = head[v];
      if (c === -1) { top--; post[k++] = v; }
      else { head[v] = next[c]; stack[++top] = c; }
    }
  }
  return post;
}

/**
 * Relaxed supernode amalgamation: merge a supernode into its parent when it is the parent's
 * last child (contiguous columns) and the padding stays small. Thresholds are common practice
 * for supernodal codes: always up to 4 columns, up to 16 columns with < 50% zeros, up to 64
 * columns with < 10% zeros, larger with < 5% zeros.
 */
function amalgamate(firsts: number[], n: number, parent: Int32Array, colCount: Int32Array): { superFirst: Int32Array; superParent: Int32Array } {
  const count = firsts.length;
  const last = (s: number) => (s + 1 < count ? firsts[s + 1] : n) - 1;
  const superOf = new Int32Array(n);
  for (let s = 0; s < count; s++) for (let j = firsts[s]; j <= last(s); j++) superOf[j] = s;
  // per alive supernode (indexed by its original fundamental id at the top of the merged run)
  const first = new Int32Array(count), cols = new Int32Array(count), front = new Int32Array(count);
  const trueNnz = new Float64Array(count);
  const rep = new Int32Array(count);
  for (let s = 0; s < count; s++) {
    first[s] = firsts[s];
    cols[s] = last(s) - firsts[s] + 1;
    front[s] = colCount[firsts[s]];
    let t = 0;
    for (let j = firsts[s]; j <= last(s); j++) t += colCount[j];
    trueNnz[s] = t;
    rep[s] = s;
  }
  const find = (s: number): number => {
    while (rep[s] !== s) { rep[s] = rep[rep[s]]; s = rep[s]; }
    return s;
  };
  const parentOf = (s: number): number => {
    const p = parent[last(s)];
    return p < 0 ? -1 : find(superOf[p]);
  };
  const alive: number[] = [];
  for (let p = 0; p < count; p++) {
    alive.push(p);
    while (alive.length >= 2) {
      const c = alive[alive.length - 2];
      if (parentOf(c) !== p) break;
      const k = cols[c] + cols[p];
      const m = front[p] + cols[c];
      const padded = k * m - (k * (k - 1)) / 2;
      const zeros = (padded - trueNnz[c] - trueNnz[p]) / padded;
      const ok = k <= 4 || (k <= 16 && zeros < 0.5) || (k <= 64 && zeros < 0.1) || zeros < 0.05;
      if (!ok) break;
      rep[c] = p;
      first[p] = first[c];
      cols[p] = k;
      front[p] = m;
      trueNnz[p] += trueNnz[c];
      alive.splice(alive.length - 2, 1);
    }
  }
  const superFirst = new Int32Array(alive.length + 1);
  const index = new Int32Array(count).fill(-1);
  for (let t = 0; t < alive.length; t++) { superFirst[t] = first[alive[t]]; index[alive[t]] = t; }
  superFirst[alive.length] = n;
  const superParent = new Int32Array(alive.length);
  for (let t = 0; t < alive.length; t++) {
    const p = parentOf(alive[t]);
    superParent[t] = p < 0 ? -1 : index[p];
  }
  return { superFirst, superParent };
}
