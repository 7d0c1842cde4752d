import type { TestResult } from '../core/types.js';
import { chiSquareUpper } from './distributions.js';

/**
 * Jarque–Bera normality test (Jarque & Bera 1987): JB = n [S²/6 + (K − 3)²/24], with skewness
 * S = m₃/m₂^{3/2} and kurtosis K = m₄/m₂², central moments taken over n; chi-square, 2 df.
 */
export function jarqueBera(residuals: Float64Array): TestResult {
  const n = residuals.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += residuals[i];
  mean /= n;
  let m2 = 0;
  let m3 = 0;
  let m4 = 0;
  for (let i = 0; i < n; i++) {
    const d = residuals[i] - mean;
    const d2 = d * d;
    m2 += d2;
    m3 += d2 * d;
    m4 += d2 * d2;
  }
  m2 /= n;
  m3 /= n;
  m4 /= n;
  const skew = m3 / Math.pow(m2, 1.5);
  const kurt = m4 / (m2 * m2);
  const stat = n * ((skew * skew) / 6 + ((kurt - 3) * (kurt - 3)) / 24);
  return { stat, df: 2, p: chiSquareUpper(stat, 2) };
}
