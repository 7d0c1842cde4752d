import { chiSquareUpper } from '../stats/index.js';
import type { PreparedInputs } from './model-entry.js';
import { laggedCount, laggedDesign, markLagged, type LaggedDesign } from './lagged-columns.js';
import { fitSpatialError } from './ml-error.js';
import { fitSpatialLag } from './ml-lag.js';
import type { SpatialFit } from './types.js';

/** A lag or error fit on [X, WX]: which coefficients are the WX terms and where they come from. */
export type DurbinFit = SpatialFit & {
  /** columns of X; the WX terms follow */
  xColumns: number;
  /** for each WX term, its own column's index in X */
  source: number[];
};

/**
 * Spatial Durbin model y = ρWy + Xβ + WXθ + ε by maximum likelihood (Anselin 1988, §5.1.2;
 * LeSage & Pace 2009, ch. 2 and 3): the lag model's concentrated likelihood (`ml-lag.ts`, Ord 1975)
 * with the columns [X, WX] in place of X — nothing new but more columns, so large n takes the same
 * sparse path (bracket with the cheap log-determinant, polish with exact ones), and the standard
 * errors are the lag model's information matrix on [X, WX]. The likelihood ratio against the plain
 * regression restricts ρ = 0 and θ = 0 (1 + m degrees of freedom, m the WX terms); AIC and BIC
 * count the coefficients of [X, WX] and ρ.
 */
export function fitDurbin(p: PreparedInputs): DurbinFit {
  const lagged = laggedDesign(p);
  return finish(fitSpatialLag(p.y, lagged.design, p.algebra, p.ols), lagged, p);
}


/**
 * Spatial Durbin error model y = Xβ + WXθ + u, u = λWu + ε by maximum likelihood (LeSage & Pace
 * 2009, §2.3): the error model's concentrated likelihood (`ml-error.ts`) on [X, WX], with its
 * information matrix; large n as the error model. Likelihood ratio against the plain regression:
 * λ = 0 and θ = 0 (1 + m degrees of freedom).
 */
export function fitDurbinError(p: PreparedInputs): DurbinFit {
  const lagged = laggedDesign(p);
  return finish(fitSpatialError(p.y, lagged.design, p.algebra, p.ols), lagged, p);
}

function finish(fit: SpatialFit, lagged: LaggedDesign, p: PreparedInputs): DurbinFit {
  const df = 1 + laggedCount(p.design);
  const stat = 2 * (fit.logLik - p.ols.logLik);
  return {
    ...fit,
    coefficients: markLagged(fit.coefficients, lagged.k),
    lr: { stat, df, p: chiSquareUpper(stat, df) },
    xColumns: lagged.k,
    source: lagged.source,
  };
}
