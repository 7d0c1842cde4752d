import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import type { WeightsAlgebra } from '../linalg/algebra.js';
import { solveShifted } from '../linalg/dense-iterative.js';
import { normalSampler, normalTwoSided, seededRandom } from '../stats/index.js';
import type { Design, Impact, ImpactsResult, SpatialFit } from './types.js';

const SERIES_TERMS = 300;
const MAX_REDRAWS = 1000;

/**
 * Impacts of the lag model (LeSage & Pace 2009, §2.7): with A = I − ρW and S_r = β_r A⁻¹,
 *   direct = β_r tr(A⁻¹)/n, total = β_r 1'A⁻¹1/n, indirect = total − direct.
 * When every row of W sums to one, 1'A⁻¹1/n = 1/(1 − ρ); otherwise it is the mean of the solve A x = 1.
 *
 * Standard errors (LeSage & Pace 2009, §2.7.4): `draws` samples of (β, ρ) from N(θ̂, V̂) using the
 * Cholesky factor of V̂ (the (β, ρ) block of the ML covariance) and a seeded generator; draws of ρ
 * outside the admissible range are rejected and redrawn. Each draw recomputes tr(A⁻¹): from the
 * algebra's fast evaluation when it has one (large n: stochastic Lanczos quadrature for the change
 * from ρ̂, added to the level the traces give at ρ̂, which is also the point estimate), else exactly from the algebra when its traces are exact,
 * otherwise by the series tr(A⁻¹) = n + Σ_{j≥1} ρʲ tr(Wʲ) truncated at 300 terms (from powerTraces). SE = standard deviation over draws, p two-sided normal
 * on estimate/SE. Point estimates are at θ̂, not the draw means.
 */
export function lagImpacts(fit: SpatialFit, x: Design, algebra: WeightsAlgebra, opts: { draws?: number; seed?: number } = {}): ImpactsResult {
  if (fit.model !== 'lag') throw new Error('impacts are defined for the lag model');
  const draws = opts.draws ?? 1000;
  const seed = opts.seed ?? 1;
  const n = algebra.n;
  const k = x.columns.length;
  const exactTraces = algebra.traceMethod.startsWith('exact');
  const fast = algebra.traceInverse;
  const series = exactTraces || fast ? null : algebra.powerTraces(SERIES_TERMS);
  // with a fast evaluation the draws move tr(A⁻¹) by its change from ρ̂, so that they centre on
  // the level the traces give at ρ̂ (set below)
  let fastOffset = 0;
  const meanDirect = (rho: number): number => {
    if (fast) return fast.evaluate(rho) / n + fastOffset;
    if (!series) return algebra.traces(rho).trAinv / n;
    let s = n;
    let power = 1;
    for (let j = 0; j < SERIES_TERMS; j++) {
      power *= rho;
      s += power * series[j];
    }
    return s / n;
  };
  const rowsSumToOne = rowSumsAllOne(algebra);
  const withoutNeighbours = rowsSumToOne ? 0 : unlinkedUnneighboured(algebra);
  const ones = new Float64Array(n).fill(1);
  const meanTotal = (rho: number): number => {
    if (rowsSumToOne) return 1 / (1 - rho);
    // rows summing to one except areas that link to no one and that no one links to: A⁻¹1 is
    // 1/(1 − ρ) on the others and 1 on those
    if (withoutNeighbours > 0) return ((n - withoutNeighbours) / (1 - rho) + withoutNeighbours) / n;
    const { x: sol } = solveShifted(algebra.w, rho, ones);
    let s = 0;
    for (let i = 0; i < n; i++) s += sol[i];
    return s / n;
  };
  const which = x.names.map((name, j) => ({ name, j })).filter((c) => c.j !== x.intercept);
  const beta = fit.coefficients.map((c) => c.estimate);
  const rhoHat = fit.parameter;
  // the point estimate takes tr(A⁻¹) at ρ̂ from the traces already computed there for the fit
  const dHat = fast ? algebra.traces(rhoHat).trAinv / n : meanDirect(rhoHat);
  if (fast) fastOffset = dHat - fast.evaluate(rhoHat) / n;
  const tHat = meanTotal(rhoHat);

  // (β, ρ) block of the covariance of (β, ρ, σ²)
  const p = k + 2;
  const q = k + 1;
  const block: number[][] = [];
  for (let a = 0; a < q; a++) {
    const row: number[] = [];
    for (let b = 0; b < q; b++) row.push(fit.covariance[a * p + b]);
    block.push(row);
  }
  const chol = new CholeskyDecomposition(new Matrix(block));
  if (!chol.isPositiveDefinite()) throw new Error('the covariance of (β, ρ) is not positive definite; impacts cannot be simulated');
  const l = chol.lowerTriangularMatrix;
  const centre = [...beta, rhoHat];
  const normal = normalSampler(seededRandom(seed));
  const sums = which.map(() => ({ d: [0, 0], i: [0, 0], t: [0, 0] }));
  const z = new Float64Array(q);
  const theta = new Float64Array(q);
  for (let r = 0; r < draws; r++) {
    let tries = 0;
    do {
      if (++tries > MAX_REDRAWS) throw new Error('could not draw ρ inside the admissible range');
      for (let a = 0; a < q; a++) z[a] = normal();
      for (let a = 0; a < q; a++) {
        let s = centre[a];
        for (let b = 0; b <= a; b++) s += l.get(a, b) * z[b];
        theta[a] = s;
      }
    } while (!(theta[k] > fit.range.lower && theta[k] < fit.range.upper));
    const d = meanDirect(theta[k]);
    const t = meanTotal(theta[k]);
    which.forEach(({ j }, c) => {
      const direct = theta[j] * d;
      const total = theta[j] * t;
      accumulate(sums[c].d, direct);
      accumulate(sums[c].t, total);
      accumulate(sums[c].i, total - direct);
    });
  }
  const sd = (acc: number[]): number => Math.sqrt(Math.max(0, (acc[1] - (acc[0] * acc[0]) / draws) / (draws - 1)));
  const impacts: Impact[] = which.map(({ name, j }, c) => {
    const direct = beta[j] * dHat;
    const total = beta[j] * tHat;
    const indirect = total - direct;
    const directSe = sd(sums[c].d);
    const indirectSe = sd(sums[c].i);
    const totalSe = sd(sums[c].t);
    return {
      name,
      direct,
      indirect,
      total,
      directSe,
      indirectSe,
      totalSe,
      directP: normalTwoSided(direct / directSe),
      indirectP: normalTwoSided(indirect / indirectSe),
      totalP: normalTwoSided(total / totalSe),
    };
  });
  const traceText = fast
    ? `tr(I − ρW)⁻¹ at ρ̂ ${algebra.traceMethod}; at the draws that value plus the change from ρ̂ by ${fast.method}`
    : series
      ? `tr(I − ρW)⁻¹ by the power series to ${SERIES_TERMS} terms (${algebra.traceMethod})`
      : `tr(I − ρW)⁻¹ ${algebra.traceMethod}`;
  return {
    impacts,
    draws,
    seed,
    method: `${draws} simulated draws of (β, ρ) from their estimated normal distribution (seed ${seed}); ${traceText}; total effect ${rowsSumToOne ? 'β/(1 − ρ), every row of W sums to one' : withoutNeighbours > 0 ? `β·(1 + (n − m)ρ/(n(1 − ρ))), every row of W sums to one but those of the ${withoutNeighbours} area(s) without neighbours` : "β·1'(I − ρW)⁻¹1/n by iterative solve"}`,
  };
}

function accumulate(acc: number[], v: number): void {
  acc[0] += v;
  acc[1] += v * v;
}

/**
 * Number of areas with no neighbours and named by no other area, when every other row of W sums
 * to one; 0 when W is not of that form.
 */
function unlinkedUnneighboured(algebra: WeightsAlgebra): number {
  const w = algebra.w;
  const named = new Uint8Array(w.n);
  for (let p = 0; p < w.rowPtr[w.n]; p++) if (w.values[p] !== 0) named[w.colIdx[p]] = 1;
  let count = 0;
  for (let i = 0; i < w.n; i++) {
    let s = 0;
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) s += w.values[p];
    if (s === 0 && !named[i]) count++;
    else if (Math.abs(s - 1) > 1e-12) return 0;
  }
  return count;
}

function rowSumsAllOne(algebra: WeightsAlgebra): boolean {
  const w = algebra.w;
  for (let i = 0; i < w.n; i++) {
    let s = 0;
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) s += w.values[p];
    if (Math.abs(s - 1) > 1e-12) return false;
  }
  return true;
}
