import { describe, expect, it } from 'vitest';
import { LuDecomposition, Matrix } from 'ml-matrix';
import { denseAlgebra } from '../src/linalg/dense-algebra.js';
import { csrMultiply } from '../src/linalg/csr.js';
import { solveShifted } from '../src/linalg/iterative.js';
import { fitOls, fitSpatialError, fitSpatialLag, lagImpacts, recommendModel } from '../src/models/index.js';
import type { Design, LmTests } from '../src/models/types.js';
import { normalSampler, seededRandom } from '../src/stats/random.js';
import { analyticRookAlgebra } from './helpers/analytic-rook.js';
import { rookGrid, toDenseRows } from './helpers/grid.js';

function design(n: number, seed: number): { x: Design; normal: () => number } {
  const normal = normalSampler(seededRandom(seed));
  const x1 = Float64Array.from({ length: n }, () => normal());
  const x2 = Float64Array.from({ length: n }, () => 2 * normal() + 1);
  return { x: { intercept: 0, names: ['constant', 'x1', 'x2'], columns: [new Float64Array(n).fill(1), x1, x2] }, normal };
}
const BETA = [1, 2, -1];
const xb = (x: Design): Float64Array => x.columns[0].map((_, i) => BETA.reduce((s, b, j) => s + b * x.columns[j][i], 0));

describe('ML lag recovers a simulated lag process (ρ = 0.6, 50×50 rook lattice, seeded)', () => {
  // y = (I − ρW)⁻¹(Xβ + ε), solved iteratively; W = C/4 with closed-form eigenvalues (identity)
  const algebra = analyticRookAlgebra(50, 50);
  const n = algebra.n;
  const { x, normal } = design(n, 42);
  const rhs = xb(x).map((v) => v + normal());
  const y = solveShifted(algebra.w, 0.6, rhs).x;
  const fit = fitSpatialLag(y, x, algebra);

  it('ρ and β within 3 standard errors of the truth', () => {
    expect(fit.convergence.converged).toBe(true);
    expect(fit.convergence.atBound).toBeUndefined();
    expect(Math.abs(fit.parameter - 0.6)).toBeLessThan(3 * fit.parameterSe);
    fit.coefficients.forEach((c, j) => expect(Math.abs(c.estimate - BETA[j])).toBeLessThan(3 * c.se));
    expect(Math.abs(fit.sigma2 - 1)).toBeLessThan(0.1);
  });

  it('residual equals y − ρWy − Xβ and the LR test favours the lag', () => {
    const wy = csrMultiply(algebra.w, y);
    const i = 17;
    const e = y[i] - fit.parameter * wy[i] - fit.coefficients.reduce((s, c, j) => s + c.estimate * x.columns[j][i], 0);
    expect(fit.residuals[i]).toBeCloseTo(e, 10);
    expect(fit.lr.p).toBeLessThan(1e-6);
  });
});

describe('ML error recovers a simulated error process (λ = 0.5, 40×40 lattice, seeded)', () => {
  const algebra = analyticRookAlgebra(40, 40);
  const { x, normal } = design(algebra.n, 8);
  const eps = Float64Array.from({ length: algebra.n }, () => normal());
  const u = solveShifted(algebra.w, 0.5, eps).x;
  const y = xb(x).map((v, i) => v + u[i]);
  const fit = fitSpatialError(y, x, algebra);

  it('λ and β within 3 standard errors of the truth', () => {
    expect(fit.convergence.converged).toBe(true);
    expect(Math.abs(fit.parameter - 0.5)).toBeLessThan(3 * fit.parameterSe);
    fit.coefficients.forEach((c, j) => expect(Math.abs(c.estimate - BETA[j])).toBeLessThan(3 * c.se));
  });
});

describe('lag model with ρ held at 0 is OLS', () => {
  const { w, base } = rookGrid(8, 9);
  const algebra = denseAlgebra(w, base);
  const { x, normal } = design(algebra.n, 3);
  const y = xb(x).map((v) => v + normal());
  const ols = fitOls(y, x);
  const fit = fitSpatialLag(y, x, algebra, ols, { fixedRho: 0 });

  it('same β, residuals, σ² (ML) and log-likelihood; LR = 0', () => {
    fit.coefficients.forEach((c, j) => expect(c.estimate).toBeCloseTo(ols.coefficients[j].estimate, 12));
    fit.residuals.forEach((e, i) => expect(e).toBeCloseTo(ols.residuals[i], 12));
    expect(fit.sigma2).toBeCloseTo(ols.sigma2ML, 12);
    expect(fit.logLik).toBeCloseTo(ols.logLik, 10);
    expect(fit.lr.stat).toBeCloseTo(0, 10);
  });
});

describe('impacts', () => {
  const { w, base } = rookGrid(10, 10);
  const algebra = denseAlgebra(w, base);
  const { x, normal } = design(algebra.n, 21);
  const y = solveShifted(w, 0.5, xb(x).map((v) => v + normal())).x;
  const fit = fitSpatialLag(y, x, algebra);

  it('direct = β tr(A⁻¹)/n and total = β/(1 − ρ) against an explicit inverse (ml-matrix LU)', () => {
    const rows = toDenseRows(w);
    const a = new Matrix(rows.map((r, i) => r.map((v, j) => (i === j ? 1 : 0) - fit.parameter * v)));
    const ainv = new LuDecomposition(a).solve(Matrix.eye(algebra.n));
    const res = lagImpacts(fit, x, algebra, { draws: 300, seed: 9 });
    expect(res.impacts.map((i) => i.name)).toEqual(['x1', 'x2']);
    res.impacts.forEach((imp, c) => {
      const b = fit.coefficients[c + 1].estimate;
      expect(imp.direct).toBeCloseTo((b * ainv.trace()) / algebra.n, 10);
      expect(imp.total).toBeCloseTo((b * ainv.sum()) / algebra.n, 10);
      expect(imp.indirect).toBeCloseTo(imp.total - imp.direct, 12);
      expect(imp.totalSe).toBeGreaterThan(0);
      expect(imp.directP).toBeGreaterThanOrEqual(0);
    });
  });

  it('same seed, same standard errors; another seed, slightly different ones', () => {
    const a = lagImpacts(fit, x, algebra, { draws: 200, seed: 4 });
    const b = lagImpacts(fit, x, algebra, { draws: 200, seed: 4 });
    const c = lagImpacts(fit, x, algebra, { draws: 200, seed: 5 });
    expect(a.impacts[0].directSe).toBe(b.impacts[0].directSe);
    expect(a.impacts[0].directSe).not.toBe(c.impacts[0].directSe);
    expect(Math.abs(a.impacts[0].directSe / c.impacts[0].directSe - 1)).toBeLessThan(0.3);
  });

  it('total for weights whose rows do not sum to one is the mean of (I − ρW)⁻¹1', () => {
    const { base: c } = rookGrid(6, 6);
    const scaled = { ...c, values: c.values.map((v) => v / 4) };
    const alg = denseAlgebra(scaled, null);
    const d = design(alg.n, 2);
    const yy = solveShifted(scaled, 0.4, xb(d.x).map((v) => v + d.normal())).x;
    const f = fitSpatialLag(yy, d.x, alg);
    const rows = toDenseRows(scaled);
    const a = new Matrix(rows.map((r, i) => r.map((v, j) => (i === j ? 1 : 0) - f.parameter * v)));
    const ainv = new LuDecomposition(a).solve(Matrix.eye(alg.n));
    const res = lagImpacts(f, d.x, alg, { draws: 50, seed: 1 });
    expect(res.impacts[0].total).toBeCloseTo((f.coefficients[1].estimate * ainv.sum()) / alg.n, 9);
  });
});

describe('model recommendation (decision rule of Anselin 2005 / Anselin & Rey 2014)', () => {
  const t = (p: number, stat = 1) => ({ stat, df: 1, p });
  const lm = (e: number, l: number, re: number, rl: number, reStat = 1, rlStat = 1): LmTests => ({
    error: t(e), lag: t(l), robustError: t(re, reStat), robustLag: t(rl, rlStat), joint: { stat: 1, df: 2, p: 0.5 },
  });
  it('applies each branch of the rule', () => {
    expect(recommendModel(lm(0.5, 0.5, 0.5, 0.5)).choice).toBe('ols');
    expect(recommendModel(lm(0.5, 0.01, 0.5, 0.5)).choice).toBe('lag');
    expect(recommendModel(lm(0.01, 0.5, 0.5, 0.5)).choice).toBe('error');
    expect(recommendModel(lm(0.01, 0.01, 0.5, 0.02)).choice).toBe('lag');
    expect(recommendModel(lm(0.01, 0.01, 0.02, 0.5)).choice).toBe('error');
    const both = recommendModel(lm(0.001, 0.001, 0.001, 0.0001, 7, 12));
    expect(both).toMatchObject({ choice: 'lag', bothKinds: true });
    expect(recommendModel(lm(0.001, 0.001, 0.5, 0.5)).choice).toBe('either');
    expect(recommendModel(lm(0.04, 0.5, 0.5, 0.5), 0.01).choice).toBe('ols');
    expect(recommendModel(lm(0.04, 0.5, 0.5, 0.5)).alpha).toBe(0.05);
  });
});
