import type { Design, TestResult } from '../core/types.js';
import { explainedSumOfSquares } from './auxiliary-regression.js';
import { chiSquareUpper } from './distributions.js';

/**
 * Koenker's studentised form of the Breusch–Pagan test (Koenker 1981; Koenker & Bassett 1982),
 * robust to non-normal errors: n R² of the regression of e_i² on the regressors; chi-square, k − 1 df.
 */
export function breuschPaganStudentised(residuals: Float64Array, x: Design): TestResult {
  const n = residuals.length;
  const e2 = residuals.map((e) => e * e);
  const { explained, total } = explainedSumOfSquares(e2, x);
  const stat = total > 0 ? (n * explained) / total : 0;
  const df = x.columns.length - 1;
  return { stat, df, p: chiSquareUpper(stat, df) };
}
