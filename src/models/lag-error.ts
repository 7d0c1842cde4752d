import { csrMultiply, householderQr, qrSolve, solveShifted, type TracesAt, type WeightsAlgebra } from '../linalg/index.js';
import { breuschPagan, chiSquareUpper, normalTwoSided } from '../stats/index.js';
import { brentMaximise } from './brent.js';
import { invertInformation, searchInterval, squaredCorrelation } from './information.js';
import { lagErrorCrossTraces } from './lag-error-traces.js';
import { maximise2d, polishSeparable2d, type Search2d } from './maximise-2d.js';
import type { PreparedInputs } from './model-entry.js';
import { dot } from './ml-lag.js';
import { table } from './ols.js';
import type { Coefficient, Convergence, TestResult } from './types.js';

export interface LagErrorFit {
  rho: number;
  rhoSe: number;
  rhoZ: number;
  rhoP: number;
  lambda: number;
  lambdaSe: number;
  lambdaZ: number;
  lambdaP: number;
  coefficients: Coefficient[];
  /** ε'ε/n, ε = (I − λW)((I − ρW)y − Xβ) */
  sigma2: number;
  logLik: number;
  aic: number;
  bic: number;
  /** likelihood ratio against the plain regression (ρ = λ = 0, 2 df) */
  lr: TestResult;
  /** squared correlation of y and the reduced-form prediction (I − ρW)⁻¹Xβ */
  pseudoR2: number;
  /** y − ρWy − Xβ (the error term u, before its own spatial filter) */
  residuals: Float64Array;
  /** (I − ρW)⁻¹Xβ */
  fitted: Float64Array;
  /** Breusch–Pagan on the innovations ε against X */
  breuschPagan: TestResult;
  /** covariance of (β, ρ, λ, σ²), row-major, from the inverse of the full information matrix */
  covariance: Float64Array;
  range: { lower: number; upper: number };
  logDeterminantMethod: string;
  /** how the traces of the information matrix were found */
  traceMethod: string;
  convergence: Convergence;
  /** evaluations of the exact log-determinant (large n) or of the likelihood (small n) the search used */
  evaluations: number;
  evaluationsOf: 'exact log-determinant' | 'likelihood';
  warnings: string[];
}

/**
 * The lag-and-error model y = ρWy + Xβ + u, u = λWu + ε, ε ~ N(0, σ²I), by maximum likelihood
 * (Anselin 1988, §6.2, the model with both a spatial lag and a spatial error, same W in both;
 * Kelejian & Prucha 1998 estimate the same model by instruments). With A = I − ρW, B = I − λW:
 *   logL = −n/2 ln(2πσ²) + ln|A| + ln|B| − ε'ε/(2σ²), ε = B(Ay − Xβ).
 * Concentrated: β(ρ, λ) is the least-squares fit of BAy on BX, σ² = ε'ε/n, and
 *   L_c(ρ, λ) = −n/2 (ln 2π + 1) − n/2 ln(ε'ε/n) + ln|I − ρW| + ln|I − λW|.
 * ε'ε at any (ρ, λ) comes from one QR of the n × (2k + 3) matrix T = [X, WX, y, Wy, W²y]: BX and
 * BAy = y − (ρ + λ)Wy + ρλW²y are T times a small matrix, so the residual sum of squares is the last
 * diagonal² of the QR of R times that matrix — O(k³) per evaluation, and as stable.
 * The two log-determinants are the same function at two points, so each exact evaluation serves
 * either parameter. Search: bounded on the admissible range in both parameters (maximise-2d.ts) —
 * a grid, then nested Brent; at large n bracketed with the cheap log-determinant and polished with
 * exact ones, two per step. The evaluations used are reported.
 *
 * Covariance of (β, ρ, λ, σ²): the inverse (Cholesky) of the full information matrix. With
 * G = WA⁻¹, H = WB⁻¹ (functions of W, so BGB⁻¹ = G) and GXβ = Wŷ, ŷ = A⁻¹Xβ (derived here from
 * the expected second derivatives; the same form as Anselin 1988, §6.2, with W₁ = W₂):
 *   I_ββ = (BX)'(BX)/σ², I_βρ = (BX)'(BGXβ)/σ², I_βλ = I_βσ² = 0,
 *   I_ρρ = tr G² + tr GᵀG + (BGXβ)'(BGXβ)/σ², I_ρλ = tr GH + tr HᵀG, I_ρσ² = tr G/σ²,
 *   I_λλ = tr H² + tr HᵀH, I_λσ² = tr H/σ², I_σ²σ² = n/(2σ⁴).
 * Reported: AIC = −2logL + 2(k + 2), BIC with (k + 2) ln n (β's, ρ and λ; σ² not counted, as for the
 * other models); LR against the plain regression with 2 df; pseudo-R² = corr(y, ŷ)².
 * `fixedRho` / `fixedLambda` hold one parameter (the model then is the error or the lag model; its
 * row of the information matrix is left out and its standard error is not given).
 */
export function fitLagError(p: PreparedInputs, opts: { fixedRho?: number; fixedLambda?: number } = {}): LagErrorFit {
  const { y, design: x, algebra } = p;
  const n = y.length;
  const k = x.columns.length;
  const w = algebra.w;
  const wy = csrMultiply(w, y);
  const w2y = csrMultiply(w, wy);
  const wx = x.columns.map((c) => csrMultiply(w, c));
  const m = 2 * k + 3;
  const tall = householderQr([...x.columns, ...wx, y, wy, w2y]);
  const r = tall.r;
  const ssrAt = (rho: number, lambda: number): number => {
    const cols: Float64Array[] = [];
    for (let j = 0; j < k; j++) {
      const c = new Float64Array(m);
      for (let i = 0; i < m; i++) c[i] = r[i * m + j] - lambda * r[i * m + k + j];
      cols.push(c);
    }
    const t = new Float64Array(m);
    for (let i = 0; i < m; i++) t[i] = r[i * m + 2 * k] - (rho + lambda) * r[i * m + 2 * k + 1] + rho * lambda * r[i * m + 2 * k + 2];
    cols.push(t);
    const d = householderQr(cols).r[k * (k + 1) + k];
    return d * d;
  };
  const constant = -0.5 * n * (Math.log(2 * Math.PI) + 1);
  const cheap = (rho: number, lambda: number): number => constant - 0.5 * n * Math.log(ssrAt(rho, lambda) / n);
  // the same value is asked for again and again (grid lines, the outer parameter of the nested search)
  const seen = new Map<number, number>();
  const g = (t: number) => { let v = seen.get(t); if (v === undefined) { v = algebra.logdet.evaluate(t); seen.set(t, v); } return v; };

  const { lo, hi } = searchInterval(algebra.range);
  let found: Search2d;
  if (opts.fixedLambda !== undefined || opts.fixedRho !== undefined) {
    const heldLambda = opts.fixedLambda !== undefined;
    const held = heldLambda ? opts.fixedLambda! : opts.fixedRho!;
    const gHeld = g(held);
    let count = 0;
    const best = brentMaximise((t) => { count++; return (heldLambda ? cheap(t, held) : cheap(held, t)) + g(t) + gHeld; }, lo, hi);
    found = heldLambda
      ? { x: best.x, y: held, value: best.value, convergence: best.convergence, evaluations: count }
      : { x: held, y: best.x, value: best.value, convergence: best.convergence, evaluations: count };
    found.convergence.message += `; ${heldLambda ? 'λ' : 'ρ'} held fixed at ${held}`;
  } else if (algebra.roughLogdet) {
    found = polishSeparable2d(cheap, algebra.logdet, algebra.roughLogdet, { xlo: lo, xhi: hi, ylo: lo, yhi: hi });
  } else {
    found = maximise2d((a, b) => cheap(a, b) + g(a) + g(b), { xlo: lo, xhi: hi, ylo: lo, yhi: hi });
  }
  const rho = found.x;
  const lambda = found.y;
  const logLik = found.value;
  const convergence = found.convergence;
  const warnings: string[] = [];
  if (!convergence.converged || convergence.atBound) warnings.push(convergence.message);

  // β, ε and σ² at the estimate, from the full-length filtered regression
  const bx = x.columns.map((c, j) => c.map((v, i) => v - lambda * wx[j][i]));
  const bay = y.map((v, i) => v - (rho + lambda) * wy[i] + rho * lambda * w2y[i]);
  const qr = householderQr(bx);
  const beta = qrSolve(qr, bay);
  const eps = Float64Array.from(bay);
  for (let j = 0; j < k; j++) for (let i = 0; i < n; i++) eps[i] -= beta[j] * bx[j][i];
  const sigma2 = dot(eps, eps) / n;
  const xb = new Float64Array(n);
  for (let j = 0; j < k; j++) for (let i = 0; i < n; i++) xb[i] += beta[j] * x.columns[j][i];
  const residuals = y.map((v, i) => v - rho * wy[i] - xb[i]);

  // traces at λ first, then the cross traces (solves at λ, then at ρ), then at ρ, whose factor
  // (a sparse algebra keeps the last) serves the reduced-form solve
  const tracesAt = memo(algebra);
  const trH = tracesAt(lambda);
  const cross = lagErrorCrossTraces(algebra, rho, lambda, tracesAt);
  const trG = tracesAt(rho);
  let fitted: Float64Array;
  if (algebra.solve) fitted = algebra.solve(rho, xb);
  else {
    const solved = solveShifted(w, rho, xb);
    if (!solved.converged) warnings.push(`The reduced-form solve reached a relative residual of ${solved.relativeResidual.toExponential(1)} only.`);
    fitted = solved.x;
  }
  const gxb = csrMultiply(w, fitted);
  const wgxb = csrMultiply(w, gxb);
  const bgxb = gxb.map((v, i) => v - lambda * wgxb[i]);

  const q = k + 3;
  const info = new Float64Array(q * q);
  const set = (a: number, b: number, v: number) => { info[a * q + b] = v; info[b * q + a] = v; };
  for (let a = 0; a < k; a++) {
    for (let b = a; b < k; b++) set(a, b, dot(bx[a], bx[b]) / sigma2);
    set(a, k, dot(bx[a], bgxb) / sigma2);
  }
  set(k, k, trG.trG2 + trG.trGtG + dot(bgxb, bgxb) / sigma2);
  set(k, k + 1, cross.trGH + cross.trHtG);
  set(k, k + 2, trG.trG / sigma2);
  set(k + 1, k + 1, trH.trG2 + trH.trGtG);
  set(k + 1, k + 2, trH.trG / sigma2);
  set(k + 2, k + 2, n / (2 * sigma2 * sigma2));
  const held = opts.fixedLambda !== undefined ? k + 1 : opts.fixedRho !== undefined ? k : -1;
  const covariance = invertKeeping(info, q, held);
  if (!covariance) warnings.push('The information matrix is not positive definite at the estimate, so standard errors are not available.');
  const cov = covariance ?? new Float64Array(q * q).fill(NaN);
  const coefficients = table(x, beta, (j) => Math.sqrt(cov[j * q + j]), null);
  const rhoSe = Math.sqrt(cov[k * q + k]);
  const lambdaSe = Math.sqrt(cov[(k + 1) * q + k + 1]);
  const aicParameters = k + 2; // β's, ρ and λ; σ² not counted (common convention)
  const lrStat = 2 * (logLik - p.ols.logLik);
  const traceMethod = `${algebra.traceMethod}; the traces joining ρ and λ ${cross.method}`;
  if (!cross.exact) warnings.push(`In the lag-and-error model's standard errors the trace joining ρ and λ was estimated: ${cross.method}.`);

  return {
    rho, rhoSe, rhoZ: rho / rhoSe, rhoP: normalTwoSided(rho / rhoSe),
    lambda, lambdaSe, lambdaZ: lambda / lambdaSe, lambdaP: normalTwoSided(lambda / lambdaSe),
    coefficients,
    sigma2,
    logLik,
    aic: -2 * logLik + 2 * aicParameters,
    bic: -2 * logLik + aicParameters * Math.log(n),
    lr: { stat: lrStat, df: 2, p: chiSquareUpper(lrStat, 2) },
    pseudoR2: squaredCorrelation(y, fitted),
    residuals,
    fitted,
    breuschPagan: breuschPagan(eps, x),
    covariance: cov,
    range: { lower: algebra.range.lower, upper: algebra.range.upper },
    logDeterminantMethod: algebra.logdet.method,
    traceMethod,
    convergence,
    evaluations: found.evaluations,
    evaluationsOf: algebra.roughLogdet && held < 0 ? 'exact log-determinant' : 'likelihood',
    warnings,
  };
}

/** The covariance of (β, ρ, λ, σ²) as the lag model's effects read it: (β, ρ, σ²), σ² not jointly used (NaN). */
export function betaRhoCovariance(covariance: Float64Array, k: number): Float64Array {
  const q = k + 3;
  const p = k + 2;
  const out = new Float64Array(p * p).fill(NaN);
  for (let a = 0; a <= k; a++) for (let b = 0; b <= k; b++) out[a * p + b] = covariance[a * q + b];
  return out;
}

/** The algebra's traces at a value, computed once each. */
function memo(algebra: WeightsAlgebra): (t: number) => TracesAt {
  const seen = new Map<number, TracesAt>();
  return (t) => {
    let v = seen.get(t);
    if (!v) { v = algebra.traces(t); seen.set(t, v); }
    return v;
  };
}

/** Inverse of the information matrix, leaving out row and column `held` (a parameter held fixed; NaN there). */
function invertKeeping(info: Float64Array, q: number, held: number): Float64Array | null {
  if (held < 0) return invertInformation(info, q);
  const keep = [...Array(q).keys()].filter((i) => i !== held);
  const s = keep.length;
  const sub = new Float64Array(s * s);
  keep.forEach((a, i) => keep.forEach((b, j) => { sub[i * s + j] = info[a * q + b]; }));
  const inv = invertInformation(sub, s);
  if (!inv) return null;
  const out = new Float64Array(q * q).fill(NaN);
  keep.forEach((a, i) => keep.forEach((b, j) => { out[a * q + b] = inv[i * s + j]; }));
  return out;
}

