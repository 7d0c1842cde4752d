// Numeric edge cases. References outside the product:
// - an exactly solvable near-collinear least-squares problem built from orthogonal Hadamard
//   columns (Sylvester construction), whose solution is known in exact arithmetic, plus ml-matrix's
//   SVD solve (a general-purpose library) on the same design;
// - equivariance of least squares and of the ML lag/error models under rescaling y and X
//   (β_j → β_j·s_y/s_j, ρ and λ unchanged, log-likelihood shifted by −n·ln s_y): identities;
// - a checkerboard outcome on a bipartite grid, for which the lag likelihood rises without bound
//   towards ρ = −1 (W s = −s for the ±1 pattern s, so ln|I − ρW| holds a ln(1 + ρ) term while
//   σ²(ρ) ∝ (1 + ρ)²): the optimiser must end at the lower bound and say so.
import { describe, expect, it } from 'vitest';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { fitOls, fitSpatialLag, fitSpatialError, denseAlgebra, type Design } from '../src/models/index.js';
import { brentMaximise } from '../src/models/brent.js';
import { buildWeights, symmetricForm, type SpatialWeights } from '../src/weights/index.js';
import { runAnalysis, type AnalysisResult } from '../src/pipeline/index.js';
import { buildReport } from '../src/report/index.js';
import { squareGrid } from './fixtures/weights/shapes.js';
import { csvFile, gridCollection, json, lcg } from './bad-inputs/make.js';

/** Sylvester's Hadamard matrix of order 2^m: columns are ±1 and mutually orthogonal. */
function hadamard(m: number): number[][] {
  let h = [[1]];
  for (let s = 0; s < m; s++) h = [...h.map((r) => [...r, ...r]), ...h.map((r) => [...r, ...r.map((v) => -v)])];
  return h;
}

function gridWeights(r: number, c: number, rule: 'queen' | 'rook' = 'rook'): SpatialWeights {
  const geometries = squareGrid(r, c);
  return buildWeights({ ids: geometries.map((_, i) => `a${i}`), geometries, coordinates: 'projected' }, { method: rule }, { transform: 'row' });
}

function normals(u: () => number, n: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
  return out;
}

/** y = (I − ρW)⁻¹(Xβ + ε) by fixed-point iteration (converges for |ρ| < 1 with row-standardised W). */
function lagData(w: SpatialWeights, xb: Float64Array, rho: number, eps: Float64Array): Float64Array {
  const base = xb.map((v, i) => v + eps[i]);
  let y = Float64Array.from(base);
  for (let it = 0; it < 5000; it++) {
    const next = new Float64Array(w.n);
    for (let i = 0; i < w.n; i++) {
      let s = 0;
      for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) s += w.values[p] * y[w.colIdx[p]];
      next[i] = base[i] + rho * s;
    }
    y = next;
  }
  return y;
}

describe('near-collinear design (condition number ≈ 1e8)', () => {
  // X = [h0, x1, x1 + δ·h3] with x1 = h1 + 2·h2 and δ = 2⁻²⁶; y = Xβ + c·h4. Every number is exact
  // in binary, and h4 ⊥ every column, so the least-squares solution is β exactly, residual c·h4.
  const h = hadamard(4); // 16 × 16
  const n = 16;
  const col = (j: number) => Float64Array.from(h, (r) => r[j]);
  const delta = 2 ** -26;
  const c = 2 ** -30; // small residual: keeps the cond²·tanθ term of the error bound below 1e-9
  const x1 = col(1).map((v, i) => v + 2 * col(2)[i]);
  const x2 = x1.map((v, i) => v + delta * col(3)[i]);
  const beta = [3, -2, 5];
  const x: Design = { intercept: 0, names: ['constant', 'x1', 'x2'], columns: [col(0), x1, x2] };
  const y = Float64Array.from({ length: n }, (_, i) => beta[0] + beta[1] * x1[i] + beta[2] * x2[i] + c * col(4)[i]);

  it('is solved to the exact answer within cond·ε, agrees with ml-matrix SVD, and carries a warning', () => {
    const fit = fitOls(y, x);
    expect(fit.conditionNumber).toBeGreaterThan(1e7);
    expect(fit.conditionNumber).toBeLessThan(1e9);
    expect(fit.warnings.join(' ')).toMatch(/condition number of the regressors is .* above 30/);
    fit.coefficients.forEach((co, j) => expect(Math.abs(co.estimate - beta[j])).toBeLessThan(1e-6 * 5));
    const rows = Array.from({ length: n }, (_, i) => x.columns.map((cc) => cc[i]));
    const svd = new SingularValueDecomposition(new Matrix(rows), { autoTranspose: true });
    const ref = svd.solve(Matrix.columnVector(Array.from(y))).to1DArray();
    fit.coefficients.forEach((co, j) => expect(Math.abs(co.estimate - ref[j])).toBeLessThan(1e-5));
    // the residual is c·h4 exactly in exact arithmetic
    fit.residuals.forEach((e, i) => expect(Math.abs(e - c * col(4)[i])).toBeLessThan(1e-12));
  });
});

describe('variables of magnitude 1e9 and 1e-9', () => {
  const w = gridWeights(6, 6, 'queen');
  const algebra = denseAlgebra(w, symmetricForm(w));
  const u = lcg(99);
  const n = w.n;
  const a = normals(u, n), b = normals(u, n).map((v) => v + 2);
  const y0 = lagData(w, a.map((v, i) => 1 + 2 * v - b[i]), 0.45, normals(u, n));
  const design = (sa: number, sb: number): Design => ({ intercept: 0, names: ['constant', 'a', 'b'], columns: [new Float64Array(n).fill(1), a.map((v) => v * sa), b.map((v) => v * sb)] });
  const SY = 1e9, SA = 1e-9, SB = 1e9;
  const unit = { y: y0, x: design(1, 1) };
  const scaled = { y: y0.map((v) => v * SY), x: design(SA, SB) };

  it('OLS: coefficients rescale exactly, fit statistics are unchanged', () => {
    const f1 = fitOls(unit.y, unit.x), f2 = fitOls(scaled.y, scaled.x);
    const factors = [SY, SY / SA, SY / SB];
    f1.coefficients.forEach((c, j) => {
      expect(f2.coefficients[j].estimate / factors[j]).toBeCloseTo(c.estimate, 9);
      expect(f2.coefficients[j].stat).toBeCloseTo(c.stat, 8);
    });
    expect(f2.r2).toBeCloseTo(f1.r2, 12);
    expect(f2.logLik).toBeCloseTo(f1.logLik - n * Math.log(SY), 7);
    expect(f2.warnings.join(' ')).not.toMatch(/condition number/); // scaling columns does not make them collinear
  });

  it('ML lag and error: ρ and λ unchanged, coefficients rescale', () => {
    for (const fitModel of [fitSpatialLag, fitSpatialError]) {
      const f1 = fitModel(unit.y, unit.x, algebra), f2 = fitModel(scaled.y, scaled.x, algebra);
      expect(f1.convergence.converged && f2.convergence.converged).toBe(true);
      expect(Math.abs(f2.parameter - f1.parameter)).toBeLessThan(1e-6);
      expect(f2.parameterSe).toBeCloseTo(f1.parameterSe, 5);
      const factors = [SY, SY / SA, SY / SB];
      f1.coefficients.forEach((c, j) => expect(f2.coefficients[j].estimate / factors[j] / c.estimate).toBeCloseTo(1, 5));
      expect(f2.logLik).toBeCloseTo(f1.logLik - n * Math.log(SY), 5);
    }
  });
});

describe('ρ near either end of its range', () => {
  const w = gridWeights(7, 7, 'rook'); // bipartite: the range is (−1, 1)
  const algebra = denseAlgebra(w, symmetricForm(w));
  for (const rho of [0.97, -0.9]) {
    it(`ρ = ${rho}: converges inside the range, finite standard error, and no nearby ρ beats the maximum`, () => {
      const u = lcg(rho > 0 ? 5 : 6);
      const xcol = normals(u, w.n);
      const x: Design = { intercept: 0, names: ['constant', 'x'], columns: [new Float64Array(w.n).fill(1), xcol] };
      const y = lagData(w, xcol.map((v) => 2 + 3 * v), rho, normals(u, w.n).map((v) => 0.5 * v));
      const fit = fitSpatialLag(y, x, algebra);
      expect(algebra.range.lower).toBeCloseTo(-1, 6);
      expect(fit.convergence.converged).toBe(true);
      expect(fit.convergence.atBound).toBeUndefined();
      expect(fit.parameter).toBeGreaterThan(algebra.range.lower);
      expect(fit.parameter).toBeLessThan(algebra.range.upper);
      expect(Math.sign(fit.parameter)).toBe(Math.sign(rho));
      expect(Math.abs(fit.parameter - rho)).toBeLessThan(0.25);
      expect(Number.isFinite(fit.parameterSe) && fit.parameterSe > 0).toBe(true);
      for (const eps of [1e-4, 1e-3]) {
        for (const at of [fit.parameter - eps, fit.parameter + eps]) {
          if (at <= algebra.range.lower || at >= algebra.range.upper) continue;
          expect(fitSpatialLag(y, x, algebra, undefined, { fixedRho: at }).logLik).toBeLessThanOrEqual(fit.logLik + 1e-9 * Math.abs(fit.logLik));
        }
      }
    });
  }
});

describe('an optimiser that hits a bound, or stops early, says so', () => {
  const R = 6, C = 6;
  const u = lcg(123);
  const codes = Array.from({ length: R * C }, (_, i) => `V${i + 1}`);
  const xv = normals(u, R * C);
  // checkerboard ±10 (+ noise of 1e-6; with noise of 1e-3 the maximum is interior, at ρ ≈ −0.99999) on a rook-bipartite grid of squares
  const yv = codes.map((_, i) => ((Math.floor(i / C) + (i % C)) % 2 ? 1 : -1) * 10 + 1e-6 * xv[(i + 7) % (R * C)]);
  let result: AnalysisResult;

  it('the lag model ends at the lower bound: Convergence.atBound, a warning, and a caution in the report', async () => {
    result = await runAnalysis({
      boundary: [json('cells.geojson', gridCollection({ rows: R, cols: C, x0: 400000, y0: 6000000, size: 1000, props: codes.map((code) => ({ code })) }))],
      data: csvFile('cells.csv', ['code', 'y', 'x'], codes.map((c, i) => [c, yv[i], xv[i]])),
      id: 'code', y: 'y', x: ['x'], weights: { method: 'rook' }, transform: 'row', models: ['ols', 'lag'], permutations: 0, impactDraws: 20,
    });
    const lag = result.fits.lag!;
    expect(lag.convergence.atBound).toBe('lower');
    expect(lag.parameter).toBeLessThan(-0.99);
    expect(lag.convergence.message).toMatch(/lower end of the admissible range/);
    expect(result.warnings.join(' ')).toMatch(/lower end of the admissible range/);
    const report = JSON.stringify(buildReport(result));
    expect(report).toMatch(/ended at the lower end of its admissible range/);
  });

  it('a search that runs out of iterations reports converged = false, a warning, and a caution', () => {
    const best = brentMaximise((r) => -((r - 0.3) ** 2), -1, 1, { maxIterations: 3 });
    expect(best.convergence.converged).toBe(false);
    expect(best.convergence.message).toMatch(/stopped after 3 iterations without meeting the tolerance/);
    const w = gridWeights(5, 5, 'queen');
    const algebra = denseAlgebra(w, symmetricForm(w));
    const x: Design = { intercept: 0, names: ['constant', 'x'], columns: [new Float64Array(25).fill(1), normals(lcg(8), 25)] };
    const y = lagData(w, x.columns[1].map((v) => 1 + v), 0.5, normals(lcg(9), 25));
    for (const fit of [fitSpatialLag(y, x, algebra, undefined, { maxIterations: 2 }), fitSpatialError(y, x, algebra, undefined, { maxIterations: 2 })]) {
      expect(fit.convergence.converged).toBe(false);
      expect(fit.warnings.join(' ')).toMatch(/without meeting the tolerance/);
    }
  });

  it('the report says so when a fit did not converge', () => {
    const failed = { ...result.fits.lag!, convergence: { converged: false, iterations: 2, tolerance: 0.5, message: 'Brent search stopped after 2 iterations without meeting the tolerance' } };
    const report = JSON.stringify(buildReport({ ...result, fits: { ...result.fits, lag: failed } }));
    expect(report).toMatch(/did not converge: Brent search stopped after 2 iterations/);
  });
});
