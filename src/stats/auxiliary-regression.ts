import { householderQr, qrSolve } from '../linalg/index.js';
import type { Design } from '../core/types.js';

/**
 * Explained and total sums of squares (about the mean) of the least-squares regression of g on the
 * design's columns; the shared step of the heteroskedasticity tests.
 */
export function explainedSumOfSquares(g: Float64Array, x: Design): { explained: number; total: number } {
  const qr = householderQr(x.columns);
  const beta = qrSolve(qr, g);
  const n = g.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += g[i];
  mean /= n;
  let explained = 0;
  let total = 0;
  for (let i = 0; i < n; i++) {
    let fit = 0;
    for (let j = 0; j < beta.length; j++) fit += beta[j] * x.columns[j][i];
    explained += (fit - mean) * (fit - mean);
    total += (g[i] - mean) * (g[i] - mean);
  }
  return { explained, total };
}
