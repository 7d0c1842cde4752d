import { applyQ, applyQt, csrMultiply, firstDependentColumn, householderQr, inverseCrossProduct, qrSolve, solveShifted } from '../linalg/index.js';
import { InputError } from '../errors.js';
import { chiSquareUpper, fUpper, normalTwoSided } from '../stats/index.js';
import { squaredCorrelation } from './information.js';
import { laggedName } from './lagged-columns.js';
import type { PreparedInputs } from './model-entry.js';
import { dot } from './ml-lag.js';
import { table, whiteCovariance } from './ols.js';
import type { Coefficient, TestResult } from './types.js';

/** A Wald test of a restriction (the IV and GMM estimators' counterpart of a likelihood ratio). */
export interface WaldTest extends TestResult {
  /** the model the restriction leads to (registry key) */
  against: string;
  restriction: string;
}

export interface LagIvFit {
  rho: number;
  rhoSe: number;
  rhoZ: number;
  rhoP: number;
  coefficients: Coefficient[];
  /** e'e/n */
  sigma2: number;
  /** squared correlation of y and the reduced-form prediction (I − ρW)⁻¹Xβ */
  pseudoR2: number;
  /** y − ρWy − Xβ */
  residuals: Float64Array;
  /** (I − ρW)⁻¹Xβ */
  fitted: Float64Array;
  /** covariance of (β, ρ, σ²) in the lag model's layout (σ² is not estimated jointly: its row is NaN) */
  covariance: Float64Array;
  covarianceKind: 'classical' | 'robust to unequal variance (White 1980, HC0)';
  /** the instruments used, after dropping any that are combinations of the others */
  instruments: string[];
  /** the excluded instruments' strength: F of WX, W²X in the first-stage regression of Wy */
  firstStage: TestResult & { df2: number };
  wald: WaldTest[];
  range: { lower: number; upper: number };
  warnings: string[];
}

/**
 * The lag model y = ρWy + Xβ + ε by two-stage least squares (Kelejian & Prucha 1998, the first step of
 * their estimator; Anselin 1988, §7.2): Wy is endogenous, so it is replaced by its projection on the
 * instruments H = [X, WX, W²X] (the lags of every column but the intercept; any instrument that is a
 * combination of the others is dropped, with a note):
 *   Z = [X, Wy], Ẑ = P_H Z, δ = (ρ, β) = (ẐᵀẐ)⁻¹ẐᵀY (least squares of y on Ẑ, by QR),
 *   e = y − Zδ (with Wy itself), σ² = e'e/n,
 *   Var δ = σ²(ẐᵀẐ)⁻¹, or with `robust` White's form (ẐᵀẐ)⁻¹ Ẑᵀdiag(e²)Ẑ (ẐᵀẐ)⁻¹ (HC0; as in
 *   Kelejian & Prucha 2010 for this step).
 * No likelihood: the Wald test z² of ρ = 0 (1 df) stands in for the likelihood ratio. The first-stage
 * F of the excluded instruments says how well they predict Wy (weak instruments give unreliable
 * estimates; below 10 is a common rule of thumb for concern, Staiger & Stock 1997).
 */
export function fitLagIv(p: PreparedInputs, o: { robust?: boolean } = {}): LagIvFit {
  const { y, design: x, algebra } = p;
  const w = p.w;
  const n = y.length;
  const k = x.columns.length;
  const warnings: string[] = [];
  const wy = csrMultiply(w, y);
  let names = [...x.names];
  let columns = [...x.columns];
  for (let j = 0; j < k; j++) {
    if (j === x.intercept) continue;
    const w1 = csrMultiply(w, x.columns[j]);
    names.push(laggedName(x.names[j]));
    columns.push(w1);
    names.push(`${laggedName(x.names[j])}, taken twice`);
    columns.push(csrMultiply(w, w1));
  }
  // drop instruments that are combinations of earlier ones (never a column of X: the design is of full rank)
  const dropped: string[] = [];
  let qrH = householderQr(columns);
  for (let j = firstDependentColumn(qrH, 1e-8); j >= 0; j = firstDependentColumn(qrH, 1e-8)) {
    if (j < k) break;
    dropped.push(names[j]);
    names = names.filter((_, i) => i !== j);
    columns = columns.filter((_, i) => i !== j);
    qrH = householderQr(columns);
  }
  if (dropped.length) warnings.push(`Instruments left out as combinations of the others: ${dropped.join('; ')}.`);
  const h = columns.length;
  if (h < k + 1) {
    throw new InputError(`The lag model by instruments needs at least one neighbours' average of an explanatory column that is not a combination of the columns themselves; here there is none. Use the maximum-likelihood lag model.`);
  }
  // Ŵy = Q Qᵀ Wy (the first h coordinates kept)
  const coords = applyQt(qrH, wy);
  const kept = new Float64Array(n);
  for (let i = 0; i < h; i++) kept[i] = coords[i];
  const wyHat = applyQ(qrH, kept);

  const qrZ = householderQr([...x.columns, wyHat]);
  const delta = qrSolve(qrZ, y);
  const beta = delta.subarray(0, k);
  const rho = delta[k];
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = y[i] - rho * wy[i];
    for (let j = 0; j < k; j++) s -= beta[j] * x.columns[j][i];
    residuals[i] = s;
  }
  const sigma2 = dot(residuals, residuals) / n;
  const q = k + 1;
  let vd: Float64Array;
  if (o.robust) vd = whiteCovariance(qrZ, residuals);
  else {
    vd = inverseCrossProduct(qrZ);
    for (let i = 0; i < q * q; i++) vd[i] *= sigma2;
  }
  const pCov = k + 2;
  const covariance = new Float64Array(pCov * pCov).fill(NaN);
  for (let a = 0; a < q; a++) for (let b = 0; b < q; b++) covariance[a * pCov + b] = vd[a * q + b];
  const coefficients = table(x, Float64Array.from(beta), (j) => Math.sqrt(vd[j * q + j]), null);
  const rhoSe = Math.sqrt(vd[k * q + k]);
  const rhoZ = rho / rhoSe;

  const xb = new Float64Array(n);
  for (let j = 0; j < k; j++) for (let i = 0; i < n; i++) xb[i] += beta[j] * x.columns[j][i];
  const { lower, upper } = algebra.range;
  let fitted: Float64Array;
  if (!(rho > lower && rho < upper)) {
    warnings.push(`The estimate of ρ (${rho.toPrecision(4)}) lies outside the admissible range (${lower.toPrecision(4)} to ${upper.toPrecision(4)}): the model does not describe a stable process on these neighbours, so its fitted values and effects are not given.`);
    fitted = new Float64Array(n).fill(NaN);
  } else if (algebra.solve) {
    fitted = algebra.solve(rho, xb);
  } else {
    const solved = solveShifted(w, rho, xb);
    if (!solved.converged) warnings.push(`The reduced-form solve reached a relative residual of ${solved.relativeResidual.toExponential(1)} only.`);
    fitted = solved.x;
  }

  // first stage: Wy on X against Wy on H
  const ssrH = dot(wy, wy) - sumSquares(coords, h);
  const ssrX = dot(wy, wy) - sumSquares(applyQt(householderQr(x.columns), wy), k);
  const df1 = h - k;
  const df2 = n - h;
  const f = ((ssrX - ssrH) / df1) / (ssrH / df2);
  if (f < 10) warnings.push(`The instruments predict the neighbours' average outcome only weakly (first-stage F ${f.toFixed(2)}, below 10, a common rule of thumb): the estimates of the lag model by instruments may be unreliable.`);
  const wald = rhoZ * rhoZ;

  return {
    rho, rhoSe, rhoZ, rhoP: normalTwoSided(rhoZ),
    coefficients,
    sigma2,
    pseudoR2: fitted.every(Number.isFinite) ? squaredCorrelation(y, fitted) : NaN,
    residuals,
    fitted,
    covariance,
    covarianceKind: o.robust ? 'robust to unequal variance (White 1980, HC0)' : 'classical',
    instruments: names,
    firstStage: { stat: f, df: df1, df2, p: fUpper(f, df1, df2) },
    wald: [{ against: 'ols', restriction: 'ρ = 0', stat: wald, df: 1, p: chiSquareUpper(wald, 1) }],
    range: { lower, upper },
    warnings,
  };
}

function sumSquares(v: Float64Array, count: number): number {
  let s = 0;
  for (let i = 0; i < count; i++) s += v[i] * v[i];
  return s;
}
