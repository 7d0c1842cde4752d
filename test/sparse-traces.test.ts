/**
 * Traces, power traces, the Monte Carlo series log-determinant and the chooser, against dense
 * references from ml-matrix (a general-purpose linear algebra library): A = I − ρW, A⁻¹ and
 * G = W A⁻¹ formed densely, determinants from its LU decomposition.
 */
import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, LuDecomposition, Matrix, inverse } from 'ml-matrix';
import { randomGeometric, randomKnn, rookGrid } from '../bench/grid.js';
import type { CsrMatrix } from '../src/linalg/csr.js';
import { SparseCholeskyLogDet } from '../src/linalg/sparse/cholesky-logdet.js';
import { CholeskyTraces } from '../src/linalg/sparse/traces.js';
import { GeneralTraces } from '../src/linalg/sparse/general-traces.js';
import { powerTraces } from '../src/linalg/sparse/power-traces.js';
import { SeriesLogDet } from '../src/linalg/sparse/series-logdet.js';
import { symmetricForm } from '../src/linalg/symmetric-form.js';
import { chooseAlgebra, sparseAlgebra } from '../src/linalg/choose-algebra.js';

function dense(a: CsrMatrix): Matrix {
  const m = Matrix.zeros(a.n, a.n);
  for (let i = 0; i < a.n; i++) for (let p = a.rowPtr[i]; p < a.rowPtr[i + 1]; p++) m.set(i, a.colIdx[p], a.values[p]);
  return m;
}

function denseTraces(w: CsrMatrix, rho: number) {
  const W = dense(w);
  const Ainv = inverse(Matrix.eye(w.n).sub(W.clone().mul(rho)));
  const G = W.mmul(Ainv);
  return { trG: G.trace(), trG2: G.mmul(G).trace(), trGtG: G.transpose().mmul(G).trace(), trAinv: Ainv.trace() };
}

function densePowerTraces(w: CsrMatrix, count: number): number[] {
  const W = dense(w);
  let P = W.clone();
  const out: number[] = [];
  for (let k = 1; k <= count; k++) { out.push(P.trace()); P = P.mmul(W); }
  return out;
}

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(1e-300, Math.abs(b));

describe('traces through the sparse Cholesky factor', () => {
  const g = rookGrid(12, 14);
  const form = symmetricForm(g.w, g.s)!;
  const ld = new SparseCholeskyLogDet(form.s, { coordinates: { x: g.x, y: g.y } });

  it('exact traces equal dense ones (row-standardised rook grid, W not symmetric)', () => {
    const exact = new CholeskyTraces(ld, form.s, form.t, { exactBudget: Infinity });
    expect(exact.exact).toBe(true);
    for (const rho of [0.6, -0.5, 0.95]) {
      const got = exact.traces(rho);
      const want = denseTraces(g.w, rho);
      for (const key of ['trG', 'trG2', 'trGtG', 'trAinv'] as const) expect(rel(got[key], want[key])).toBeLessThan(1e-9);
    }
  });

  it('Hutchinson estimates lie within 4 standard errors of the exact traces (4σ: common practice)', () => {
    const est = new CholeskyTraces(ld, form.s, form.t, { exactBudget: 0, probes: 200, seed: 5 });
    expect(est.exact).toBe(false);
    for (const rho of [0.6, -0.5]) {
      const got = est.traces(rho);
      const errors = est.lastErrors!;
      const want = denseTraces(g.w, rho);
      for (const key of ['trG', 'trG2', 'trGtG', 'trAinv'] as const) {
        expect(errors[key]).toBeGreaterThan(0);
        expect(Math.abs(got[key] - want[key])).toBeLessThan(4 * errors[key]);
      }
    }
    expect(est.describe()).toMatch(/standard errors/);
  });

  it('accepts the symmetric base C of W = D⁻¹C as well as S', () => {
    // C binary: W_ij = 1/d_i on links
    const c: CsrMatrix = { ...g.w, values: new Float64Array(g.w.values.length).fill(1) };
    const viaBase = symmetricForm(g.w, c)!;
    for (let p = 0; p < g.s.values.length; p++) expect(viaBase.s.values[p]).toBeCloseTo(g.s.values[p], 14);
  });
});

describe('power traces tr(Wᵏ)', () => {
  const g = rookGrid(9, 11);
  const want = densePowerTraces(g.w, 12);

  it('are exact from unit vectors for small n', () => {
    const got = powerTraces(g.w, g.s, 12, 1, 10);
    expect(got.exact).toBe(true);
    for (let k = 0; k < 12; k++) expect(Math.abs(got.traces[k] - want[k])).toBeLessThan(1e-9 * Math.max(1, Math.abs(want[k])));
  });

  it('stochastic estimates lie within 4 standard errors; tr W and tr W² exact', () => {
    for (const sym of [g.s, null]) {
      const got = powerTraces(g.w, sym, 12, 9, 300, 0);
      expect(got.exact).toBe(false);
      expect(got.traces[0]).toBeCloseTo(0, 12);
      expect(rel(got.traces[1], want[1])).toBeLessThan(1e-12);
      for (let k = 2; k < 12; k++) expect(Math.abs(got.traces[k] - want[k])).toBeLessThan(4 * got.errors[k] + 1e-9);
    }
  });
});

describe('k-nearest neighbours (no symmetric form)', () => {
  const knn = randomKnn(300, 5, 21);
  const W = dense(knn.w);

  it('the Monte Carlo series stays within its stated 95% bound of the LU determinant', () => {
    const ld = new SeriesLogDet(knn.w, { terms: 100, probes: 64, seed: 3, exactBudget: 0 });
    for (const rho of [0.3, 0.7, -0.6, 0.9]) {
      const lu = new LuDecomposition(Matrix.eye(300).sub(W.clone().mul(rho)));
      let want = 0;
      for (let i = 0; i < 300; i++) want += Math.log(Math.abs(lu.upperTriangularMatrix.get(i, i)));
      const bound = ld.errorBound(rho);
      expect(Math.abs(ld.evaluate(rho) - want)).toBeLessThan(bound);
      expect(bound).toBeLessThan(0.05 * Math.abs(want) + 1); // the bound is informative, not vacuous
    }
    expect(ld.accuracy).toMatch(/95%/);
  });

  it('exact traces from iterative solves equal dense ones', () => {
    const tr = new GeneralTraces(knn.w);
    expect(tr.exact).toBe(true);
    const got = tr.traces(0.7);
    const want = denseTraces(knn.w, 0.7);
    for (const key of ['trG', 'trG2', 'trGtG', 'trAinv'] as const) expect(rel(got[key], want[key])).toBeLessThan(1e-8);
  });

  it('range is (1/λmin, 1) for row-standardised W, λmin the most negative real eigenvalue (ml-matrix, all eigenvalues)', () => {
    const alg = sparseAlgebra(knn.w, null);
    const evd = new EigenvalueDecomposition(W);
    let min = Infinity;
    evd.realEigenvalues.forEach((r, i) => { if (Math.abs(evd.imaginaryEigenvalues[i]) < 1e-10) min = Math.min(min, r); });
    // never inside the true range (an estimate must never be cut off), and within the Arnoldi run's
    // stated 1e-7 (relative; src/linalg/sparse/arnoldi.ts) of it
    expect(alg.range.lower).toBeLessThanOrEqual(1 / min + 1e-12);
    expect(alg.range.lower).toBeGreaterThan((1 / min) * (1 + 2e-7));
    expect(alg.range.lower).toBeLessThan(-1); // wider than the (−1, 1) of the spectral radius
    expect(alg.range.upper).toBe(1);
    // the exact sparse LU, cheap enough at 300 areas that no series brackets ρ first
    expect(alg.logdet.method).toMatch(/exact, sparse LU/);
    expect(alg.roughLogdet).toBeUndefined();
  });
});

describe('chooser', () => {
  it('dense and sparse algebras agree on an irregular graph; lmTrace = tr(WᵀW + WW)', () => {
    const g = randomGeometric(400, 0.08, 4);
    const d = chooseAlgebra(g.w, g.s); // n ≤ 2,000: dense
    const s = chooseAlgebra(g.w, g.s, { method: 'sparse', coordinates: { x: g.x, y: g.y } });
    expect(s.logdet.method).toMatch(/sparse Cholesky/);
    expect(d.logdet.method).not.toMatch(/sparse Cholesky/);
    for (const rho of [0.2, 0.8, -0.5]) expect(rel(s.logdet.evaluate(rho), d.logdet.evaluate(rho))).toBeLessThan(1e-9);
    const Wd = dense(g.w);
    const T = Wd.transpose().mmul(Wd).add(Wd.mmul(Wd)).trace();
    expect(rel(s.lmTrace, T)).toBeLessThan(1e-12);
    expect(s.range.upper).toBe(1);
    expect(Math.abs(s.range.lower - d.range.lower)).toBeLessThan(1e-6);
    const ts = s.traces(0.5), td = d.traces(0.5);
    for (const key of ['trG', 'trG2', 'trGtG', 'trAinv'] as const) expect(rel(ts[key], td[key])).toBeLessThan(1e-8);
    const ps = s.powerTraces(6), pd = d.powerTraces(6);
    for (let k = 0; k < 6; k++) expect(Math.abs(ps[k] - pd[k])).toBeLessThan(1e-8 * Math.max(1, Math.abs(pd[k])));
  });
});
