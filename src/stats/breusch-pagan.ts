import type { Design, TestResult } from '../core/types.js';
import { explainedSumOfSquares } from './auxiliary-regression.js';
import { chiSquareUpper } from './distributions.js';

/**
 * Breusch–Pagan test for heteroskedasticity (Breusch & Pagan 1979): regress g_i = e_i²/σ̂² − 1,
 * σ̂² = e'e/n, on the regressors; BP = ½ × explained sum of squares; chi-square with k − 1 df
 * (the design's columns, intercept included, are the variance regressors).
 */
export function breuschPagan(residuals: Float64Array, x: Design): TestResult {
  const n = residuals.length;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += residuals[i] * residuals[i];
  const s2 = ss / n;
  const g = residuals.map((e) => (e * e) / s2 - 1);
  const stat = 0.5 * explainedSumOfSquares(g, x).explained;
  const df = x.columns.length - 1;
  return { stat, df, p: chiSquareUpper(stat, df) };
}
