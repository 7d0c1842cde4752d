/**
 * The exact sparse LU log-determinant for weights without a symmetric form (k-nearest neighbours),
 * against references from outside the sparse code: ml-matrix's dense LU determinant (a
 * general-purpose linear algebra library), and the ML lag estimate obtained with the
 * dense LU log-determinant at every step.
 */
import { describe, expect, it } from 'vitest';
import { LuDecomposition, Matrix } from 'ml-matrix';
import { randomKnn } from '../bench/grid.js';
import { csrMultiply, type CsrMatrix } from '../src/linalg/csr.js';
import { SparseLuLogDet } from '../src/linalg/sparse/lu-logdet.js';
import { DenseLuLogDet } from '../src/linalg/dense-lu-logdet.js';
import { sparseAlgebra } from '../src/linalg/sparse/sparse-algebra.js';
import type { WeightsAlgebra } from '../src/linalg/algebra.js';
import { fitSpatialError, fitSpatialLag } from '../src/models/index.js';
import { seededUniform } from '../src/linalg/sparse/random.js';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(1e-300, Math.abs(b));

function denseLogdet(w: CsrMatrix, rho: number): number {
  const a = Matrix.eye(w.n);
  for (let i = 0; i < w.n; i++) for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) a.set(i, w.colIdx[p], a.get(i, w.colIdx[p]) - rho * w.values[p]);
  return Math.log(Math.abs(new LuDecomposition(a).determinant));
}

describe('sparse LU of I − ρW for weights without a symmetric form', () => {
  it('equals the ml-matrix dense LU determinant (1e-9 relative) on 5- and 8-nearest-neighbour weights, with and without coordinates', () => {
    for (const [n, k, seed] of [[600, 5, 3], [500, 8, 4]] as const) {
      const g = randomKnn(n, k, seed);
      for (const coordinates of [{ x: g.x, y: g.y }, undefined]) {
        const lu = new SparseLuLogDet(g.w, { coordinates });
        for (const rho of [-0.95, -0.4, 0.3, 0.7, 0.98]) expect(rel(lu.evaluate(rho), denseLogdet(g.w, rho))).toBeLessThan(1e-9);
      }
    }
  });

  it('serves the algebra above 1,500 areas when the rows of W sum to one; binary weights keep the Monte Carlo series', () => {
    const g = randomKnn(1550, 6, 5);
    const alg = sparseAlgebra(g.w, null, { coordinates: { x: g.x, y: g.y } });
    expect(alg.logdet.method).toMatch(/exact, sparse LU/);
    expect(alg.logdet.accuracy).toMatch(/exact/);
    expect(alg.roughLogdet?.method).toMatch(/Monte Carlo/);
    const binary: CsrMatrix = { ...g.w, values: new Float64Array(g.w.values.length).fill(1) };
    expect(sparseAlgebra(binary, null).logdet.method).toMatch(/Monte Carlo/);
  });

  it('gives the lag estimate of the dense LU at every step to 1e-7 (1,550 areas, 6 nearest neighbours)', () => {
    const g = randomKnn(1550, 6, 5);
    const n = g.w.n;
    const u = seededUniform(21);
    const normal = () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
    const x1 = new Float64Array(n).map(normal);
    const base = new Float64Array(n).map((_, i) => 1 + 2 * x1[i] + normal());
    const y = base.slice();
    const term = base.slice(), next = new Float64Array(n);
    for (let it = 0; it < 200; it++) { csrMultiply(g.w, term, next); for (let i = 0; i < n; i++) { term[i] = 0.6 * next[i]; y[i] += term[i]; } }
    const design = { names: ['constant', 'x1'], columns: [new Float64Array(n).fill(1), x1] };
    const sparse = sparseAlgebra(g.w, null, { coordinates: { x: g.x, y: g.y } });
    const dense: WeightsAlgebra = Object.assign(Object.create(sparse) as WeightsAlgebra, { logdet: new DenseLuLogDet(g.w), roughLogdet: undefined });
    const lagS = fitSpatialLag(y, design, sparse), lagD = fitSpatialLag(y, design, dense);
    expect(Math.abs(lagS.parameter - lagD.parameter)).toBeLessThan(1e-7);
    expect(Math.abs(lagS.parameter - 0.6)).toBeLessThan(4 * lagS.parameterSe);
    // the error model shares the log-determinant; one dense comparison keeps this check short
    expect(fitSpatialError(y, design, sparse).convergence.converged).toBe(true);
  });
});
