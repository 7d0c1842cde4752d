import { applyQ, applyQt, csrMultiply, csrMultiplyTransposed, householderQr, qrSolve, transpose, type CsrMatrix, type HouseholderQr } from '../linalg/index.js';
import { chiSquareUpper, normalTwoSided } from '../stats/index.js';
import { brentMaximise } from './brent.js';
import { searchInterval, squaredCorrelation } from './information.js';
import type { WaldTest } from './lag-iv.js';
import type { PreparedInputs } from './model-entry.js';
import { dot, linearPredictor, residual } from './ml-lag.js';
import { table, whiteCovariance } from './ols.js';
import type { Coefficient } from './types.js';

export const GM_COVARIANCE = 'robust to unequal variance (Kelejian & Prucha 2010)';

export interface ErrorGmFit {
  lambda: number;
  lambdaSe: number;
  lambdaZ: number;
  lambdaP: number;
  /** the first, unweighted estimate of λ (step 1b) */
  lambdaInitial: number;
  coefficients: Coefficient[];
  /** ε'ε/n, ε = (I − λW)(y − Xβ) */
  sigma2: number;
  /** squared correlation of y and Xβ */
  pseudoR2: number;
  /** y − Xβ */
  residuals: Float64Array;
  /** Xβ */
  fitted: Float64Array;
  /** covariance of (β, λ), row-major, robust to unknown heteroskedasticity */
  covariance: Float64Array;
  /** which standard errors the coefficients carry: robust always */
  covarianceKind: typeof GM_COVARIANCE;
  /** the moment conditions' value at the estimate, weighted (the criterion minimised) */
  criterion: number;
  wald: WaldTest[];
  range: { lower: number; upper: number };
  warnings: string[];
}

/**
 * The error model y = Xβ + u, u = λWu + ε with E ε = 0 and unknown, possibly unequal variances
 * E εᵢ² = σᵢ², by the generalised moments estimator robust to heteroskedasticity (Kelejian & Prucha
 * 2010, J. Econometrics 157; Arraiz, Drukker, Kelejian & Prucha 2010, J. Regional Science 50, the
 * model without a spatial lag). The moment conditions are n⁻¹E[ε'A₁ε] = n⁻¹E[ε'A₂ε] = 0 with
 *   A₁ = WᵀW − diag(WᵀW), A₂ = W − diag(W)
 * (both with a zero diagonal, which is what keeps them valid when the variances differ). With u the
 * residuals, ū = Wu and ε = u − λū they read m(λ) = γ − Γ[λ, λ²]ᵀ,
 *   γ_s = n⁻¹u'A_s u, Γ_s1 = n⁻¹(u'A_s ū + ū'A_s u), Γ_s2 = −n⁻¹ū'A_s ū.
 * Steps (as published; the weighting and the variance are their formulas with the instruments H
 * equal to the filtered regressors Z* = (I − λW)X, since X is exogenous — our reading for this model):
 *   1a. least squares of y on X → u;
 *   1b. λ̃ minimises m'm (unweighted);
 *   2a. β̂ by generalised least squares at λ̃ (least squares of (I − λ̃W)y on Z*(λ̃)) → û = y − Xβ̂;
 *   2b. λ̂ minimises m'Ψ̂⁻¹m (moments from û) with Ψ̂ at λ̃:
 *       ψ_rs = (2n)⁻¹ tr[(A_r + A_rᵀ)Σ(A_s + A_sᵀ)Σ] + n⁻¹a_rᵀΣa_s, Σ = diag(ε̂ᵢ²),
 *       a_r = T α_r = −P_{Z*}(A_r + A_rᵀ)ε̂ (T = Z*(n⁻¹Z*ᵀZ*)⁻¹, α_r = −n⁻¹Z*ᵀ(A_r + A_rᵀ)ε̂).
 * Variance at (β̂, λ̂) (Ψ̂ and Z* there): with J = Γ[1, 2λ̂]ᵀ,
 *   Var λ̂ = (JᵀΨ̂⁻¹J)⁻¹/n; Var β̂ = (Z*ᵀZ*)⁻¹Z*ᵀΣZ*(Z*ᵀZ*)⁻¹ (White's form);
 *   Cov(β̂, λ̂) = n⁻¹ P Ψ_δλ Ψ̂⁻¹J (JᵀΨ̂⁻¹J)⁻¹, P = (n⁻¹Z*ᵀZ*)⁻¹, Ψ_δλ = n⁻¹Z*ᵀΣ[a₁ a₂].
 * λ is searched over the admissible range: a grid of the quartic criterion, then Brent at the best
 * point. No likelihood: the Wald test of λ = 0 (1 df) stands in for the likelihood ratio.
 */
export function fitErrorGm(p: PreparedInputs): ErrorGmFit {
  const { y, design: x } = p;
  const w = p.w;
  const n = y.length;
  const k = x.columns.length;
  const warnings: string[] = [];
  const ops = momentOperators(w);
  const wx = x.columns.map((c) => csrMultiply(w, c));
  const wy = csrMultiply(w, y);
  const { lo, hi } = searchInterval(p.algebra.range);

  // 1a, 1b
  const u0 = residual(y, x, qrSolve(householderQr(x.columns), y));
  const first = momentsOf(u0, ops);
  const lambda0 = minimiseCriterion(first, [1, 0, 0, 1], lo, hi);
  // 2a
  const gls = (lambda: number) => {
    const zs = x.columns.map((c, j) => c.map((v, i) => v - lambda * wx[j][i]));
    const qr = householderQr(zs);
    return { qr, beta: qrSolve(qr, y.map((v, i) => v - lambda * wy[i])) };
  };
  const step2 = gls(lambda0.x);
  const beta = step2.beta;
  const u = residual(y, x, beta);
  const moments = momentsOf(u, ops);
  // 2b
  const psi0 = momentVariance(u, lambda0.x, step2.qr, ops);
  const weight = inverse2(psi0.psi);
  if (!weight) throw new Error('the variance of the moment conditions is singular');
  const lambdaHat = minimiseCriterion(moments, weight, lo, hi);
  const lambda = lambdaHat.x;
  if (lambdaHat.atBound) warnings.push(`The moments estimate of λ lies at the ${lambdaHat.atBound} end of the admissible range; the model may not suit these data.`);

  // variance at (β̂, λ̂)
  const at = gls(lambda);
  const psi = momentVariance(u, lambda, at.qr, ops);
  const psiInv = inverse2(psi.psi);
  const j0 = moments.gamma1[0] + 2 * lambda * moments.gamma2[0];
  const j1 = moments.gamma1[1] + 2 * lambda * moments.gamma2[1];
  const q = k + 1;
  const covariance = new Float64Array(q * q).fill(NaN);
  const vBeta = whiteCovariance(at.qr, psi.eps);
  for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) covariance[a * q + b] = vBeta[a * k + b];
  if (psiInv) {
    const v0 = psiInv[0] * j0 + psiInv[1] * j1;
    const v1 = psiInv[2] * j0 + psiInv[3] * j1;
    const s = 1 / (j0 * v0 + j1 * v1);
    covariance[k * q + k] = s / n;
    // Ψ_δλ v: n⁻¹ Z*ᵀ Σ (a₁ v₀ + a₂ v₁), then P = n (Z*ᵀZ*)⁻¹ and a last n⁻¹
    const combo = new Float64Array(n);
    for (let i = 0; i < n; i++) combo[i] = psi.sigma[i] * (psi.a1[i] * v0 + psi.a2[i] * v1);
    const cross = zTransposeTimes(at.qr, combo); // (Z*ᵀZ*)⁻¹ Z*ᵀ combo
    for (let a = 0; a < k; a++) {
      const c = (cross[a] * s) / n;
      covariance[a * q + k] = c;
      covariance[k * q + a] = c;
    }
  } else {
    warnings.push('The variance of the moment conditions is singular at the estimate, so the standard error of λ is not available.');
  }
  const coefficients = table(x, beta, (j) => Math.sqrt(covariance[j * q + j]), null);
  const lambdaSe = Math.sqrt(covariance[k * q + k]);
  const lambdaZ = lambda / lambdaSe;
  const fitted = linearPredictor(x, beta, n);
  const wald = lambdaZ * lambdaZ;
  return {
    lambda, lambdaSe, lambdaZ, lambdaP: normalTwoSided(lambdaZ),
    lambdaInitial: lambda0.x,
    coefficients,
    sigma2: dot(psi.eps, psi.eps) / n,
    pseudoR2: squaredCorrelation(y, fitted),
    residuals: u,
    fitted,
    covariance,
    criterion: lambdaHat.value,
    covarianceKind: GM_COVARIANCE,
    wald: [{ against: 'ols', restriction: 'λ = 0', stat: wald, df: 1, p: chiSquareUpper(wald, 1) }],
    range: { lower: p.algebra.range.lower, upper: p.algebra.range.upper },
    warnings,
  };
}

/** What the two moment matrices need from W: W, Wᵀ products, diag(WᵀW), diag(W), and WᵀW for the traces. */
interface MomentOperators {
  w: CsrMatrix;
  n: number;
  /** diag(WᵀW)ᵢ = Σ_r W_ri² */
  dWtW: Float64Array;
  /** diag(W) */
  dW: Float64Array;
}

function momentOperators(w: CsrMatrix): MomentOperators {
  const n = w.n;
  const dWtW = new Float64Array(n);
  const dW = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) {
      dWtW[w.colIdx[p]] += w.values[p] * w.values[p];
      if (w.colIdx[p] === i) dW[i] += w.values[p];
    }
  }
  return { w, n, dWtW, dW };
}

/** u'A₁v and u'A₂v for the vectors given with their products W·. */
function quad1(u: Float64Array, wu: Float64Array, v: Float64Array, wv: Float64Array, o: MomentOperators): number {
  let s = 0;
  for (let i = 0; i < o.n; i++) s += wu[i] * wv[i] - o.dWtW[i] * u[i] * v[i];
  return s;
}
function quad2(u: Float64Array, v: Float64Array, wv: Float64Array, o: MomentOperators): number {
  let s = 0;
  for (let i = 0; i < o.n; i++) s += u[i] * wv[i] - o.dW[i] * u[i] * v[i];
  return s;
}

/** γ and the two columns of Γ from residuals u (KP 2010's sample moments). */
interface Moments { gamma: [number, number]; gamma1: [number, number]; gamma2: [number, number] }

function momentsOf(u: Float64Array, o: MomentOperators): Moments {
  const n = o.n;
  const ub = csrMultiply(o.w, u);
  const ubb = csrMultiply(o.w, ub);
  return {
    gamma: [quad1(u, ub, u, ub, o) / n, quad2(u, u, ub, o) / n],
    gamma1: [2 * quad1(u, ub, ub, ubb, o) / n, (quad2(u, ub, ubb, o) + quad2(ub, u, ub, o)) / n],
    gamma2: [-quad1(ub, ubb, ub, ubb, o) / n, -quad2(ub, ub, ubb, o) / n],
  };
}

/** The weighted criterion m(λ)ᵀΥm(λ), Υ row-major 2×2. */
function criterion(m: Moments, upsilon: ArrayLike<number>, lambda: number): number {
  const m0 = m.gamma[0] - m.gamma1[0] * lambda - m.gamma2[0] * lambda * lambda;
  const m1 = m.gamma[1] - m.gamma1[1] * lambda - m.gamma2[1] * lambda * lambda;
  return upsilon[0] * m0 * m0 + (upsilon[1] + upsilon[2]) * m0 * m1 + upsilon[3] * m1 * m1;
}

/** The criterion is a quartic in λ: a grid of 401 points finds the lowest valley, Brent polishes it. */
function minimiseCriterion(m: Moments, upsilon: ArrayLike<number>, lo: number, hi: number): { x: number; value: number; atBound?: 'lower' | 'upper' } {
  const steps = 400;
  let best = 0;
  let bestValue = Infinity;
  for (let i = 0; i <= steps; i++) {
    const v = criterion(m, upsilon, lo + ((hi - lo) * i) / steps);
    if (v < bestValue) { bestValue = v; best = i; }
  }
  const a = lo + ((hi - lo) * Math.max(0, best - 1)) / steps;
  const b = lo + ((hi - lo) * Math.min(steps, best + 1)) / steps;
  const found = brentMaximise((t) => -criterion(m, upsilon, t), a, b, { tolerance: 1e-13 });
  const edge = 1e-9 * (hi - lo);
  const atBound = found.x - lo <= edge + 1e-8 ? 'lower' : hi - found.x <= edge + 1e-8 ? 'upper' : undefined;
  return { x: found.x, value: -found.value, ...(atBound ? { atBound } : {}) };
}

/**
 * Ψ at λ from residuals u (ε = u − λWu) and the QR of Z*(λ): the trace part over the nonzeros of
 * B₁ = 2(WᵀW − diag) and B₂ = W + Wᵀ − 2diag(W), and the a_r part by projection.
 */
function momentVariance(u: Float64Array, lambda: number, qrZ: HouseholderQr, o: MomentOperators) {
  const n = o.n;
  const w = o.w;
  const wu = csrMultiply(w, u);
  const eps = u.map((v, i) => v - lambda * wu[i]);
  const sigma = eps.map((e) => e * e);
  // B₁ε = 2(Wᵀ(Wε) − d∘ε), B₂ε = Wε + Wᵀε − 2 diag(W) ε
  const we = csrMultiply(w, eps);
  const wtwe = csrMultiplyTransposed(w, we);
  const wte = csrMultiplyTransposed(w, eps);
  const b1e = eps.map((e, i) => 2 * (wtwe[i] - o.dWtW[i] * e));
  const b2e = eps.map((e, i) => we[i] + wte[i] - 2 * o.dW[i] * e);
  const a1 = project(qrZ, b1e).map((v) => -v);
  const a2 = project(qrZ, b2e).map((v) => -v);
  const t = pairTraces(w, sigma, o);
  let s11 = 0, s12 = 0, s22 = 0;
  for (let i = 0; i < n; i++) {
    s11 += a1[i] * sigma[i] * a1[i];
    s12 += a1[i] * sigma[i] * a2[i];
    s22 += a2[i] * sigma[i] * a2[i];
  }
  const psi = [t.t11 / (2 * n) + s11 / n, t.t12 / (2 * n) + s12 / n, t.t12 / (2 * n) + s12 / n, t.t22 / (2 * n) + s22 / n];
  return { psi, eps, sigma, a1, a2 };
}

/**
 * Σ_ij (B_r)_ij (B_s)_ij σ_i σ_j for r, s = 1, 2 (= tr(B_r Σ B_s Σ), the B symmetric), with
 * B₁ = 2(WᵀW − diag(WᵀW)) and B₂ = W + Wᵀ − 2diag(W): row by row, B₂'s row scattered into a
 * dense work array, WᵀW's row formed from the rows of W that name area i.
 */
function pairTraces(w: CsrMatrix, sigma: Float64Array, o: MomentOperators): { t11: number; t12: number; t22: number } {
  const n = w.n;
  const wt = transpose(w);
  const b2 = new Float64Array(n);
  const wtw = new Float64Array(n);
  const touched: number[] = [];
  const mark = new Uint8Array(n);
  let t11 = 0, t12 = 0, t22 = 0;
  for (let i = 0; i < n; i++) {
    touched.length = 0;
    const touch = (j: number) => { if (!mark[j]) { mark[j] = 1; touched.push(j); } };
    for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) { const j = w.colIdx[p]; touch(j); b2[j] += w.values[p]; }
    for (let p = wt.rowPtr[i]; p < wt.rowPtr[i + 1]; p++) { const j = wt.colIdx[p]; touch(j); b2[j] += wt.values[p]; }
    // (WᵀW)_ij = Σ_r W_ri W_rj: r over the rows of W that name i (row i of Wᵀ)
    for (let p = wt.rowPtr[i]; p < wt.rowPtr[i + 1]; p++) {
      const r = wt.colIdx[p];
      const wri = wt.values[p];
      for (let q = w.rowPtr[r]; q < w.rowPtr[r + 1]; q++) { const j = w.colIdx[q]; touch(j); wtw[j] += wri * w.values[q]; }
    }
    b2[i] -= 2 * o.dW[i];
    wtw[i] = 0; // the diagonal is taken out of A₁
    for (const j of touched) {
      const s = sigma[i] * sigma[j];
      const e1 = 2 * wtw[j];
      const e2 = b2[j];
      t11 += e1 * e1 * s;
      t12 += e1 * e2 * s;
      t22 += e2 * e2 * s;
      b2[j] = 0;
      wtw[j] = 0;
      mark[j] = 0;
    }
  }
  return { t11, t12, t22 };
}

/** P_Z v = Q Qᵀ v. */
function project(qr: HouseholderQr, v: Float64Array): Float64Array {
  const c = applyQt(qr, v);
  const kept = new Float64Array(qr.n);
  for (let i = 0; i < qr.k; i++) kept[i] = c[i];
  return applyQ(qr, kept);
}

/** (ZᵀZ)⁻¹Zᵀv = the least-squares coefficients of v on Z. */
function zTransposeTimes(qr: HouseholderQr, v: Float64Array): Float64Array {
  return qrSolve(qr, v);
}

function inverse2(m: number[]): number[] | null {
  const det = m[0] * m[3] - m[1] * m[2];
  if (!(Math.abs(det) > 0) || !Number.isFinite(det)) return null;
  return [m[3] / det, -m[1] / det, -m[2] / det, m[0] / det];
}
