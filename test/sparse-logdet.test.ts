/**
 * Sparse Cholesky log-determinant against dense references from ml-matrix (a general-purpose
 * linear algebra library): Cholesky of the dense I − ρS (ln|M| = 2 Σ ln L_jj) and the symmetric
 * eigenvalues of S (ln|I − ρS| = Σ ln(1 − ρλ_i), Ord 1975).
 */
import { describe, expect, it } from 'vitest';
import { CholeskyDecomposition, EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { randomGeometric, rookGrid, weightsFromNeighbours } from '../bench/grid.js';
import type { CsrMatrix } from '../src/linalg/csr.js';
import { SparseCholeskyLogDet } from '../src/linalg/sparse/cholesky-logdet.js';
import { coordinateDissection, graphOf, isPermutation, levelDissection } from '../src/linalg/sparse/ordering.js';
import { lanczosExtremes } from '../src/linalg/sparse/extremes.js';
import { admissibleRange } from '../src/linalg/range.js';

function dense(a: CsrMatrix): Matrix {
  const m = Matrix.zeros(a.n, a.n);
  for (let i = 0; i < a.n; i++) for (let p = a.rowPtr[i]; p < a.rowPtr[i + 1]; p++) m.set(i, a.colIdx[p], a.values[p]);
  return m;
}

function denseLogDet(s: CsrMatrix, rho: number): number {
  const m = Matrix.eye(s.n).sub(dense(s).mul(rho));
  const l = new CholeskyDecomposition(m).lowerTriangularMatrix;
  let sum = 0;
  for (let i = 0; i < s.n; i++) sum += 2 * Math.log(l.get(i, i));
  return sum;
}

const cases = [
  { name: 'rook grid 8×8', g: rookGrid(8, 8) },
  { name: 'rook grid 15×20', g: rookGrid(15, 20) },
  { name: 'rook grid 33×30', g: rookGrid(33, 30) },
  { name: 'random geometric graph, 500 areas', g: randomGeometric(500, 0.07, 11) },
];

describe('sparse Cholesky log-determinant', () => {
  for (const { name, g } of cases) {
    it(`equals the dense Cholesky determinant on the ${name}, both orderings, near both bounds`, () => {
      const range = admissibleRange(g.w, { symmetric: g.s });
      const rhos = [0.5, -0.4, 0.9, 0.999 * range.upper, 0.999 * range.lower, 0.99999 * range.upper];
      const expectedAt = rhos.map((rho) => denseLogDet(g.s, rho));
      for (const coords of [true, false]) {
        const ld = new SparseCholeskyLogDet(g.s, coords ? { coordinates: { x: g.x, y: g.y } } : {});
        for (const [t, rho] of rhos.entries()) {
          const expected = expectedAt[t];
          expect(Math.abs(ld.evaluate(rho) - expected)).toBeLessThan(1e-9 * Math.abs(expected));
        }
      }
    });
  }

  it('matches the eigenvalue formula Σ ln(1 − ρλ) on the irregular graph', () => {
    const g = cases[3].g;
    const ev = new EigenvalueDecomposition(dense(g.s), { assumeSymmetric: true }).realEigenvalues;
    const ld = new SparseCholeskyLogDet(g.s, {});
    for (const rho of [0.3, 0.85, -0.7]) {
      const expected = ev.reduce((s, l) => s + Math.log(1 - rho * l), 0);
      expect(Math.abs(ld.evaluate(rho) - expected)).toBeLessThan(1e-9 * Math.abs(expected));
    }
  });

  it('reuses one symbolic analysis: refactorisation over many ρ equals a fresh factorisation', () => {
    const g = rookGrid(20, 25);
    const reused = new SparseCholeskyLogDet(g.s, { coordinates: { x: g.x, y: g.y } });
    for (const rho of [0.1, 0.95, -0.9, 0.5, 0.1]) {
      const fresh = new SparseCholeskyLogDet(g.s, { coordinates: { x: g.x, y: g.y } });
      expect(reused.evaluate(rho)).toBe(fresh.evaluate(rho));
    }
  });

  it('throws outside the admissible range instead of returning a number', () => {
    const g = rookGrid(6, 6);
    const ld = new SparseCholeskyLogDet(g.s, {});
    expect(() => ld.evaluate(1.01)).toThrow(/not positive definite/);
  });
});

describe('orderings', () => {
  it('are permutations, on grids, the irregular graph and a graph with withoutNeighbours', () => {
    const withoutNeighbours = weightsFromNeighbours([[1], [0], [], [4], [3], [], [7], [6, 8], [7], []]);
    const graphs = [...cases.map((c) => ({ s: c.g.s, x: c.g.x, y: c.g.y })), { s: withoutNeighbours.s, x: new Float64Array(10).map((_, i) => i), y: new Float64Array(10) }];
    for (const { s, x, y } of graphs) {
      const g = graphOf(s);
      expect(isPermutation(coordinateDissection(g, x, y), s.n)).toBe(true);
      expect(isPermutation(levelDissection(g), s.n)).toBe(true);
    }
    const ld = new SparseCholeskyLogDet(withoutNeighbours.s, {});
    expect(isPermutation(ld.symbolic.perm, 10)).toBe(true);
    // identity: withoutNeighbours give ln 1 = 0; a linked pair and a 3-path (row-standardised, bipartite) have
    // eigenvalues ±1 (and 0), so each gives ln(1 − ρ²)
    expect(ld.evaluate(0.5)).toBeCloseTo(3 * Math.log(1 - 0.25), 12);
  });
});

describe('Lanczos extremes', () => {
  it('agree with ml-matrix symmetric eigenvalues', () => {
    for (const g of [cases[1].g, cases[3].g]) {
      const ev = new EigenvalueDecomposition(dense(g.s), { assumeSymmetric: true }).realEigenvalues;
      const min = Math.min(...ev), max = Math.max(...ev);
      const ex = lanczosExtremes(g.s, 3);
      expect(Math.abs(ex.min - min)).toBeLessThan(1e-8);
      expect(Math.abs(ex.max - max)).toBeLessThan(1e-8);
      const range = admissibleRange(g.w, { symmetric: g.s });
      expect(range.upper).toBe(1); // rows of W sum to one: λmax = 1 (Perron–Frobenius)
      expect(range.eigenMin).toBeLessThanOrEqual(min + 1e-12);
      expect(range.eigenMin).toBeGreaterThan(min - 1e-7);
    }
  });
});
