// What the engine says when the numbers do not behave: impacts without a positive-definite
// information matrix, iterative solves that stop short, the series log-determinant's bound quoted
// at the estimate, a variance term that is not positive, and far-tail F p-values. References: dense
// ml-matrix algebra, scipy.stats (values computed with scipy 1.x on this machine, printed beside
// each check), and identities named in place.
import { describe, expect, it } from 'vitest';
import { LuDecomposition, Matrix } from 'ml-matrix';
import type { WeightsAlgebra } from '../src/linalg/algebra.js';
import type { CsrMatrix } from '../src/linalg/csr.js';
import { bicgstabShifted, solveShifted } from '../src/linalg/iterative.js';
import { seededRandom } from '../src/linalg/random.js';
import { SeriesLogDet } from '../src/linalg/sparse/series-logdet.js';
import { denseAlgebra } from '../src/linalg/dense-algebra.js';
import { randomKnn } from '../bench/grid.js';
import { fitSpatialLag } from '../src/models/ml-lag.js';
import { lagImpacts } from '../src/models/impacts.js';
import { fUpper } from '../src/stats/distributions.js';
import { analyticRookAlgebra } from './helpers/analytic-rook.js';

function lagData(algebra: WeightsAlgebra, rho: number, seed: number) {
  const n = algebra.n;
  const u = seededRandom(seed);
  const normal = () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
  const x1 = new Float64Array(n).map(normal);
  const e = new Float64Array(n).map((_, i) => 1 + 2 * x1[i] + normal());
  const y = solveShifted(algebra.w, rho, e).x;
  return { y, design: { names: ['constant', 'x1'], columns: [new Float64Array(n).fill(1), x1], intercept: 0 } };
}

describe('impacts when the information matrix is not positive definite', () => {
  it('gives the estimates without standard errors and a warning, instead of throwing', () => {
    const algebra = analyticRookAlgebra(12, 12);
    const { y, design } = lagData(algebra, 0.5, 3);
    const fit = fitSpatialLag(y, design, algebra);
    const normal = lagImpacts(fit, design, algebra, { draws: 200 });
    // the fit of a non-positive-definite information matrix: NaN covariance (ml-lag's own fallback)
    const broken = { ...fit, covariance: new Float64Array(fit.covariance.length).fill(NaN) };
    const result = lagImpacts(broken, design, algebra, { draws: 200 });
    expect(result.impacts.map((m) => m.direct)).toEqual(normal.impacts.map((m) => m.direct));
    expect(result.impacts.map((m) => m.total)).toEqual(normal.impacts.map((m) => m.total));
    for (const m of result.impacts) {
      expect(m.directSe).toBeNaN();
      expect(m.totalP).toBeNaN();
    }
    expect(result.warnings?.join(' ')).toMatch(/without standard errors.*information matrix/);
    // an indefinite (β, ρ) block: the same fallback
    const indefinite = Float64Array.from(fit.covariance);
    indefinite[0] = -1;
    const again = lagImpacts({ ...fit, covariance: indefinite }, design, algebra, { draws: 200 });
    expect(again.impacts[0].directSe).toBeNaN();
    expect(again.warnings?.join(' ')).toMatch(/not positive definite/);
  });
});

describe('non-convergence is reported, never returned as convergence', () => {
  it('BiCGSTAB does not return at ω = 0: it finishes by GMRES and the answer solves the system', () => {
    // I − ρW = [[0, 1], [−1, 0]] with ρ = 1, W = [[1, −1], [1, 1]]: every t = As is orthogonal to s,
    // so the stabilising step gives ω = 0 at once (van der Vorst 1992, the breakdown case)
    const w: CsrMatrix = { n: 2, rowPtr: Int32Array.of(0, 2, 4), colIdx: Int32Array.of(0, 1, 0, 1), values: Float64Array.of(1, -1, 1, 1) };
    const b = Float64Array.of(1, 2);
    const r = bicgstabShifted(w, 1, b);
    expect(r.converged).toBe(true);
    // A x = b with A = [[0, 1], [−1, 0]]: x = (−2, 1)
    expect(r.x[0]).toBeCloseTo(-2, 12);
    expect(r.x[1]).toBeCloseTo(1, 12);
  });

  it('an iteration limit too small is reported as not converged, with the residual reached', () => {
    const g = randomKnn(400, 5, 2);
    const b = new Float64Array(400).map((_, i) => Math.sin(i));
    const bi = bicgstabShifted(g.w, 0.95, b, undefined, { maxIterations: 2 });
    expect(bi.converged).toBe(false);
    expect(bi.relativeResidual).toBeGreaterThan(1e-12);
    const gm = solveShifted(g.w, 0.95, b, { maxIterations: 3 });
    expect(gm.converged).toBe(false);
    expect(gm.relativeResidual).toBeGreaterThan(1e-9);
  });

  it('the lag fit passes an unconverged trace solve on as a warning', () => {
    const base = analyticRookAlgebra(10, 10);
    const algebra: WeightsAlgebra = { ...base, traces: (rho) => ({ ...base.traces(rho), unconverged: '3 of the iterative solves stopped short' }) };
    const { y, design } = lagData(base, 0.4, 9);
    const fit = fitSpatialLag(y, design, algebra);
    expect(fit.warnings.join(' ')).toMatch(/3 of the iterative solves stopped short/);
  });
});

describe('the test for remaining error dependence with a variance term that is not positive', () => {
  it('is not reported (NaN, with a warning) rather than given p = 1', () => {
    const base = analyticRookAlgebra(10, 10);
    const { y, design } = lagData(base, 0.4, 4);
    // T₂₂ far too small: T₂₂ − T₂₁² Var ρ̂ < 0
    const fit = fitSpatialLag(y, design, { ...base, lmTrace: 1e-9 });
    expect(fit.lmRemainingError!.stat).toBeNaN();
    expect(fit.lmRemainingError!.p).toBeNaN();
    expect(fit.warnings.join(' ')).toMatch(/variance term .* is not positive/);
  });
});

describe('the Monte Carlo series as the log-determinant', () => {
  const g = randomKnn(300, 5, 21);
  const W = Matrix.zeros(300, 300);
  for (let i = 0; i < 300; i++) for (let p = g.w.rowPtr[i]; p < g.w.rowPtr[i + 1]; p++) W.set(i, g.w.colIdx[p], g.w.values[p]);

  it('quotes its error bound at the estimate, never at values outside its radius', () => {
    const series = new SeriesLogDet(g.w, { terms: 100, probes: 32, seed: 3, exactBudget: 0 });
    expect(series.accuracy).not.toMatch(/Infinity/);
    expect(series.accuracyAt(1.2)).toMatch(/does not converge/);
    const full = denseAlgebra(g.w, null);
    const algebra: WeightsAlgebra = { ...full, logdet: series };
    const { y, design } = lagData(full, 0.5, 12);
    const fit = fitSpatialLag(y, design, algebra);
    const exact = fitSpatialLag(y, design, full);
    expect(fit.logDeterminantMethod).toMatch(new RegExp(`95% error bound ±[0-9.e-]+ on ln\\|I − ρW\\| at ρ = ${fit.parameter.toPrecision(6).replace('.', '\\.')}`));
    expect(fit.logDeterminantMethod).not.toMatch(/Infinity/);
    // the bound holds at ρ̂ against ml-matrix's LU determinant
    const lu = new LuDecomposition(Matrix.eye(300).sub(W.clone().mul(fit.parameter)));
    let want = 0;
    for (let i = 0; i < 300; i++) want += Math.log(Math.abs(lu.upperTriangularMatrix.get(i, i)));
    expect(Math.abs(series.evaluate(fit.parameter) - want)).toBeLessThan(series.errorBound(fit.parameter));
    expect(Math.abs(fit.parameter - exact.parameter)).toBeLessThan(0.01);
  });
});

describe('F upper tail taken directly', () => {
  it('keeps its digits far in the tail (scipy.stats.f.sf, computed on this machine)', () => {
    const cases: [number, number, number, number][] = [
      [2.5, 3, 45, 0.07151117912530197],
      [0.5, 2, 10, 0.6209213230591552],
      [50, 2, 45, 3.6855432298808696e-12],
      [400, 3, 100, 1.552320654898615e-55], // 1 − cdf gave 0
      [1e4, 2, 10, 3.117199205091784e-17], // 1 − cdf gave 0
      [28.385629224695222, 2, 46, 9.340747100509286e-09], // the Columbus regression's F test
    ];
    for (const [f, d1, d2, want] of cases) expect(Math.abs(fUpper(f, d1, d2) - want)).toBeLessThan(1e-10 * want);
  });
});

describe('a pivot that fails inside the admissible range, with no dense LU behind it', () => {
  it('confines the search to where the LU without pivoting is stable and says so, instead of failing', async () => {
    const { PivotError } = await import('../src/linalg/sparse/lu-front.js');
    const base = analyticRookAlgebra(10, 10);
    const { y, design } = lagData(base, -0.2, 6);
    // an algebra whose exact log-determinant meets a non-positive pivot below ρ = −1/λmax = −0.35
    // (as the sparse LU may), while the admissible range reaches lower
    const limit = -0.35;
    const algebra: WeightsAlgebra = {
      ...base,
      logdet: { ...base.logdet, evaluate: (rho: number) => { if (rho < limit) throw new PivotError(3); return base.logdet.evaluate(rho); } },
      range: { ...base.range, eigenMax: -1 / limit },
    };
    const fit = fitSpatialLag(y, design, algebra);
    const exact = fitSpatialLag(y, design, base);
    expect(Math.abs(fit.parameter - exact.parameter)).toBeLessThan(1e-6); // ρ̂ = −0.2 lies inside the stable part
    expect(fit.warnings.join(' ')).toMatch(/search was confined/);
    const errorFit = (await import('../src/models/ml-error.js')).fitSpatialError(y, design, algebra);
    expect(errorFit.warnings.join(' ')).toMatch(/search was confined/);
  });
});
