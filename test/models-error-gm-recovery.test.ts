/**
 * The error model by moments recovers what it should when the errors' spread differs from area to
 * area, where maximum likelihood (which assumes one variance) gets its standard errors wrong.
 * Data simulated here with the engine's seeded generator (invented, no real place):
 *   y = 1 + 2·x1 − x2 + u, u = λWu + ε, λ = 0.5, rook contiguity on a grid (row-standardised for
 *   the large draw; for the repeated draws its symmetric form D^-½CD^-½, whose traces are cheap),
 *   εᵢ ~ N(0, σᵢ²) with σᵢ = 0.3 + 1.5·|x1ᵢ| (the spread grows with x1: the case in which the usual
 *   standard error of x1's coefficient is too small; White 1980).
 * Checks: on one large draw the estimates lie within 3 of their own standard errors of the truth;
 * over repeated draws the moments estimator's standard errors match the spread of its estimates
 * while the maximum-likelihood standard error of x1's coefficient falls well short of the spread of
 * the maximum-likelihood estimates (a Monte Carlo comparison; 60 draws).
 */
import { describe, expect, it } from 'vitest';
import { denseAlgebra } from '../src/linalg/dense-algebra.js';
import { chooseAlgebra } from '../src/linalg/choose-algebra.js';
import { solveShifted } from '../src/linalg/index.js';
import { fitOls, fitSpatialError, type PreparedInputs } from '../src/models/index.js';
import { fitErrorGm } from '../src/models/error-gm.js';
import { normalSampler, seededRandom } from '../src/stats/index.js';
import { csrFromNeighbours, rookGrid, rookNeighbours } from './helpers/grid.js';
import type { CsrMatrix } from '../src/linalg/csr.js';
import type { WeightsAlgebra } from '../src/linalg/algebra.js';

const LAMBDA = 0.5;
const BETA = [1, 2, -1];
const DRAWS = 60;

/** D^-½ C D^-½ of a symmetric binary C (row sums D): symmetric, eigenvalues in [−1, 1]. */
function symmetricScaled(c: CsrMatrix): CsrMatrix {
  const d = new Float64Array(c.n);
  for (let i = 0; i < c.n; i++) for (let q = c.rowPtr[i]; q < c.rowPtr[i + 1]; q++) d[i] += c.values[q];
  const values = new Float64Array(c.values.length);
  for (let i = 0; i < c.n; i++) for (let q = c.rowPtr[i]; q < c.rowPtr[i + 1]; q++) values[q] = c.values[q] / Math.sqrt(d[i] * d[c.colIdx[q]]);
  return { ...c, values };
}

function draw(w: CsrMatrix, seed: number): { y: Float64Array; design: { names: string[]; columns: Float64Array[]; intercept: number } } {
  const n = w.n;
  const normal = normalSampler(seededRandom(seed));
  const x1 = Float64Array.from({ length: n }, normal);
  const x2 = Float64Array.from({ length: n }, normal);
  const eps = Float64Array.from({ length: n }, (_, i) => (0.3 + 1.5 * Math.abs(x1[i])) * normal());
  const u = solveShifted(w, LAMBDA, eps).x;
  const y = Float64Array.from({ length: n }, (_, i) => BETA[0] + BETA[1] * x1[i] + BETA[2] * x2[i] + u[i]);
  return { y, design: { names: ['constant', 'x1', 'x2'], columns: [new Float64Array(n).fill(1), x1, x2], intercept: 0 } };
}

function prepared(w: CsrMatrix, algebra: WeightsAlgebra, seed: number): PreparedInputs {
  const { y, design } = draw(w, seed);
  return { y, design, w, algebra, ols: fitOls(y, design) };
}

describe('error model by moments under unequal variances (simulated, invented data)', () => {
  it('recovers λ and β within 3 standard errors on one draw of 2,500 areas', () => {
    const { w, base } = rookGrid(50, 50);
    const algebra = chooseAlgebra(w, base);
    const p = prepared(w, algebra, 7);
    const f = fitErrorGm(p);
    expect(Math.abs(f.lambda - LAMBDA)).toBeLessThan(3 * f.lambdaSe);
    f.coefficients.forEach((c, j) => expect(Math.abs(c.estimate - BETA[j]), c.name).toBeLessThan(3 * c.se));
  }, 60_000);

  it('its standard errors match the spread of its estimates over 60 draws; maximum likelihood’s for x1 are too small', () => {
    const w = symmetricScaled(csrFromNeighbours(rookNeighbours(20, 20), 'binary'));
    const algebra = denseAlgebra(w, null);
    const gm = { b1: [] as number[], b1Se: [] as number[], lambda: [] as number[], lambdaSe: [] as number[] };
    const ml = { b1: [] as number[], b1Se: [] as number[] };
    for (let r = 0; r < DRAWS; r++) {
      const p = prepared(w, algebra, 1000 + r);
      const f = fitErrorGm(p);
      gm.b1.push(f.coefficients[1].estimate);
      gm.b1Se.push(f.coefficients[1].se);
      gm.lambda.push(f.lambda);
      gm.lambdaSe.push(f.lambdaSe);
      const m = fitSpatialError(p.y, p.design, algebra, p.ols);
      ml.b1.push(m.coefficients[1].estimate);
      ml.b1Se.push(m.coefficients[1].se);
    }
    const mean = (v: number[]) => v.reduce((a, b) => a + b, 0) / v.length;
    const sd = (v: number[]) => { const m = mean(v); return Math.sqrt(v.reduce((a, b) => a + (b - m) ** 2, 0) / (v.length - 1)); };
    // the moments estimator: its reported standard errors describe the spread of its estimates
    const gmRatio = mean(gm.b1Se) / sd(gm.b1);
    expect(gmRatio).toBeGreaterThan(0.75);
    expect(gmRatio).toBeLessThan(1.3);
    const lambdaRatio = mean(gm.lambdaSe) / sd(gm.lambda);
    expect(lambdaRatio).toBeGreaterThan(0.7);
    expect(lambdaRatio).toBeLessThan(1.4);
    expect(Math.abs(mean(gm.b1) - BETA[1])).toBeLessThan(3 * sd(gm.b1) / Math.sqrt(DRAWS));
    // maximum likelihood assumes one variance: its standard error of x1's coefficient is far too small
    const mlRatio = mean(ml.b1Se) / sd(ml.b1);
    expect(mlRatio).toBeLessThan(0.75);
    expect(mlRatio).toBeLessThan(gmRatio - 0.2);
  }, 180_000);
});
