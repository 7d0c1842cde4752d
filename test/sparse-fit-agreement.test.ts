/**
 * The large-n route reaches the same estimates as the dense one. References outside the project:
 * ml-matrix (a general-purpose linear algebra library) for dense inverses and eigenvalues, and
 * mathematical identities — the dense algebra computes ln|I − ρW| = Σ ln(1 − ρω_i) from all
 * eigenvalues (Ord 1975), the sparse one from a Cholesky or LU factor, so the maximisers of one
 * likelihood must agree; Hutchinson's estimator (Hutchinson 1990) is unbiased with the reported
 * standard error, so estimates lie within a few standard errors (4σ: common practice).
 */
import { describe, expect, it } from 'vitest';
import { Matrix, inverse } from 'ml-matrix';
import { randomGeometric, randomKnn, rookGrid } from '../bench/grid.js';
import { csrMultiply, type CsrMatrix } from '../src/linalg/csr.js';
import { denseAlgebra } from '../src/linalg/dense-algebra.js';
import { sparseAlgebra } from '../src/linalg/sparse/sparse-algebra.js';
import { LanczosQuadrature } from '../src/linalg/sparse/quadrature.js';
import { symmetricForm } from '../src/linalg/symmetric-form.js';
import { fitSpatialError, fitSpatialLag } from '../src/models/index.js';
import type { Design } from '../src/models/types.js';
import { normalSampler, seededRandom } from '../src/linalg/random.js';
import type { WeightsAlgebra } from '../src/linalg/algebra.js';

/** Seeded normals for the test data, from the engine's one generator. */
function generator(seed: number) {
  return normalSampler(seededRandom(seed));
}

/** y = (I − ρW)⁻¹(1 + 2x₁ − x₂ + ε) by the Neumann series (ρ^200 is below rounding for |ρ| ≤ 0.8). */
function lagProcess(w: CsrMatrix, rho: number, seed: number): { y: Float64Array; design: Design } {
  const n = w.n;
  const normal = generator(seed);
  const x1 = new Float64Array(n).map(normal), x2 = new Float64Array(n).map(normal);
  const base = new Float64Array(n).map((_, i) => 1 + 2 * x1[i] - x2[i] + normal());
  const y = base.slice();
  let term = base.slice();
  const next = new Float64Array(n);
  for (let k = 0; k < 200; k++) {
    csrMultiply(w, term, next);
    for (let i = 0; i < n; i++) { term[i] = rho * next[i]; y[i] += term[i]; }
  }
  return { y, design: { intercept: 0, names: ['constant', 'x1', 'x2'], columns: [new Float64Array(n).fill(1), x1, x2] } };
}

/** The same algebra without its cheap log-determinant: every step of the search is exact. */
const allExact = (a: WeightsAlgebra): WeightsAlgebra => ({ ...a, roughLogdet: undefined, traces: a.traces, powerTraces: a.powerTraces, solve: a.solve });

describe('sparse and dense routes give the same estimates (to 1e-7)', () => {
  it('symmetric form: rook grid 25×24 and an irregular graph of 600 areas, lag and error', () => {
    for (const g of [rookGrid(25, 24), randomGeometric(600, 0.065, 8)]) {
      const { y, design } = lagProcess(g.w, 0.6, 3);
      const dense = denseAlgebra(g.w, g.s);
      const sparse = sparseAlgebra(g.w, g.s, { coordinates: { x: g.x, y: g.y } });
      expect(sparse.logdet.method).toMatch(/sparse Cholesky/);
      expect(sparse.roughLogdet).toBeDefined();
      const lagD = fitSpatialLag(y, design, dense), lagS = fitSpatialLag(y, design, sparse);
      expect(Math.abs(lagS.parameter - lagD.parameter)).toBeLessThan(1e-7);
      expect(lagS.convergence.message).toMatch(/polished with \d+ exact evaluations/);
      const errD = fitSpatialError(y, design, dense), errS = fitSpatialError(y, design, sparse);
      expect(Math.abs(errS.parameter - errD.parameter)).toBeLessThan(1e-7);
      expect(Math.abs(lagS.logLik - lagD.logLik)).toBeLessThan(1e-8 * Math.abs(lagD.logLik));
    }
  });

  it('no symmetric form: k-nearest neighbours (k = 5, 400 areas), exact LU against complex eigenvalues', () => {
    const knn = randomKnn(400, 5, 12);
    const { y, design } = lagProcess(knn.w, 0.5, 4);
    const dense = denseAlgebra(knn.w, null);
    const sparse = sparseAlgebra(knn.w, null);
    expect(sparse.logdet.method).toMatch(/exact, sparse LU/);
    for (const rho of [-0.5, 0.3, 0.9]) {
      expect(Math.abs(sparse.logdet.evaluate(rho) - dense.logdet.evaluate(rho))).toBeLessThan(1e-9 * Math.max(1, Math.abs(dense.logdet.evaluate(rho))));
    }
    expect(Math.abs(fitSpatialLag(y, design, sparse).parameter - fitSpatialLag(y, design, dense).parameter)).toBeLessThan(1e-7);
    expect(Math.abs(fitSpatialError(y, design, sparse).parameter - fitSpatialError(y, design, dense).parameter)).toBeLessThan(1e-7);
  });

  it('bracket-and-polish equals the all-exact Brent search on the same log-determinant', () => {
    const g = rookGrid(60, 70);
    const alg = sparseAlgebra(g.w, g.s, { coordinates: { x: g.x, y: g.y } });
    for (const [rho, seed] of [[0.3, 1], [0.75, 2], [-0.4, 3]] as const) {
      const { y, design } = lagProcess(g.w, rho, seed);
      const polished = fitSpatialLag(y, design, alg), plain = fitSpatialLag(y, design, allExact(alg));
      expect(plain.convergence.message).toMatch(/Brent/);
      expect(Math.abs(polished.parameter - plain.parameter)).toBeLessThan(1e-7);
      const polishedE = fitSpatialError(y, design, alg), plainE = fitSpatialError(y, design, allExact(alg));
      expect(Math.abs(polishedE.parameter - plainE.parameter)).toBeLessThan(1e-7);
    }
  });
});

describe('recovery at scale through the sparse route', () => {
  it('a seeded lag process on a 200×200 rook grid (ρ = 0.5) is recovered within 3 standard errors', () => {
    const g = rookGrid(200, 200);
    const { y, design } = lagProcess(g.w, 0.5, 99);
    const alg = sparseAlgebra(g.w, g.s, { coordinates: { x: g.x, y: g.y } });
    const fit = fitSpatialLag(y, design, alg);
    expect(Math.abs(fit.parameter - 0.5)).toBeLessThan(3 * fit.parameterSe);
    const truth = [1, 2, -1];
    fit.coefficients.forEach((c, j) => expect(Math.abs(c.estimate - truth[j])).toBeLessThan(3 * c.se));
    expect(fit.parameterSe).toBeGreaterThan(0);
  });
});

describe('stochastic traces stay within their stated standard errors', () => {
  const g = rookGrid(14, 15);
  const W = new Matrix(g.w.n, g.w.n);
  for (let i = 0; i < g.w.n; i++) for (let p = g.w.rowPtr[i]; p < g.w.rowPtr[i + 1]; p++) W.set(i, g.w.colIdx[p], g.w.values[p]);

  it('cross traces tr WᵀG and tr WG, exact and estimated, against dense ml-matrix products', () => {
    const rho = 0.7;
    const G = W.mmul(inverse(Matrix.eye(g.w.n).sub(W.clone().mul(rho))));
    const wtg = W.transpose().mmul(G).trace(), wg = W.mmul(G).trace();
    const exact = sparseAlgebra(g.w, g.s).traces(rho);
    expect(Math.abs(exact.trWtG! - wtg)).toBeLessThan(1e-9 * Math.abs(wtg));
    expect(Math.abs(exact.trWG! - wg)).toBeLessThan(1e-9 * Math.abs(wg));
  });

  it('Lanczos quadrature: tr(I − ρS)⁻¹ and ln|I − ρS| within 4 standard errors of the exact values', () => {
    const form = symmetricForm(g.w, g.s)!;
    const q = new LanczosQuadrature(form.s, { probes: 40, steps: 30, seed: 9 });
    const dense = denseAlgebra(g.w, g.s);
    for (const rho of [0.5, 0.9, -0.6]) {
      const inv = q.trace((t) => 1 / (1 - rho * t));
      expect(Math.abs(inv.value - dense.traces(rho).trAinv)).toBeLessThan(4 * inv.se);
      expect(q.traceInverse(rho)).toBeCloseTo(inv.value, 9);
      const ld = q.trace((t) => Math.log(1 - rho * t));
      expect(Math.abs(ld.value - dense.logdet.evaluate(rho))).toBeLessThan(4 * ld.se);
    }
    // power traces from the same nodes (Gauss quadrature is exact per probe up to degree 2·steps − 1)
    const pt = q.powerTraces(4);
    const exact2 = dense.powerTraces(2)[1];
    expect(Math.abs(pt.traces[1] - exact2)).toBeLessThan(4 * pt.errors[1] + 1e-9);
  });
});
