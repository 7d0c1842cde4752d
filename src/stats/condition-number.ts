import { SingularValueDecomposition, Matrix } from 'ml-matrix';
import { householderQr } from '../linalg/index.js';
import type { Design } from '../core/types.js';

/**
 * Condition number of the design (Belsley, Kuh & Welsch 1980, Regression Diagnostics, ch. 3):
 * columns (intercept included, not centred) scaled to unit length, then the ratio of the largest
 * to the smallest singular value. The singular values of X D⁻¹ equal those of R D⁻¹ from its QR,
 * so the SVD (ml-matrix) runs on a k×k matrix.
 */
export function conditionNumber(x: Design): number {
  const qr = householderQr(x.columns);
  const k = qr.k;
  const rows: number[][] = [];
  for (let i = 0; i < k; i++) {
    const row: number[] = [];
    for (let j = 0; j < k; j++) row.push(j >= i && qr.columnNorms[j] > 0 ? qr.r[i * k + j] / qr.columnNorms[j] : 0);
    rows.push(row);
  }
  const sv = new SingularValueDecomposition(new Matrix(rows), { computeLeftSingularVectors: false, computeRightSingularVectors: false }).diagonal;
  const max = Math.max(...sv);
  const min = Math.min(...sv);
  return min > 0 ? max / min : Infinity;
}
