import { CholeskyDecomposition, Matrix } from 'ml-matrix';

/**
 * Inverts a symmetric positive-definite information matrix (row-major, p×p) through its Cholesky
 * factor (ml-matrix), solving against the identity. Returns null when it is not positive definite.
 */
export function invertInformation(info: Float64Array, p: number): Float64Array | null {
  const rows: number[][] = [];
  for (let i = 0; i < p; i++) rows.push(Array.from(info.subarray(i * p, (i + 1) * p)));
  const chol = new CholeskyDecomposition(new Matrix(rows));
  if (!chol.isPositiveDefinite()) return null;
  const inv = chol.solve(Matrix.eye(p));
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) out[i * p + j] = 0.5 * (inv.get(i, j) + inv.get(j, i));
  return out;
}

/** Admissible interval shrunk by 1e-6 relative at each end, so ln|I − ρW| stays finite. */
export function searchInterval(range: { lower: number; upper: number }): { lo: number; hi: number } {
  return { lo: range.lower + 1e-6 * Math.abs(range.lower), hi: range.upper - 1e-6 * Math.abs(range.upper) };
}

export function squaredCorrelation(a: Float64Array, b: Float64Array): number {
  const n = a.length;
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i];
    mb += b[i];
  }
  ma /= n;
  mb /= n;
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    sab += (a[i] - ma) * (b[i] - mb);
    saa += (a[i] - ma) ** 2;
    sbb += (b[i] - mb) ** 2;
  }
  return (sab * sab) / (saa * sbb);
}
