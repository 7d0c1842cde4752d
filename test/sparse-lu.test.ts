/**
 * The exact sparse LU log-determinant for weights without a symmetric form (k-nearest neighbours),
 * against references from outside the sparse code: ml-matrix's dense LU determinant and solve and
 * its dense inverse (a general-purpose linear algebra library), and the ML lag estimate obtained
 * with the dense LU log-determinant at every step.
 */
import { describe, expect, it } from 'vitest';
import { LuDecomposition, Matrix, inverse } from 'ml-matrix';
import { randomKnn } from '../bench/grid.js';
import { csrMultiply, type CsrMatrix } from '../src/linalg/csr.js';
import { SparseLuLogDet } from '../src/linalg/sparse/lu-logdet.js';
import { GeneralTraces } from '../src/linalg/sparse/general-traces.js';
import { DenseLuLogDet } from '../src/linalg/dense-lu-logdet.js';
import { sparseAlgebra } from '../src/linalg/sparse/sparse-algebra.js';
import type { WeightsAlgebra } from '../src/linalg/algebra.js';
import { fitSpatialError, fitSpatialLag } from '../src/models/index.js';
import { seededRandom } from '../src/linalg/random.js';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(1e-300, Math.abs(b));

function shifted(w: CsrMatrix, rho: number): Matrix {
  const a = Matrix.eye(w.n);
  for (let i = 0; i < w.n; i++) for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) a.set(i, w.colIdx[p], a.get(i, w.colIdx[p]) - rho * w.values[p]);
  return a;
}

function denseLogdet(w: CsrMatrix, rho: number): number {
  return Math.log(Math.abs(new LuDecomposition(shifted(w, rho)).determinant));
}

/** tr A⁻¹, tr G, tr G², tr GᵀG with A = I − ρW and G = W A⁻¹, formed densely. */
function denseTraces(w: CsrMatrix, rho: number) {
  const Ainv = inverse(shifted(w, rho));
  const W = Matrix.eye(w.n).sub(shifted(w, 1));
  const G = W.mmul(Ainv);
  return { trG: G.trace(), trG2: G.mmul(G).trace(), trGtG: G.transpose().mmul(G).trace(), trAinv: Ainv.trace() };
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

  it('solves with the kept factor equal ml-matrix\'s dense LU solve (1e-10 relative), one right-hand side and a block of three', () => {
    const g = randomKnn(700, 6, 8);
    const lu = new SparseLuLogDet(g.w, { coordinates: { x: g.x, y: g.y } });
    const u = seededRandom(4);
    for (const rho of [-0.8, 0.45, 0.97]) {
      const dense = new LuDecomposition(shifted(g.w, rho));
      const b = new Float64Array(3 * g.w.n).map(() => u() - 0.5);
      const B = new Matrix(g.w.n, 3);
      for (let i = 0; i < g.w.n; i++) for (let c = 0; c < 3; c++) B.set(i, c, b[i * 3 + c]);
      const want = dense.solve(B);
      const block = lu.solveBlock(rho, b, 3, new Float64Array(b.length));
      const one = lu.solve(rho, Float64Array.from(want.getColumn(0), (_, i) => b[i * 3]));
      let scale = 0, err = 0;
      for (let i = 0; i < g.w.n; i++) {
        for (let c = 0; c < 3; c++) { scale = Math.max(scale, Math.abs(want.get(i, c))); err = Math.max(err, Math.abs(block[i * 3 + c] - want.get(i, c))); }
        err = Math.max(err, Math.abs(one[i] - want.get(i, 0)));
      }
      expect(err / scale).toBeLessThan(1e-10);
    }
  });

  it('a factor too large to keep (over 512 MB) gives the same log-determinants and leaves the solves to the iterative route', () => {
    const g = randomKnn(700, 6, 8);
    const kept = new SparseLuLogDet(g.w, { coordinates: { x: g.x, y: g.y } });
    // the limit is a size; a small matrix stands in for a large one by being told it may not keep
    const unkept = Object.assign(new SparseLuLogDet(g.w, { coordinates: { x: g.x, y: g.y } }), { keepsFactor: false });
    for (const rho of [-0.6, 0.4, 0.9]) expect(unkept.evaluate(rho)).toBe(kept.evaluate(rho));
    expect(() => unkept.solve(0.4, new Float64Array(700))).toThrow(/too large to keep/);
  });

  it('traces through the LU factor: exact ones equal the dense inverse\'s (1e-9), Hutchinson estimates lie within 4 standard errors (4σ: common practice)', () => {
    const g = randomKnn(400, 5, 12);
    const lu = new SparseLuLogDet(g.w, { coordinates: { x: g.x, y: g.y } });
    const exact = new GeneralTraces(g.w, { direct: lu });
    const estimated = new GeneralTraces(g.w, { direct: lu, exactBudget: 0, probes: 200, seed: 5 });
    expect(exact.exact).toBe(true);
    expect(exact.describe()).toMatch(/sparse LU/);
    expect(estimated.exact).toBe(false);
    for (const rho of [0.6, -0.5]) {
      const want = denseTraces(g.w, rho);
      const got = exact.traces(rho), est = estimated.traces(rho), errors = estimated.lastErrors!;
      for (const key of ['trG', 'trG2', 'trGtG', 'trAinv'] as const) {
        expect(rel(got[key], want[key])).toBeLessThan(1e-9);
        expect(errors[key]).toBeGreaterThan(0);
        expect(Math.abs(est[key] - want[key])).toBeLessThan(4 * errors[key]);
      }
    }
    expect(estimated.describe()).toMatch(/solves with the sparse LU factor; standard errors/);
  });

  it('serves the algebra above 1,500 areas for row-standardised and for binary weights (W ≥ 0: an H-matrix for |ρ|λmax < 1)', () => {
    const g = randomKnn(1550, 6, 5);
    const alg = sparseAlgebra(g.w, null, { coordinates: { x: g.x, y: g.y } });
    expect(alg.logdet.method).toMatch(/exact, sparse LU/);
    expect(alg.logdet.accuracy).toMatch(/exact/);
    // one evaluation is cheap here (well under 2e7 multiply-adds): the exact search needs no series
    expect(alg.roughLogdet).toBeUndefined();
    // binary k-nearest weights used to fall back to the series; now the exact LU serves them too,
    // checked against the dense LU with partial pivoting (its own check: ml-matrix, above)
    const binary: CsrMatrix = { ...g.w, values: new Float64Array(g.w.values.length).fill(1) };
    const b = sparseAlgebra(binary, null);
    expect(b.logdet.method).toMatch(/exact, sparse LU.*H-matrix for \|ρ\| < 0\.166667/);
    expect(b.range.upper).toBeCloseTo(1 / 6, 14);
    const denseLu = new DenseLuLogDet(binary);
    for (const rho of [0.1, 0.16, -0.1]) expect(rel(b.logdet.evaluate(rho), denseLu.evaluate(rho))).toBeLessThan(1e-10);
  });

  it('gives the lag estimate of the dense LU at every step to 1e-7 (1,550 areas, 6 nearest neighbours)', () => {
    const g = randomKnn(1550, 6, 5);
    const n = g.w.n;
    const u = seededRandom(21);
    const normal = () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
    const x1 = new Float64Array(n).map(normal);
    const base = new Float64Array(n).map((_, i) => 1 + 2 * x1[i] + normal());
    const y = base.slice();
    const term = base.slice(), next = new Float64Array(n);
    for (let it = 0; it < 200; it++) { csrMultiply(g.w, term, next); for (let i = 0; i < n; i++) { term[i] = 0.6 * next[i]; y[i] += term[i]; } }
    const design = { intercept: 0, names: ['constant', 'x1'], columns: [new Float64Array(n).fill(1), x1] };
    const sparse = sparseAlgebra(g.w, null, { coordinates: { x: g.x, y: g.y } });
    const dense: WeightsAlgebra = Object.assign(Object.create(sparse) as WeightsAlgebra, { logdet: new DenseLuLogDet(g.w), roughLogdet: undefined });
    const lagS = fitSpatialLag(y, design, sparse), lagD = fitSpatialLag(y, design, dense);
    expect(Math.abs(lagS.parameter - lagD.parameter)).toBeLessThan(1e-7);
    // the standard errors come from exact traces through the LU factor (checked against the dense inverse above)
    expect(sparse.traceMethod).toMatch(/exact, one sparse LU solve per area/);
    expect(Math.abs(lagS.parameter - 0.6)).toBeLessThan(4 * lagS.parameterSe);
    // the error model shares the log-determinant; one dense comparison keeps this check short
    expect(fitSpatialError(y, design, sparse).convergence.converged).toBe(true);
  });
});
