import { householderQr, inverseCrossProduct, type CsrMatrix } from '../linalg/index.js';
import { chiSquareUpper, normalTwoSided, studentTwoSided } from '../stats/index.js';
import type { PreparedInputs } from './model-entry.js';
import { laggedCount, laggedDesign, markLagged } from './lagged-columns.js';
import { fitOls, whiteCovariance } from './ols.js';
import type { Coefficient, Impact, ImpactsResult, OlsFit, TestResult } from './types.js';

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

/** Effects of the neighbours' columns model: `columnImpacts` with its covariance and Student's t on n − k df. */
export function slxImpacts(fit: SlxFit, p: PreparedInputs): ImpactsResult {
  const k = fit.coefficients.length;
  return columnImpacts(fit, fit.covariance, k, p.w, { df: p.y.length - k, covariance: fit.covarianceKind });
}

/**
 * Effects of a model whose spillover runs only through the neighbours' averages of the columns (the
 * SLX model, Halleck Vega & Elhorst 2015; the spatial Durbin error model, LeSage & Pace 2009, §2.3):
 * S_r = β_r I + θ_r W, so averaged over areas as for the lag model (LeSage & Pace 2009, §2.7)
 *   direct = β_r + θ_r tr(W)/n, total = β_r + θ_r 1'W1/n, indirect = total − direct
 * (direct β_r and indirect θ_r with row-standardised weights without self-links). Linear in the
 * coefficients, so the standard errors are exact, from the covariance of (β_r, θ_r) (`stride`: the
 * covariance's row length); p-values from Student's t with `df` degrees of freedom, or the normal
 * when df is absent — either way the direct effect's test is the coefficient's own.
 */
export function columnImpacts(
  fit: { coefficients: Coefficient[]; xColumns: number; source: number[] },
  covariance: Float64Array,
  stride: number,
  w: CsrMatrix,
  o: { df?: number; covariance: string },
): ImpactsResult {
  const n = w.n;
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
  const pOf = (z: number) => (o.df === undefined ? normalTwoSided(z) : studentTwoSided(z, o.df));
  const v = (a: number, b: number) => covariance[a * stride + b];
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
      directP: pOf(direct / directSe),
      indirectP: pOf(indirect / indirectSe),
      totalP: pOf(totalEffect / totalSe),
    };
  });
  return {
    impacts,
    draws: 0,
    seed: 0,
    method: `exact: the effects are linear in the coefficients (direct β, indirect θ·1'W1/n${own !== 0 ? ' less θ·tr(W)/n' : ''}), standard errors from their covariance (${o.covariance}), p-values from ${o.df === undefined ? 'the normal distribution' : `Student's t with ${o.df} degrees of freedom`}; no simulation`,
  };
}
