import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { PivotError, type AdmissibleRange } from '../linalg/index.js';

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

/**
 * Runs `search` over [lo, hi]. When the exact log-determinant meets a pivot that is not positive —
 * the sparse LU without pivoting below −1/λmax, where above 1,500 areas no dense LU with pivoting
 * backs it up — the search runs again on the part of the range where that LU is stable
 * (|ρ|λmax < 1, an H-matrix), and a warning says so: nothing is lost, and the narrower interval is
 * stated rather than hidden.
 */
export function searchWithinPivotLimit<T>(
  search: (lo: number, hi: number) => T,
  lo: number,
  hi: number,
  range: AdmissibleRange,
  symbol: string,
): { result: T; warning?: string } {
  try {
    return { result: search(lo, hi) };
  } catch (e) {
    if (!(e instanceof PivotError)) throw e;
    const stable = -1 / range.eigenMax;
    const from = Math.max(lo, stable + 1e-6 * Math.abs(stable));
    if (!(from > lo)) throw e;
    return {
      result: search(from, hi),
      warning: `The exact log-determinant could not be evaluated below ${symbol} = ${from.toPrecision(4)} (a pivot of the LU without pivoting was not positive there), so the search was confined to ${from.toPrecision(4)} to ${hi.toPrecision(4)} although the admissible range reaches down to ${range.lower.toPrecision(4)}; an estimate at ${from.toPrecision(4)} means the maximum may lie below it.`,
    };
  }
}
