import { InputError, listSome } from '../errors.js';
import { firstDependentColumn, householderQr, inverseCrossProduct, qrSolve, thinQ, type HouseholderQr } from '../linalg/index.js';
import {
  breuschPagan,
  conditionNumber,
  fUpper,
  jarqueBera,
  breuschPaganStudentised,
  normalTwoSided,
  studentTwoSided,
} from '../stats/index.js';
import type { Coefficient, Design, OlsFit } from './types.js';
import { formatCount } from '../core/count.js';

/** A design with an intercept first (named "constant", marked by its index 0), then the given columns in order. */
export function designWithIntercept(names: string[], columns: Float64Array[], n = columns[0]?.length ?? 0): Design {
  return { names: ['constant', ...names], columns: [new Float64Array(n).fill(1), ...columns], intercept: 0 };
}

/** Relative tolerance on |R_jj| / ‖x_j‖ below which a column counts as a combination of earlier ones. */
const RANK_TOLERANCE = 1e-10;
/** Belsley, Kuh & Welsch's rule of thumb (common practice): above 30, multicollinearity is a concern. */
const CONDITION_WARNING = 30;

/**
 * Ordinary least squares by Householder QR of X (never the normal equations):
 *   β = R⁻¹Qᵀy, σ² = e'e/(n − k), Var β = σ²(X'X)⁻¹ = σ²R⁻¹R⁻ᵀ, t = β/se with n − k df;
 *   R² = 1 − e'e/Σ(y − ȳ)², adj R² = 1 − (1 − R²)(n − 1)/(n − k),
 *   F = [R²/(k − 1)] / [(1 − R²)/(n − k)] on (k − 1, n − k) df;
 *   logL = −n/2 ln(2π) − n/2 ln(e'e/n) − n/2, AIC = −2logL + 2k, BIC = −2logL + k ln n
 *   (k counts the β's; σ² is not counted — the convention used for the spatial models too).
 * Robust (White 1980, HC0): Var β = (X'X)⁻¹ X' diag(e²) X (X'X)⁻¹, with Student t p-values.
 */
export function fitOls(y: Float64Array, x: Design, opts: { robust?: boolean } = {}): OlsFit {
  const n = y.length;
  const k = x.columns.length;
  checkDesign(y, x);
  const qr = householderQr(x.columns);
  checkRank(qr, x);
  const beta = qrSolve(qr, y);
  const fitted = new Float64Array(n);
  for (let j = 0; j < k; j++) {
    const c = x.columns[j];
    for (let i = 0; i < n; i++) fitted[i] += beta[j] * c[i];
  }
  const residuals = y.map((v, i) => v - fitted[i]);
  let ssr = 0;
  let mean = 0;
  for (let i = 0; i < n; i++) {
    ssr += residuals[i] * residuals[i];
    mean += y[i];
  }
  mean /= n;
  let tss = 0;
  for (let i = 0; i < n; i++) tss += (y[i] - mean) ** 2;
  const sigma2 = ssr / (n - k);
  const cov = inverseCrossProduct(qr);
  const coefficients = table(x, beta, (j) => Math.sqrt(sigma2 * cov[j * k + j]), n - k);
  const r2 = 1 - ssr / tss;
  const adjR2 = 1 - ((1 - r2) * (n - 1)) / (n - k);
  const fStat = k > 1 ? (r2 / (k - 1)) / ((1 - r2) / (n - k)) : NaN;
  const logLik = -0.5 * n * Math.log(2 * Math.PI) - 0.5 * n * Math.log(ssr / n) - 0.5 * n;
  const warnings: string[] = [];
  const cn = conditionNumber(x);
  if (cn > CONDITION_WARNING) {
    warnings.push(
      `The condition number of the regressors is ${cn.toFixed(1)}, above 30 (a common rule of thumb): ` +
        'the regressors are close to collinear, so individual coefficients may be unstable.',
    );
  }
  const fit: OlsFit = {
    n,
    k,
    coefficients,
    residuals,
    fitted,
    r2,
    adjR2,
    f: { stat: fStat, df: k - 1, df2: n - k, p: k > 1 ? fUpper(fStat, k - 1, n - k) : NaN },
    sigma2,
    sigma2ML: ssr / n,
    logLik,
    aic: -2 * logLik + 2 * k,
    bic: -2 * logLik + k * Math.log(n),
    conditionNumber: cn,
    jarqueBera: jarqueBera(residuals),
    breuschPagan: breuschPagan(residuals, x),
    breuschPaganStudentised: breuschPaganStudentised(residuals, x),
    warnings,
  };
  if (opts.robust) {
    const robust = whiteCovariance(qr, residuals);
    fit.robustCoefficients = table(x, beta, (j) => Math.sqrt(robust[j * k + j]), n - k);
  }
  return fit;
}

/** One row per column of the design (the intercept's marked as such); Student t with df, normal z when df is null. */
export function table(x: Design, beta: Float64Array, se: (j: number) => number, df: number | null): Coefficient[] {
  return x.names.map((name, j) => {
    const s = se(j);
    const stat = beta[j] / s;
    const c: Coefficient = { name, estimate: beta[j], se: s, stat, p: df === null ? normalTwoSided(stat) : studentTwoSided(stat, df) };
    if (j === x.intercept) c.intercept = true;
    return c;
  });
}


/** HC0: with Z = XR⁻¹ = Q (thin), Var β = R⁻¹ (Σ e_i² z_i z_iᵀ) R⁻ᵀ. */
export function whiteCovariance(qr: HouseholderQr, e: Float64Array): Float64Array {
  const { k, n } = qr;
  const q = thinQ(qr);
  const meat = new Float64Array(k * k);
  for (let i = 0; i < n; i++) {
    const e2 = e[i] * e[i];
    for (let a = 0; a < k; a++) for (let b = a; b < k; b++) meat[a * k + b] += e2 * q[a][i] * q[b][i];
  }
  for (let a = 0; a < k; a++) for (let b = 0; b < a; b++) meat[a * k + b] = meat[b * k + a];
  // R⁻¹ columns by back substitution
  const rinv = new Float64Array(k * k);
  for (let c = 0; c < k; c++) {
    for (let i = k - 1; i >= 0; i--) {
      let s = i === c ? 1 : 0;
      for (let m = i + 1; m < k; m++) s -= qr.r[i * k + m] * rinv[m * k + c];
      rinv[i * k + c] = s / qr.r[i * k + i];
    }
  }
  // one triangle, mirrored: the two orders of summation would differ in the last bit, and a
  // covariance that is not exactly symmetric is refused by the Cholesky factor the effects draw from
  const out = new Float64Array(k * k);
  for (let a = 0; a < k; a++) {
    for (let b = a; b < k; b++) {
      let s = 0;
      for (let u = 0; u < k; u++) for (let v = 0; v < k; v++) s += rinv[a * k + u] * meat[u * k + v] * rinv[b * k + v];
      out[a * k + b] = s;
      out[b * k + a] = s;
    }
  }
  return out;
}

function checkDesign(y: Float64Array, x: Design): void {
  const n = y.length;
  const k = x.columns.length;
  if (x.names.length !== k) throw new Error(`design has ${formatCount(k)} columns but ${x.names.length} names`);
  if (x.intercept !== null && !(x.intercept >= 0 && x.intercept < k && x.columns[x.intercept].every((v) => v === 1))) {
    throw new Error(`design's intercept ${x.intercept} is not a column of ones`);
  }
  for (let j = 0; j < k; j++) {
    if (x.columns[j].length !== n) {
      throw new InputError(`Column "${x.names[j]}" has ${formatCount(x.columns[j].length)} values but the outcome has ${formatCount(n)}; every column needs one value per area.`, { column: x.names[j] });
    }
  }
  if (n <= k) {
    throw new InputError(
      `There are ${formatCount(n)} areas and ${formatCount(k)} coefficients to estimate (n = ${n}, k = ${k}); a regression needs more areas than coefficients. Use fewer explanatory columns or more areas.`,
    );
  }
  const first = y[0];
  if (y.every((v) => v === first)) {
    throw new InputError(`The outcome has the same value (${first}) in every area, so there is nothing to explain; choose an outcome that varies.`);
  }
  for (let j = 0; j < k; j++) {
    const c = x.columns[j];
    const isConstant = c.every((v) => v === c[0]);
    if (isConstant && j !== x.intercept) {
      throw new InputError(
        `Column "${x.names[j]}" has the same value (${c[0]}) in every area, so its effect cannot be told apart from the intercept; remove it.`,
        { column: x.names[j] },
      );
    }
  }
}

/** Perfect collinearity: name the dependent column and the earlier columns it is built from. */
function checkRank(qr: HouseholderQr, x: Design): void {
  const j = firstDependentColumn(qr, RANK_TOLERANCE);
  if (j < 0) return;
  const partners: string[] = [];
  if (j > 0) {
    const earlier = householderQr(x.columns.slice(0, j));
    const coef = qrSolve(earlier, x.columns[j]);
    const norm = qr.columnNorms[j];
    for (let c = 0; c < j; c++) {
      if (Math.abs(coef[c]) * earlier.columnNorms[c] > 1e-8 * norm) partners.push(`"${x.names[c]}"`);
    }
  }
  const with_ = partners.length > 0 ? ` of ${listSome(partners)}` : '';
  throw new InputError(
    `Column "${x.names[j]}" is an exact combination${with_} (perfect collinearity), so the coefficients cannot be separated; remove "${x.names[j]}" or one of the columns it depends on.`,
    { column: x.names[j] },
  );
}
