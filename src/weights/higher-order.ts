import type { CsrMatrix } from '../linalg/index.js';
import { InputError } from '../errors.js';
import { LinkList, csrFromLinks } from './pattern.js';

/**
 * Higher-order neighbours on a contiguity graph: area j is an order-k neighbour of i when the
 * shortest path from i to j along neighbour links has exactly k steps (breadth-first search,
 * cut at depth k). With cumulative, every j within 1..k steps. Values are 1.
 */
export function higherOrder(pattern: CsrMatrix, order: number, cumulative: boolean): CsrMatrix {
  if (!Number.isInteger(order) || order < 1) {
    throw new InputError(`The neighbour order must be a whole number, 1 or more; got ${order}.`);
  }
  const n = pattern.n;
  if (order === 1) return { n, rowPtr: pattern.rowPtr, colIdx: pattern.colIdx, values: new Float64Array(pattern.colIdx.length).fill(1) };
  const { rowPtr, colIdx } = pattern;
  const seenBy = new Int32Array(n).fill(-1);
  const queue = new Int32Array(n);
  const depth = new Int32Array(n);
  const links = new LinkList();
  for (let i = 0; i < n; i++) {
    let head = 0, tail = 0;
    queue[tail++] = i;
    seenBy[i] = i;
    depth[i] = 0;
    while (head < tail) {
      const u = queue[head++];
      const du = depth[u];
      if (du === order) continue;
      for (let p = rowPtr[u], pEnd = rowPtr[u + 1]; p < pEnd; p++) {
        const w = colIdx[p];
        if (seenBy[w] === i) continue;
        seenBy[w] = i;
        depth[w] = du + 1;
        queue[tail++] = w;
        if (du + 1 === order || cumulative) links.push(i, w);
      }
    }
  }
  return csrFromLinks(n, links);
}
