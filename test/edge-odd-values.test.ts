// Odd data that now gives a result, checked against computations outside the project: a one-way
// (directed) edge list with loops, fitted by least squares and the lag model, against dense
// ml-matrix algebra (QR least squares, LU determinant) and the definition of Moran's I
// (Cliff & Ord 1981: I = n/S0 · e'We / e'e).
import { describe, expect, it } from 'vitest';
import { Matrix, QrDecomposition, LuDecomposition } from 'ml-matrix';
import { runAnalysis } from '../src/pipeline/index.js';
import { gridFile, gridRows, text } from './bad-inputs/make.js';

const code = (i: number) => `D${String(i + 1).padStart(2, '0')}`;
// A one-way ring through the 16 districts plus four one-way shortcuts: W is not symmetric.
const links: [number, number][] = [
  ...Array.from({ length: 16 }, (_, i) => [i, (i + 1) % 16] as [number, number]),
  [0, 5], [3, 10], [7, 2], [12, 6],
];
const edgeText = 'origin,neighbour,weight\n' + links.map(([a, b]) => `${code(a)},${code(b)},1`).join('\n') + '\n';

function denseRowStandardised(n: number): Matrix {
  const w = Matrix.zeros(n, n);
  for (const [a, b] of links) w.set(a, b, 1);
  for (let i = 0; i < n; i++) {
    const s = w.getRow(i).reduce((p, v) => p + v, 0);
    for (let j = 0; j < n; j++) w.set(i, j, w.get(i, j) / s);
  }
  return w;
}

describe('a directed edge list (each link in one direction only) gives a result', () => {
  it('matches dense least squares, the definition of Moran\'s I and the lag log-likelihood', async () => {
    const r = await runAnalysis({
      boundary: [gridFile()], edgeList: text('links.csv', edgeText),
      id: 'code', y: 'y', x: ['x1', 'x2'], weights: { method: 'queen' }, transform: 'row',
      models: ['ols', 'lag', 'error'], permutations: 0, impactDraws: 20,
    });
    const rows = gridRows();
    const n = rows.length;
    const X = new Matrix(rows.map((g) => [1, g.x1, g.x2]));
    const y = Matrix.columnVector(rows.map((g) => g.y));
    const beta = new QrDecomposition(X).solve(y);
    r.ols.coefficients.forEach((c, j) => expect(c.estimate).toBeCloseTo(beta.get(j, 0), 9));

    const W = denseRowStandardised(n);
    const e = y.clone().sub(X.mmul(beta));
    const We = W.mmul(e);
    const eWe = e.transpose().mmul(We).get(0, 0);
    const ee = e.transpose().mmul(e).get(0, 0);
    expect(r.ols.moran.I).toBeCloseTo((n / n) * eWe / ee, 10); // row-standardised: S0 = n

    // Lag model log-likelihood at the reported ρ, recomputed densely (Ord 1975 concentrated form).
    const lag = r.fits.lag!;
    expect(Number.isFinite(lag.logLik)).toBe(true);
    const rho = lag.parameter;
    const A = Matrix.eye(n).sub(W.clone().mul(rho));
    const Ay = A.mmul(y);
    const b = new QrDecomposition(X).solve(Ay);
    const u = Ay.clone().sub(X.mmul(b));
    const s2 = u.transpose().mmul(u).get(0, 0) / n;
    const logdet = Math.log(Math.abs(new LuDecomposition(A).determinant));
    const ll = -n / 2 * (Math.log(2 * Math.PI) + Math.log(s2) + 1) + logdet;
    expect(lag.logLik).toBeCloseTo(ll, 6);
    expect(lag.sigma2).toBeCloseTo(s2, 8);
    expect(Number.isFinite(r.fits.error!.logLik)).toBe(true);
  });

  it('explanatory values of size 1e60 are carried: estimates scale by 1e-60 (identity of least squares)', async () => {
    const base = { boundary: [gridFile()], id: 'code', y: 'y', x: ['x1', 'x2'], weights: { method: 'queen' as const }, transform: 'row' as const, models: ['ols' as const], permutations: 0 };
    const scaled = gridFile('districts.geojson', undefined, { props: gridRows().map((g) => ({ ...g, x1: g.x1 * 1e60 })) });
    const a = await runAnalysis(base);
    const b = await runAnalysis({ ...base, boundary: [scaled] });
    expect(b.ols.coefficients[1].estimate * 1e60 / a.ols.coefficients[1].estimate).toBeCloseTo(1, 9);
    expect(b.ols.moran.I).toBeCloseTo(a.ols.moran.I, 9);
  });
});
