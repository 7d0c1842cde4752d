/** Neighbour lists of the generated areas and the spatial solve that simulates the outcomes. */
import type { Pt } from './geometry.js';

/** Queen contiguity: cells that share at least one exact vertex. Neighbour lists ascending. */
export function sharedVertexNeighbours(cells: Pt[][]): number[][] {
  const owners = new Map<string, Set<number>>();
  cells.forEach((ring, i) => {
    for (const p of ring) {
      const key = `${p[0]},${p[1]}`;
      const set = owners.get(key) ?? new Set<number>();
      set.add(i);
      owners.set(key, set);
    }
  });
  const nb = cells.map(() => new Set<number>());
  for (const set of owners.values()) for (const i of set) for (const j of set) if (i !== j) nb[i].add(j);
  return nb.map((s) => [...s].sort((a, b) => a - b));
}

/** Closest distance between vertices of two cells that are not neighbours (guards tolerance-based matching). */
export function closestNonNeighbourGap(cells: Pt[][], nb: number[][]): number {
  let best = Infinity;
  for (let i = 0; i < cells.length; i++) {
    const near = new Set(nb[i]);
    for (let j = i + 1; j < cells.length; j++) {
      if (near.has(j)) continue;
      for (const p of cells[i]) for (const q of cells[j]) best = Math.min(best, Math.hypot(p[0] - q[0], p[1] - q[1]));
    }
  }
  return best;
}

/** k nearest by squared planar distance; throws on a tie at the k-th place so the set is unambiguous. */
export function nearestNeighbours(points: Pt[], k: number): number[][] {
  return points.map((p, i) => {
    const order = points
      .map((q, j) => ({ j, d: (p[0] - q[0]) ** 2 + (p[1] - q[1]) ** 2 }))
      .filter((o) => o.j !== i)
      .sort((a, b) => a.d - b.d || a.j - b.j);
    if (order[k - 1].d === order[k].d) throw new Error(`tie among nearest neighbours of point ${i}`);
    return order.slice(0, k).map((o) => o.j).sort((a, b) => a - b);
  });
}

/**
 * Solves (I − ρW)y = b for row-standardised W by the fixed-point iteration y ← b + ρWy, a
 * contraction with factor |ρ| in the max norm; stops when the largest change is below 1e-13·max|y|.
 */
export function solveSpatial(nb: number[][], rho: number, b: number[]): { y: number[]; iterations: number; residual: number } {
  let y = b.slice();
  for (let it = 1; it <= 10000; it++) {
    const next = b.map((bi, i) => bi + (rho * nb[i].reduce((s, j) => s + y[j], 0)) / nb[i].length);
    const change = Math.max(...next.map((v, i) => Math.abs(v - y[i])));
    y = next;
    if (change <= 1e-13 * Math.max(1, ...y.map(Math.abs))) {
      const residual = Math.max(...y.map((v, i) => Math.abs(v - (rho * nb[i].reduce((s, j) => s + y[j], 0)) / nb[i].length - b[i])));
      return { y, iterations: it, residual };
    }
  }
  throw new Error('spatial solve did not converge');
}
