import { describe, expect, it } from 'vitest';
import { Matrix, SingularValueDecomposition, solve } from 'ml-matrix';
import { InputError } from '../src/errors.js';
import { fitOls } from '../src/models/index.js';
import type { Design } from '../src/models/types.js';
import { conditionNumber } from '../src/stats/index.js';
import { normalSampler, seededRandom } from '../src/stats/random.js';

function randomDesign(n: number, k: number, seed: number): { y: Float64Array; x: Design } {
  const normal = normalSampler(seededRandom(seed));
  const columns = [new Float64Array(n).fill(1)];
  for (let j = 1; j < k; j++) columns.push(Float64Array.from({ length: n }, () => normal() * (j + 1) + j));
  const y = Float64Array.from({ length: n }, (_, i) => 2 + columns.slice(1).reduce((s, c, j) => s + (j % 2 ? -0.5 : 1.5) * c[i], 0) + normal());
  return { y, x: { intercept: 0, names: ['constant', ...Array.from({ length: k - 1 }, (_, j) => `x${j + 1}`)], columns } };
}

const asMatrix = (x: Design): Matrix => new Matrix(Array.from({ length: x.columns[0].length }, (_, i) => x.columns.map((c) => c[i])));

describe('OLS by QR', () => {
  const { y, x } = randomDesign(80, 4, 11);
  const fit = fitOls(y, x, { robust: true });

  it('β equals the least-squares solution from ml-matrix', () => {
    // reference: ml-matrix solve (general-purpose library) on the rectangular system
    const ref = solve(asMatrix(x), Matrix.columnVector(Array.from(y)));
    fit.coefficients.forEach((c, j) => expect(c.estimate).toBeCloseTo(ref.get(j, 0), 10));
  });

  it('normal-equations identity: Xᵀe = 0 and ŷ + e = y', () => {
    for (const c of x.columns) expect(Math.abs(c.reduce((s, v, i) => s + v * fit.residuals[i], 0))).toBeLessThan(1e-9);
    y.forEach((v, i) => expect(fit.fitted[i] + fit.residuals[i]).toBeCloseTo(v, 12));
  });

  it('standard errors equal √(σ² diag (XᵀX)⁻¹) from ml-matrix, HC0 equals the sandwich formula', () => {
    const X = asMatrix(x);
    const xtxInv = solve(X.transpose().mmul(X), Matrix.eye(4));
    fit.coefficients.forEach((c, j) => expect(c.se).toBeCloseTo(Math.sqrt(fit.sigma2 * xtxInv.get(j, j)), 10));
    // White (1980) HC0: (XᵀX)⁻¹ Xᵀ diag(e²) X (XᵀX)⁻¹
    const meat = X.transpose().mmul(Matrix.diag(Array.from(fit.residuals, (e) => e * e))).mmul(X);
    const hc0 = xtxInv.mmul(meat).mmul(xtxInv);
    fit.robustCoefficients!.forEach((c, j) => expect(c.se).toBeCloseTo(Math.sqrt(hc0.get(j, j)), 10));
  });

  it('R², F and the information criteria follow their definitions', () => {
    const n = 80;
    const k = 4;
    const ybar = y.reduce((s, v) => s + v, 0) / n;
    const tss = y.reduce((s, v) => s + (v - ybar) ** 2, 0);
    const ssr = fit.residuals.reduce((s, e) => s + e * e, 0);
    expect(fit.r2).toBeCloseTo(1 - ssr / tss, 12);
    expect(fit.f.stat).toBeCloseTo((fit.r2 / (k - 1)) / ((1 - fit.r2) / (n - k)), 9);
    expect(fit.logLik).toBeCloseTo(-n / 2 * Math.log(2 * Math.PI) - n / 2 * Math.log(ssr / n) - n / 2, 9);
    expect(fit.aic).toBeCloseTo(-2 * fit.logLik + 2 * k, 9);
    expect(fit.bic).toBeCloseTo(-2 * fit.logLik + k * Math.log(n), 9);
  });

  it('condition number equals the ratio of singular values of the unit-length-scaled columns (ml-matrix SVD)', () => {
    const X = asMatrix(x);
    const scaled = X.clone();
    for (let j = 0; j < 4; j++) {
      const norm = Math.hypot(...X.getColumn(j));
      for (let i = 0; i < 80; i++) scaled.set(i, j, X.get(i, j) / norm);
    }
    const sv: number[] = new SingularValueDecomposition(scaled).diagonal;
    expect(conditionNumber(x)).toBeCloseTo(Math.max(...sv) / Math.min(...sv), 9);
  });
});

describe('OLS input checks', () => {
  const { y, x } = randomDesign(30, 3, 5);
  const expectInput = (f: () => unknown, pattern: RegExp): void => {
    expect(f).toThrow(InputError);
    expect(f).toThrow(pattern);
  };

  it('n ≤ k names n and k', () => {
    const small = { ...x, columns: x.columns.map((c) => c.slice(0, 3)) };
    expectInput(() => fitOls(y.slice(0, 3), small), /n = 3, k = 3/);
  });

  it('constant outcome', () => {
    expectInput(() => fitOls(new Float64Array(30).fill(4), x), /same value/);
  });

  it('constant regressor other than the intercept is named', () => {
    const bad = { ...x, names: [...x.names, 'flat'], columns: [...x.columns, new Float64Array(30).fill(7)] };
    expectInput(() => fitOls(y, bad), /"flat"/);
  });

  it('perfect collinearity names the column and the columns it is built from', () => {
    const combo = x.columns[1].map((v, i) => 2 * v - 3 * x.columns[2][i]);
    const bad = { ...x, names: [...x.names, 'combo'], columns: [...x.columns, combo] };
    expectInput(() => fitOls(y, bad), /"combo" is an exact combination of "x1", "x2"/);
  });

  it('condition number above 30 gives a warning (Belsley, Kuh & Welsch rule of thumb, common practice)', () => {
    const near = x.columns[1].map((v, i) => v + 1e-4 * Math.sin(i));
    const fit = fitOls(y, { ...x, names: [...x.names, 'nearly x1'], columns: [...x.columns, near] });
    expect(fit.conditionNumber).toBeGreaterThan(30);
    expect(fit.warnings.join(' ')).toMatch(/condition number/);
  });
});
