import { csrMultiply } from '../linalg/index.js';
import type { WeightsAlgebra } from '../linalg/index.js';
import { householderQr, inverseCrossProduct, qrSolve } from '../linalg/index.js';
import { breuschPagan, chiSquareUpper, normalTwoSided } from '../stats/index.js';
import { brentMaximise } from './brent.js';
import { bracketAndPolish } from './bracket-polish.js';
import { invertInformation, searchInterval, searchWithinPivotLimit, squaredCorrelation } from './information.js';
import { dot, linearPredictor, residual } from './ml-lag.js';
import { fitOls, table } from './ols.js';
import type { Design, OlsFit, SpatialFit } from './types.js';

/**
 * Spatial error model y = Xβ + u, u = λWu + ε by maximum likelihood (Ord 1975; Anselin 1988, ch. 6).
 *
 * Concentrated in λ: B = I − λW; β(λ) is the OLS fit (Householder QR) of By on BX, ε = B(y − Xβ),
 *   L_c(λ) = −n/2 ln(2π) − n/2 ln(ε'ε/n) − n/2 + ln|I − λW|,
 * maximised by Brent on the admissible interval (ends shrunk by 1e-6 relative) — or, when the
 * algebra offers a cheap approximate log-determinant (large n), bracketed with it and polished with a
 * few exact evaluations (bracket-polish.ts), which reaches the same maximiser.
 *
 * Covariance (Anselin 1988, eq. 6.35ff), H = W B⁻¹: β is information-orthogonal to (λ, σ²), so
 * Var β = σ²(X'B'BX)⁻¹, and the (λ, σ²) block is the inverse of
 *   [tr H² + tr HᵀH, tr H/σ²; tr H/σ², n/(2σ⁴)].
 *
 * Reported: AIC = −2logL + 2(k + 1), BIC with (k + 1) ln n (β's and λ; σ² not counted, common
 * convention); LR against OLS, 1 df; fitted = Xβ, residuals = y − Xβ, pseudo-R² = corr(y, Xβ)²;
 * Breusch–Pagan on the filtered residuals ε = B(y − Xβ) against X.
 */
export function fitSpatialError(
  y: Float64Array,
  x: Design,
  algebra: WeightsAlgebra,
  ols?: OlsFit,
  opts: { maxIterations?: number } = {},
): SpatialFit {
  const base = ols ?? fitOls(y, x);
  const n = y.length;
  const k = x.columns.length;
  const w = algebra.w;
  const wy = csrMultiply(w, y);
  const wx = x.columns.map((c) => csrMultiply(w, c));
  const filtered = (lambda: number) => {
    const ys = y.map((v, i) => v - lambda * wy[i]);
    const xs = x.columns.map((c, j) => c.map((v, i) => v - lambda * wx[j][i]));
    const qr = householderQr(xs);
    const beta = qrSolve(qr, ys);
    const eps = residual(ys, { names: x.names, columns: xs, intercept: null }, beta);
    return { qr, beta, eps, ssr: dot(eps, eps) };
  };
  // ε'ε at any λ from one QR of the n×2(k+1) matrix [X, y, WX, Wy] = QR: [BX, By] = QR·[I; −λI],
  // so the residual sum of squares of By on BX is the last diagonal² of the QR of the small
  // 2(k+1)×(k+1) matrix R·[I; −λI] — O(k³) per λ instead of O(nk²), and as stable (no cross-products)
  const tall = householderQr([...x.columns, y, ...wx, wy]);
  const m = 2 * (k + 1);
  const ssrAt = (lambda: number): number => {
    const cols: Float64Array[] = [];
    for (let j = 0; j <= k; j++) {
      const c = new Float64Array(m);
      for (let i = 0; i < m; i++) c[i] = tall.r[i * m + j] - lambda * tall.r[i * m + k + 1 + j];
      cols.push(c);
    }
    const d = householderQr(cols).r[k * (k + 1) + k];
    return d * d;
  };
  const cheap = (lambda: number): number =>
    -0.5 * n * Math.log(2 * Math.PI) - 0.5 * n * Math.log(ssrAt(lambda) / n) - 0.5 * n;
  const concentrated = (lambda: number): number => cheap(lambda) + algebra.logdet.evaluate(lambda);

  const { lo, hi } = searchInterval(algebra.range);
  // with a costly exact log-determinant, bracket with the cheap one and polish with a few exact
  // evaluations; an explicit iteration limit asks for the plain search
  const searched = searchWithinPivotLimit((a, b) => algebra.roughLogdet && opts.maxIterations === undefined
    ? bracketAndPolish(cheap, algebra.logdet, algebra.roughLogdet, a, b)
    : brentMaximise(concentrated, a, b, { maxIterations: opts.maxIterations }), lo, hi, algebra.range, 'λ');
  const best = searched.result;
  const lambda = best.x;
  const convergence = best.convergence;
  const warnings: string[] = [];
  if (searched.warning) warnings.push(searched.warning);
  if (!convergence.converged || convergence.atBound) warnings.push(convergence.message);

  const at = filtered(lambda);
  const sigma2 = at.ssr / n;
  const logLik = best.value;
  const p = k + 2;
  const covariance = new Float64Array(p * p);
  const xtxInv = inverseCrossProduct(at.qr);
  for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) covariance[a * p + b] = sigma2 * xtxInv[a * k + b];
  const tr = algebra.traces(lambda);
  if (tr.unconverged) warnings.push(`Traces for the standard errors: ${tr.unconverged}.`);
  const block = invertInformation(
    Float64Array.from([tr.trG2 + tr.trGtG, tr.trG / sigma2, tr.trG / sigma2, n / (2 * sigma2 * sigma2)]),
    2,
  );
  if (block) {
    covariance[k * p + k] = block[0];
    covariance[k * p + k + 1] = block[1];
    covariance[(k + 1) * p + k] = block[2];
    covariance[(k + 1) * p + k + 1] = block[3];
  } else {
    warnings.push('The information matrix for λ and σ² is not positive definite at the estimate, so the standard error of λ is not available.');
    covariance[k * p + k] = NaN;
    covariance[(k + 1) * p + k + 1] = NaN;
  }
  const coefficients = table(x, at.beta, (j) => Math.sqrt(covariance[j * p + j]), null);
  const lambdaSe = Math.sqrt(covariance[k * p + k]);
  const lambdaZ = lambda / lambdaSe;
  const aicParameters = k + 1; // β's and λ; σ² not counted (common convention)
  const lrStat = 2 * (logLik - base.logLik);
  const fitted = linearPredictor(x, at.beta, n);
  const residuals = y.map((v, i) => v - fitted[i]);

  return {
    model: 'error',
    parameter: lambda,
    parameterSe: lambdaSe,
    parameterZ: lambdaZ,
    parameterP: normalTwoSided(lambdaZ),
    coefficients,
    sigma2,
    logLik,
    aic: -2 * logLik + 2 * aicParameters,
    bic: -2 * logLik + aicParameters * Math.log(n),
    lr: { stat: lrStat, df: 1, p: chiSquareUpper(lrStat, 1) },
    pseudoR2: squaredCorrelation(y, fitted),
    residuals,
    fitted,
    breuschPagan: breuschPagan(at.eps, x),
    covariance,
    range: { lower: algebra.range.lower, upper: algebra.range.upper },
    logDeterminantMethod: algebra.logdet.accuracyAt ? `${algebra.logdet.method}; ${algebra.logdet.accuracyAt(lambda)}` : algebra.logdet.method,
    convergence,
    warnings,
  };
}
