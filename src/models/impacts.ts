import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { chebyshevCurve, csrMultiply, isRowStochastic, solveShifted, type TraceInverseCurve, type WeightsAlgebra } from '../linalg/index.js';
import { normalSampler, normalTwoSided, seededRandom } from '../stats/index.js';
import type { Design, Impact, ImpactsResult, SpatialFit } from './types.js';
import { formatCount } from '../core/count.js';

const SERIES_TERMS = 300;
const MAX_REDRAWS = 1000;
/** Below this |ρ| the lagged columns' terms come from their series (no division by a small ρ)... */
const SMALL_RHO = 0.02;
/** ...to this power: 0.02¹³ is below rounding. */
const SMALL_RHO_TERMS = 12;

/** What the effects are computed from: the reduced form's coefficients, ρ, the covariance of (β, ρ, σ²) and the range of ρ. */
export type ReducedFormFit = Pick<SpatialFit, 'coefficients' | 'parameter' | 'covariance' | 'range'>;

/** The Durbin model's WX terms: the columns of X (the WX coefficients follow them) and each WX term's own column. */
export interface LaggedTerms {
  xColumns: number;
  source: number[];
}

/**
 * Impacts of the lag model (LeSage & Pace 2009, §2.7): with A = I − ρW and S_r = β_r A⁻¹,
 *   direct = β_r tr(A⁻¹)/n, total = β_r 1'A⁻¹1/n, indirect = total − direct.
 * When every row of W sums to one, 1'A⁻¹1/n = 1/(1 − ρ); otherwise it comes from solves A x = 1.
 * With `lagged` (the spatial Durbin model, ibid. §2.7; its WX coefficients θ follow X's) S_r =
 * A⁻¹(β_r I + θ_r W), and since A⁻¹W = (A⁻¹ − I)/ρ: direct = β_r tr(A⁻¹)/n + θ_r (tr(A⁻¹)/n − 1)/ρ,
 * total = β_r 1'A⁻¹1/n + θ_r (1'A⁻¹1/n − 1)/ρ (= (β_r + θ_r)/(1 − ρ) when rows sum to one); for
 * |ρ| < 0.02 the θ terms come from their power series instead. The draws are of (β, θ, ρ) jointly.
 * The lag model by instruments passes its own estimates and covariance (`ReducedFormFit`).
 *
 * Standard errors (LeSage & Pace 2009, §2.7.4): `draws` samples of (β, ρ) from N(θ̂, V̂) using the
 * Cholesky factor of V̂ (the (β, ρ) block of the ML covariance) and a seeded generator; draws of ρ
 * outside the admissible range are rejected and redrawn. All draws are made first; then tr(A⁻¹)
 * at each draw's ρ costs the same order for every kind and size of W:
 *  - the algebra's curve over the draws' interval when it has one (a Lanczos quadrature on the
 *    symmetric form, or a Chebyshev interpolant from a handful of factorisations), moved to agree
 *    with the traces at ρ̂;
 *  - else exactly from the algebra when its traces are exact and cheap per ρ (all eigenvalues);
 *  - else the series tr(A⁻¹) = n + Σ_{j≥1} ρʲ tr(Wʲ) to 300 terms (from powerTraces), valid
 *    on the range such an algebra reports (|ρ|λmax < 1).
 * 1'A⁻¹1 at the draws, when rows do not all sum to one, from a Chebyshev interpolant of exact
 * solves. SE = standard deviation over draws, p two-sided normal on estimate/SE. Point estimates
 * are at θ̂, not the draw means.
 *
 * When the covariance of (β, ρ) is not positive definite (the lag fit then has no standard errors)
 * or ρ cannot be drawn inside the range, the estimates are still given, without standard errors or
 * p-values, and a warning says why.
 */
export function lagImpacts(fit: ReducedFormFit, x: Design, algebra: WeightsAlgebra, opts: { draws?: number; seed?: number; lagged?: LaggedTerms } = {}): ImpactsResult {
  const draws = opts.draws ?? 1000;
  const seed = opts.seed ?? 1;
  const n = algebra.n;
  const k = x.columns.length;
  const warnings: string[] = [];
  // with lagged columns (the Durbin model) one effect per column of X, from β_r and θ_r together
  const lagged = opts.lagged;
  const which = x.names.map((name, j) => ({ name, j, t: lagged ? lagged.source.indexOf(j) : -1 }))
    .filter((c) => c.j !== x.intercept && (!lagged || c.j < lagged.xColumns))
    .map((c) => ({ ...c, t: c.t >= 0 && lagged ? lagged.xColumns + c.t : -1 }));
  const beta = fit.coefficients.map((c) => c.estimate);
  const rhoHat = fit.parameter;
  const tracesHat = algebra.traces(rhoHat);
  if (tracesHat.unconverged) warnings.push(`Spillover effects: ${tracesHat.unconverged}.`);
  const dHat = tracesHat.trAinv / n;

  const rowsSumToOne = isRowStochastic(algebra.w, { allowEmptyRows: false });
  const withoutNeighbours = rowsSumToOne ? 0 : unlinkedUnneighboured(algebra);
  const closedTotal = rowsSumToOne || withoutNeighbours > 0;
  const totalClosed = (rho: number): number =>
    // rows summing to one except areas that link to no one and that no one links to: A⁻¹1 is
    // 1/(1 − ρ) on the others and 1 on those
    rowsSumToOne ? 1 / (1 - rho) : ((n - withoutNeighbours) / (1 - rho) + withoutNeighbours) / n;
  const ones = new Float64Array(n).fill(1);
  let unconvergedTotal = 0;
  const totalBySolve = (rho: number): number => {
    let sol: Float64Array;
    if (algebra.solve) sol = algebra.solve(rho, ones);
    else {
      const solved = solveShifted(algebra.w, rho, ones);
      if (!solved.converged) unconvergedTotal++;
      sol = solved.x;
    }
    let s = 0;
    for (let i = 0; i < n; i++) s += sol[i];
    return s / n;
  };
  const tHat = closedTotal ? totalClosed(rhoHat) : totalBySolve(rhoHat);

  // A⁻¹W = (A⁻¹ − I)/ρ, so tr(A⁻¹W)/n = (tr(A⁻¹)/n − 1)/ρ and 1'A⁻¹W1/n = (1'A⁻¹1/n − 1)/ρ; near
  // ρ = 0 from their series Σ ρʲ tr(Wʲ⁺¹)/n and Σ ρʲ 1'Wʲ⁺¹1/n (built on first use)
  let traceSeries: Float64Array | null = null;
  let sumSeries: Float64Array | null = null;
  const powerSum = (c: Float64Array, rho: number) => { let s = 0, power = 1; for (const v of c) { s += power * v; power *= rho; } return s; };
  const directLagged = (rho: number, meanA: number): number => {
    if (Math.abs(rho) >= SMALL_RHO) return (meanA - 1) / rho;
    traceSeries ??= algebra.powerTraces(SMALL_RHO_TERMS + 1).map((v) => v / n);
    return powerSum(traceSeries, rho);
  };
  const totalLagged = (rho: number, meanTotalA: number): number => {
    if (rowsSumToOne) return meanTotalA; // W1 = 1
    if (Math.abs(rho) >= SMALL_RHO) return (meanTotalA - 1) / rho;
    if (!sumSeries) {
      sumSeries = new Float64Array(SMALL_RHO_TERMS + 1);
      let v: Float64Array = new Float64Array(n).fill(1);
      for (let j = 0; j <= SMALL_RHO_TERMS; j++) { v = csrMultiply(algebra.w, v); sumSeries[j] = v.reduce((a, b) => a + b, 0) / n; }
    }
    return powerSum(sumSeries, rho);
  };
  const dwHat = lagged ? directLagged(rhoHat, dHat) : 0;
  const twHat = lagged ? totalLagged(rhoHat, tHat) : 0;

  const estimates = (se: (c: number) => { d: number; i: number; t: number }): Impact[] =>
    which.map(({ name, j, t: l }, c) => {
      const direct = beta[j] * dHat + (l >= 0 ? beta[l] * dwHat : 0);
      const total = beta[j] * tHat + (l >= 0 ? beta[l] * twHat : 0);
      const indirect = total - direct;
      const s = se(c);
      return {
        name, direct, indirect, total,
        directSe: s.d, indirectSe: s.i, totalSe: s.t,
        directP: normalTwoSided(direct / s.d), indirectP: normalTwoSided(indirect / s.i), totalP: normalTwoSided(total / s.t),
      };
    });
  const withoutErrors = (why: string): ImpactsResult => {
    warnings.push(`The spillover effects are given without standard errors or p-values: ${why}.`);
    return {
      impacts: estimates(() => ({ d: NaN, i: NaN, t: NaN })),
      draws: 0,
      seed,
      method: `not available (${why}); the estimates are at the fitted ρ and β, tr(I − ρW)⁻¹ at ρ̂ ${algebra.traceMethod}; no draws were made (seed ${seed} unused)`,
      warnings,
    };
  };

  // (β, ρ) block of the covariance of (β, ρ, σ²)
  const p = k + 2;
  const q = k + 1;
  const block: number[][] = [];
  // averaged with its transpose: a covariance equal to its transpose only to rounding (a sandwich
  // form, say) would otherwise be refused by the Cholesky factor as not symmetric
  for (let a = 0; a < q; a++) {
    const row: number[] = [];
    for (let b = 0; b < q; b++) row.push((fit.covariance[a * p + b] + fit.covariance[b * p + a]) / 2);
    block.push(row);
  }
  if (!block.every((row) => row.every(Number.isFinite))) return withoutErrors('the covariance of (β, ρ) is not available (the information matrix of the lag model is not positive definite at the estimate)');
  const chol = new CholeskyDecomposition(new Matrix(block));
  if (!chol.isPositiveDefinite()) return withoutErrors('the covariance of (β, ρ) is not positive definite, so (β, ρ) cannot be drawn');
  const l = chol.lowerTriangularMatrix;
  const centre = [...beta, rhoHat];
  const normal = normalSampler(seededRandom(seed));
  const thetas = new Float64Array(draws * q);
  const z = new Float64Array(q);
  for (let r = 0; r < draws; r++) {
    const theta = thetas.subarray(r * q, (r + 1) * q);
    let tries = 0;
    do {
      if (++tries > MAX_REDRAWS) return withoutErrors(`${formatCount(MAX_REDRAWS)} draws in a row put ρ outside its admissible range`);
      for (let a = 0; a < q; a++) z[a] = normal();
      for (let a = 0; a < q; a++) {
        let s = centre[a];
        for (let b = 0; b <= a; b++) s += l.get(a, b) * z[b];
        theta[a] = s;
      }
    } while (!(theta[k] > fit.range.lower && theta[k] < fit.range.upper));
  }
  let lo = rhoHat, hi = rhoHat;
  for (let r = 0; r < draws; r++) { lo = Math.min(lo, thetas[r * q + k]); hi = Math.max(hi, thetas[r * q + k]); }

  // tr(A⁻¹)/n at the draws
  let meanDirect: (rho: number) => number;
  let traceText: string;
  try {
    if (algebra.traceInverseCurve) {
      const c: TraceInverseCurve = algebra.traceInverseCurve(lo, hi);
      // the curve's change from ρ̂, added to the level the traces give there
      const offset = dHat - c.evaluate(rhoHat) / n;
      meanDirect = (rho) => c.evaluate(rho) / n + offset;
      traceText = `tr(I − ρW)⁻¹ at ρ̂ ${algebra.traceMethod}; at the draws that value plus the change from ρ̂ by ${c.method}`;
    } else if (algebra.tracesExact) {
      meanDirect = (rho) => algebra.traces(rho).trAinv / n;
      traceText = `tr(I − ρW)⁻¹ ${algebra.traceMethod}`;
    } else {
      const s = algebra.powerTraces(SERIES_TERMS);
      meanDirect = (rho) => {
        let sum = n, power = 1;
        for (let j = 0; j < SERIES_TERMS; j++) { power *= rho; sum += power * s[j]; }
        return sum / n;
      };
      traceText = `tr(I − ρW)⁻¹ at ρ̂ ${algebra.traceMethod}; at the draws by the power series to ${SERIES_TERMS} terms`;
    }
  } catch (e) {
    return withoutErrors(`tr(I − ρW)⁻¹ could not be evaluated over the draws (${(e as Error).message})`);
  }
  let meanTotal = totalClosed;
  let totalText = rowsSumToOne
    ? 'β/(1 − ρ), every row of W sums to one'
    : `β·(1 + (n − m)ρ/(n(1 − ρ))), every row of W sums to one but those of the ${formatCount(withoutNeighbours)} area(s) without neighbours`;
  if (!closedTotal) {
    const c = chebyshevCurve((rho) => totalBySolve(rho) * n, lo, hi, `1'(I − ρW)⁻¹1 by ${algebra.solve ? 'solves with the factor of I − ρW' : 'GMRES solves'}`, { tolerance: 1e-10 });
    meanTotal = (rho) => c.evaluate(rho) / n;
    totalText = `β·1'(I − ρW)⁻¹1/n: ${c.method}`;
  }
  if (unconvergedTotal > 0) warnings.push(`Spillover effects: ${unconvergedTotal} of the GMRES solves behind the total effect stopped short of relative residual 1e-12.`);

  const sums = which.map(() => ({ d: [0, 0], i: [0, 0], t: [0, 0] }));
  for (let r = 0; r < draws; r++) {
    const theta = thetas.subarray(r * q, (r + 1) * q);
    const d = meanDirect(theta[k]);
    const t = meanTotal(theta[k]);
    const dw = lagged ? directLagged(theta[k], d) : 0;
    const tw = lagged ? totalLagged(theta[k], t) : 0;
    which.forEach(({ j, t: l }, c) => {
      const direct = theta[j] * d + (l >= 0 ? theta[l] * dw : 0);
      const total = theta[j] * t + (l >= 0 ? theta[l] * tw : 0);
      accumulate(sums[c].d, direct);
      accumulate(sums[c].t, total);
      accumulate(sums[c].i, total - direct);
    });
  }
  const sd = (acc: number[]): number => Math.sqrt(Math.max(0, (acc[1] - (acc[0] * acc[0]) / draws) / (draws - 1)));
  const impacts = estimates((c) => ({ d: sd(sums[c].d), i: sd(sums[c].i), t: sd(sums[c].t) }));
  return {
    impacts,
    draws,
    seed,
    method: `${draws} simulated draws of (β, ${lagged ? 'θ, ' : ''}ρ) from their estimated normal distribution (seed ${seed}); ${traceText}${lagged ? '; the neighbours’ columns through tr((I − ρW)⁻¹W)/n = (tr(I − ρW)⁻¹/n − 1)/ρ' : ''}; total effect ${lagged ? totalText.replace('β/(1 − ρ)', '(β + θ)/(1 − ρ)') : totalText}`,
    warnings,
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
  if (!isRowStochastic(w)) return 0;
  let count = 0;
  for (let i = 0; i < w.n; i++) {
    if (w.rowPtr[i + 1] > w.rowPtr[i]) continue;
    if (named[i]) return 0; // an area without neighbours that others name: no closed form
    count++;
  }
  return count;
}
