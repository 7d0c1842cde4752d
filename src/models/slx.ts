import { householderQr, inverseCrossProduct } from '../linalg/index.js';
import { chiSquareUpper, studentTwoSided } from '../stats/index.js';
import type { PreparedInputs } from './model-entry.js';
import { laggedCount, laggedDesign, markLagged } from './lagged-columns.js';
import { fitOls, whiteCovariance } from './ols.js';
import type { Impact, ImpactsResult, OlsFit, TestResult } from './types.js';

export interface SlxFit extends OlsFit {
  /** covariance of all coefficients (constant, X, WX), row-major: classical σ²(XᵀX)⁻¹, or White's when robust ones were asked for */
  covariance: Float64Array;
  covarianceKind: 'classical' | 'robust to unequal variance (White 1980, HC0)';
  /** likelihood ratio against the plain regression: θ = 0, one restriction per WX term */
  lr: TestResult;
  /** columns of X; the WX terms follow */
  xColumns: number;
  /** for each WX term, its own column's index in X */
  source: number[];
}

/**
 * Least squares with the neighbours' averages of the explanatory columns (the SLX model; Halleck
 * Vega & Elhorst 2015, "The SLX model", Journal of Regional Science 55(3)):
 *   y = Xβ + WXθ + ε, fitted by least squares (Householder QR) as the plain regression is, on the
 * columns [X, WX] (WX for every column but the intercept). Everything the plain regression reports
 * (σ² = e'e/(n − k), t-values with n − k df, logL, AIC and BIC counting the k coefficients) follows.
 * The likelihood ratio against the plain regression tests θ = 0 with one degree of freedom per WX term.
 * With `robust`, White's (HC0) covariance is given beside the classical one, and the effects use it.
 */
export function fitSlx(p: PreparedInputs, o: { robust?: boolean } = {}): SlxFit {
  const lagged = laggedDesign(p);
  const fit = fitOls(p.y, lagged.design, { robust: o.robust });
  const k = lagged.design.columns.length;
  const qr = householderQr(lagged.design.columns);
  let covariance: Float64Array;
  if (o.robust) {
    covariance = whiteCovariance(qr, fit.residuals);
  } else {
    covariance = inverseCrossProduct(qr);
    for (let i = 0; i < k * k; i++) covariance[i] *= fit.sigma2;
  }
  const df = laggedCount(p.design);
  const stat = 2 * (fit.logLik - p.ols.logLik);
  return {
    ...fit,
    coefficients: markLagged(fit.coefficients, lagged.k),
    ...(fit.robustCoefficients ? { robustCoefficients: markLagged(fit.robustCoefficients, lagged.k) } : {}),
    covariance,
    covarianceKind: o.robust ? 'robust to unequal variance (White 1980, HC0)' : 'classical',
    lr: { stat, df, p: chiSquareUpper(stat, df) },
    xColumns: lagged.k,
    source: lagged.source,
  };
}

/**
 * Effects of the SLX model (Halleck Vega & Elhorst 2015): a change in column r of one area moves
 * that area's outcome by β_r (direct) and its neighbours' outcomes by θ_r in total (indirect, with
 * row-standardised weights; in general θ_r times the average row sum of W's columns, which is 1
 * there). Averaged over areas as for the lag model (LeSage & Pace 2009, §2.7): direct = β_r tr(I)/n
 * = β_r, indirect = θ_r·1'W1/n − θ_r·tr(W)/n, total = β_r + θ_r·1'W1/n.
 * Standard errors are exact (linear in the coefficients): from the covariance of (β_r, θ_r);
 * p-values from Student's t with n − k df, so the direct effect's test is the coefficient's own.
 */
export function slxImpacts(fit: SlxFit, p: PreparedInputs): ImpactsResult {
  const n = p.y.length;
  const k = fit.coefficients.length;
  const w = p.w;
  let total = 0;
  let trace = 0;
  for (let i = 0; i < n; i++) {
    for (let q = w.rowPtr[i]; q < w.rowPtr[i + 1]; q++) {
      total += w.values[q];
      if (w.colIdx[q] === i) trace += w.values[q];
    }
  }
  const spread = total / n; // 1'W1/n: 1 with row-standardised weights
  const own = trace / n; // tr(W)/n: 0 without self-links
  const df = n - k;
  const v = (a: number, b: number) => fit.covariance[a * k + b];
  const impacts: Impact[] = fit.source.map((j, m) => {
    const t = fit.xColumns + m;
    const b = fit.coefficients[j].estimate;
    const th = fit.coefficients[t].estimate;
    const direct = b + own * th;
    const totalEffect = b + spread * th;
    const indirect = totalEffect - direct;
    const directSe = Math.sqrt(v(j, j) + 2 * own * v(j, t) + own * own * v(t, t));
    const indirectSe = Math.abs(spread - own) * Math.sqrt(v(t, t));
    const totalSe = Math.sqrt(v(j, j) + 2 * spread * v(j, t) + spread * spread * v(t, t));
    return {
      name: fit.coefficients[j].name,
      direct, indirect, total: totalEffect, directSe, indirectSe, totalSe,
      directP: studentTwoSided(direct / directSe, df),
      indirectP: studentTwoSided(indirect / indirectSe, df),
      totalP: studentTwoSided(totalEffect / totalSe, df),
    };
  });
  return {
    impacts,
    draws: 0,
    seed: 0,
    method: `exact: the effects are linear in the coefficients (direct β, indirect θ·1'W1/n${own !== 0 ? ' less θ·tr(W)/n' : ''}), standard errors from their ${fit.covarianceKind} covariance, p-values from Student's t with ${df} degrees of freedom; no simulation`,
  };
}
