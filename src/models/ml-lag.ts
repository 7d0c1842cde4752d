import { csrMultiply } from '../linalg/index.js';
import type { WeightsAlgebra } from '../linalg/index.js';
import { solveShifted } from '../linalg/index.js';
import { householderQr, qrSolve } from '../linalg/index.js';
import { breuschPagan, chiSquareUpper, normalTwoSided } from '../stats/index.js';
import { brentMaximise } from './brent.js';
import { bracketAndPolish } from './bracket-polish.js';
import { invertInformation, searchInterval, searchWithinPivotLimit, squaredCorrelation } from './information.js';
import { lagCrossTrace } from './lag-cross-trace.js';
import { fitOls, table } from './ols.js';
import type { Convergence, Design, OlsFit, SpatialFit } from './types.js';

/**
 * Spatial lag model y = ρWy + Xβ + ε by maximum likelihood (Ord 1975; Anselin 1988, ch. 6).
 *
 * Concentrated in ρ: with β₀, e₀ from OLS of y on X and β_L, e_L from OLS of Wy on X,
 *   e(ρ) = e₀ − ρe_L, σ²(ρ) = e(ρ)'e(ρ)/n,
 *   L_c(ρ) = −n/2 ln(2π) − n/2 ln σ²(ρ) − n/2 + ln|I − ρW|,
 * maximised by Brent on the admissible interval (ends shrunk by 1e-6 relative) — or, when the
 * algebra offers a cheap approximate log-determinant (large n), bracketed with it and polished with a
 * few exact evaluations (bracket-polish.ts), which reaches the same maximiser. Then
 * β = β₀ − ρβ_L, σ² = e'e/n, residual e = y − ρWy − Xβ.
 *
 * Covariance of (β, ρ, σ²): inverse (Cholesky) of the information matrix (Anselin 1988, eq. 6.5ff),
 * G = W A⁻¹, A = I − ρW:
 *   I_ββ = X'X/σ², I_βρ = X'GXβ/σ², I_βσ² = 0,
 *   I_ρρ = tr G² + tr GᵀG + (GXβ)'(GXβ)/σ², I_ρσ² = tr G/σ², I_σ²σ² = n/(2σ⁴).
 *
 * Reported: AIC = −2logL + 2(k + 1), BIC = −2logL + (k + 1) ln n — the common convention that
 * counts the k β's and ρ but not σ²; LR = 2(logL − logL_OLS), 1 df; pseudo-R² = corr(y, ŷ)² with
 * ŷ = A⁻¹Xβ, the reduced-form prediction (fitted values are that ŷ).
 *
 * Remaining error dependence (Anselin 1988, ch. 8; Anselin, Bera, Florax & Yoon 1996, the LM test on
 * the error in the presence of a lag, same W for both):
 *   LM = (e'We/σ²)² / (T₂₂ − T₂₁² Var ρ̂), T₂₂ = tr(WᵀW + WW), T₂₁ = tr(WᵀG + WG); chi-square 1 df.
 * Breusch–Pagan on the residuals e against X.
 */
export function fitSpatialLag(
  y: Float64Array,
  x: Design,
  algebra: WeightsAlgebra,
  ols?: OlsFit,
  opts: { fixedRho?: number; maxIterations?: number } = {},
): SpatialFit {
  const base = ols ?? fitOls(y, x);
  const n = y.length;
  const k = x.columns.length;
  const w = algebra.w;
  const wy = csrMultiply(w, y);
  const qr = householderQr(x.columns);
  const b0 = qrSolve(qr, y);
  const bL = qrSolve(qr, wy);
  const e0 = residual(y, x, b0);
  const eL = residual(wy, x, bL);
  const s00 = dot(e0, e0);
  const s0L = dot(e0, eL);
  const sLL = dot(eL, eL);
  const cheap = (rho: number): number =>
    -0.5 * n * Math.log(2 * Math.PI) - 0.5 * n * Math.log((s00 - 2 * rho * s0L + rho * rho * sLL) / n) - 0.5 * n;
  const concentrated = (rho: number): number => cheap(rho) + algebra.logdet.evaluate(rho);

  const { lo, hi } = searchInterval(algebra.range);
  let rho: number;
  let convergence: Convergence;
  let logLik: number;
  let searchWarning: string | undefined;
  if (opts.fixedRho !== undefined) {
    rho = opts.fixedRho;
    convergence = { converged: true, iterations: 0, tolerance: 0, message: `ρ held fixed at ${rho}` };
    logLik = concentrated(rho);
  } else {
    // with a costly exact log-determinant, bracket with the cheap one and polish with a few exact
    // evaluations; an explicit iteration limit asks for the plain search
    const searched = searchWithinPivotLimit((a, b) => algebra.roughLogdet && opts.maxIterations === undefined
      ? bracketAndPolish(cheap, algebra.logdet, algebra.roughLogdet, a, b)
      : brentMaximise(concentrated, a, b, { maxIterations: opts.maxIterations }), lo, hi, algebra.range, 'ρ');
    const best = searched.result;
    rho = best.x;
    convergence = best.convergence;
    logLik = best.value;
    if (searched.warning) searchWarning = searched.warning;
  }
  const warnings: string[] = [];
  if (searchWarning) warnings.push(searchWarning);
  if (!convergence.converged || convergence.atBound) warnings.push(convergence.message);

  const beta = b0.map((b, j) => b - rho * bL[j]);
  const e = e0.map((v, i) => v - rho * eL[i]);
  const sigma2 = dot(e, e) / n;

  // reduced form ŷ = A⁻¹Xβ, and GXβ = Wŷ
  const xb = linearPredictor(x, beta, n);
  // traces first: a sparse algebra factors I − ρW there and reuses the factor for the solve
  const tr = algebra.traces(rho);
  if (tr.unconverged) warnings.push(`Traces for the standard errors: ${tr.unconverged}.`);
  const fitted = reducedForm(algebra, w, rho, xb, warnings);
  const gxb = csrMultiply(w, fitted);

  const p = k + 2;
  const info = new Float64Array(p * p);
  for (let a = 0; a < k; a++) {
    for (let b = a; b < k; b++) {
      const v = dot(x.columns[a], x.columns[b]) / sigma2;
      info[a * p + b] = v;
      info[b * p + a] = v;
    }
    const v = dot(x.columns[a], gxb) / sigma2;
    info[a * p + k] = v;
    info[k * p + a] = v;
  }
  info[k * p + k] = tr.trG2 + tr.trGtG + dot(gxb, gxb) / sigma2;
  info[k * p + k + 1] = tr.trG / sigma2;
  info[(k + 1) * p + k] = tr.trG / sigma2;
  info[(k + 1) * p + k + 1] = n / (2 * sigma2 * sigma2);
  const cov = invertInformation(info, p);
  const covariance = cov ?? new Float64Array(p * p).fill(NaN);
  if (!cov) warnings.push('The information matrix is not positive definite at the estimate, so standard errors are not available.');
  const coefficients = table(x, beta, (j) => Math.sqrt(covariance[j * p + j]), null);
  const rhoVar = covariance[k * p + k];
  const rhoSe = Math.sqrt(rhoVar);
  const rhoZ = rho / rhoSe;

  const aicParameters = k + 1; // β's and ρ; σ² not counted (common convention)
  const lrStat = 2 * (logLik - base.logLik);

  const we = csrMultiply(w, e);
  const t22 = algebra.lmTrace;
  const cross = lagCrossTrace(algebra, rho);
  if (!cross.exact) warnings.push(`The trace tr(WᵀG + WG) in the test for remaining error dependence was ${cross.method}.`);
  if (cross.unconverged) warnings.push(`Test for remaining error dependence: ${cross.unconverged}.`);
  // the variance term T₂₂ − T₂₁² Var ρ̂ must be positive; when it is not (or Var ρ̂ is missing) the
  // test is not reported rather than given a p-value of 1
  const denominator = t22 - cross.value * cross.value * rhoVar;
  const lmStat = denominator > 0 ? (dot(e, we) / sigma2) ** 2 / denominator : NaN;
  if (!(denominator > 0)) {
    warnings.push(Number.isFinite(denominator)
      ? `The test for remaining error dependence is not reported: its variance term T₂₂ − T₂₁²·Var ρ̂ = ${denominator.toPrecision(4)} is not positive.`
      : 'The test for remaining error dependence is not reported: the variance of ρ̂ is not available.');
  }

  return {
    model: 'lag',
    parameter: rho,
    parameterSe: rhoSe,
    parameterZ: rhoZ,
    parameterP: normalTwoSided(rhoZ),
    coefficients,
    sigma2,
    logLik,
    aic: -2 * logLik + 2 * aicParameters,
    bic: -2 * logLik + aicParameters * Math.log(n),
    lr: { stat: lrStat, df: 1, p: chiSquareUpper(lrStat, 1) },
    pseudoR2: squaredCorrelation(y, fitted),
    residuals: e,
    fitted,
    lmRemainingError: { stat: lmStat, df: 1, p: Number.isNaN(lmStat) ? NaN : chiSquareUpper(lmStat, 1) },
    breuschPagan: breuschPagan(e, x),
    covariance,
    range: { lower: algebra.range.lower, upper: algebra.range.upper },
    logDeterminantMethod: algebra.logdet.accuracyAt ? `${algebra.logdet.method}; ${algebra.logdet.accuracyAt(rho)}` : algebra.logdet.method,
    convergence,
    warnings,
  };
}

/** Xβ: each column of the design times its coefficient, summed in column order. */
export function linearPredictor(x: Design, beta: ArrayLike<number>, n: number): Float64Array {
  const out = new Float64Array(n);
  for (let j = 0; j < x.columns.length; j++) for (let i = 0; i < n; i++) out[i] += beta[j] * x.columns[j][i];
  return out;
}

/**
 * The reduced form (I − ρW)⁻¹Xβ: by the algebra's direct solve when it has one (a sparse algebra
 * keeps the factor of I − ρW from the traces at ρ), else by GMRES, with a warning when that stops short.
 */
export function reducedForm(algebra: WeightsAlgebra, w: WeightsAlgebra['w'], rho: number, xb: Float64Array, warnings: string[]): Float64Array {
  if (algebra.solve) return algebra.solve(rho, xb);
  const solved = solveShifted(w, rho, xb);
  if (!solved.converged) warnings.push(`The reduced-form solve reached a relative residual of ${solved.relativeResidual.toExponential(1)} only.`);
  return solved.x;
}

export function residual(y: Float64Array, x: Design, beta: ArrayLike<number>): Float64Array {
  const out = Float64Array.from(y);
  for (let j = 0; j < beta.length; j++) {
    const c = x.columns[j];
    const b = beta[j];
    for (let i = 0; i < out.length; i++) out[i] -= b * c[i];
  }
  return out;
}

export function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}
