import { csrMultiply } from '../linalg/index.js';
import type { WeightsAlgebra } from '../linalg/index.js';
import type { Design, LmTests, RegressionResiduals, TestResult } from '../core/types.js';
import { chiSquareUpper } from './distributions.js';
import { dot, residualQuadratic } from './residual-maker.js';

/**
 * Lagrange-multiplier tests on OLS residuals (Anselin 1988, ch. 6 & 8; Anselin, Bera, Florax &
 * Yoon 1996). With σ̂² = e'e/n, T = tr(WᵀW + WW), d_err = e'We/σ̂², d_lag = e'Wy/σ̂² and
 * nJ = [(WXβ)'M(WXβ) + Tσ̂²]/σ̂²:
 *   LM error        = d_err² / T
 *   LM lag          = d_lag² / nJ
 *   robust LM error = (d_err − T d_lag / nJ)² / (T (1 − T/nJ))
 *   robust LM lag   = (d_lag − d_err)² / (nJ − T)
 *   joint           = (d_lag − d_err)² / (nJ − T) + d_err² / T, 2 df; the rest 1 df.
 */
export function lmTests(ols: RegressionResiduals, x: Design, algebra: WeightsAlgebra): LmTests {
  const { n, residuals: e, fitted } = ols;
  const w = algebra.w;
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) y[i] = fitted[i] + e[i];
  const s2 = dot(e, e) / n;
  const T = algebra.lmTrace;
  const dErr = dot(e, csrMultiply(w, e)) / s2;
  const dLag = dot(e, csrMultiply(w, y)) / s2;
  const wxb = csrMultiply(w, fitted);
  const nJ = (residualQuadratic(x, wxb) + T * s2) / s2;
  const chi = (stat: number, df: number): TestResult => ({ stat, df, p: chiSquareUpper(stat, df) });
  const robustLag = ((dLag - dErr) * (dLag - dErr)) / (nJ - T);
  const error = (dErr * dErr) / T;
  const robustErrorNum = dErr - (T * dLag) / nJ;
  return {
    error: chi(error, 1),
    lag: chi((dLag * dLag) / nJ, 1),
    robustError: chi((robustErrorNum * robustErrorNum) / (T * (1 - T / nJ)), 1),
    robustLag: chi(robustLag, 1),
    joint: chi(robustLag + error, 2),
  };
}
