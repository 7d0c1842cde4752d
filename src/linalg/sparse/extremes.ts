/**
 * Extreme eigenvalues of the symmetric form S of W, for the admissible range (src/linalg/range.ts):
 * Lanczos (Lanczos 1950; Golub & Van Loan, Matrix Computations, §10.1) without
 * reorthogonalisation — enough for the extreme Ritz values — with Sturm-sequence bisection on the
 * tridiagonal matrix and the residual bound β_j |y_j| (Parlett, The Symmetric Eigenvalue Problem,
 * §13.2). The reported λmin is the Ritz value minus its residual bound (Ritz values lie inside the
 * spectrum), never below −(spectral radius bound). A bipartite neighbour graph with row-standardised
 * W has λmin = −1 exactly (symmetric spectrum), and its Lanczos run is kept short: it then serves
 * only the one-probe quadrature that brackets ρ (see quadrature.ts).
 */
import { csrMultiply, maxAbsRowSum, type CsrMatrix } from '../csr.js';
import { seededRandom } from '../random.js';

/** Number of eigenvalues of the tridiagonal (alpha, beta) below x (Sturm count). */
function countBelow(alpha: Float64Array, beta: Float64Array, j: number, x: number): number {
  let count = 0, d = 1;
  for (let i = 0; i < j; i++) {
    const b2 = i > 0 ? beta[i - 1] * beta[i - 1] : 0;
    d = alpha[i] - x - (i > 0 ? b2 / d : 0);
    if (d === 0) d = -1e-300;
    if (d < 0) count++;
  }
  return count;
}

/** Eigenvalue number `index` (0 = smallest) of the leading j×j tridiagonal, by bisection. */
function tridiagonalEigenvalue(alpha: Float64Array, beta: Float64Array, j: number, index: number, lo: number, hi: number): number {
  for (let it = 0; it < 200 && hi - lo > 1e-15 * Math.max(1, Math.abs(lo) + Math.abs(hi)); it++) {
    const mid = 0.5 * (lo + hi);
    if (countBelow(alpha, beta, j, mid) > index) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

/** |last component| of the unit eigenvector for θ, by two steps of shifted inverse iteration. */
function lastComponent(alpha: Float64Array, beta: Float64Array, j: number, theta: number, above: boolean): number {
  const shift = theta + (above ? 1 : -1) * 1e-10 * Math.max(1, Math.abs(theta));
  let y = new Float64Array(j).fill(1);
  const c = new Float64Array(j), d = new Float64Array(j);
  for (let round = 0; round < 3; round++) {
    // Thomas algorithm on T − shift·I (definite, since the shift lies outside the spectrum)
    for (let i = 0; i < j; i++) {
      const diag = alpha[i] - shift - (i > 0 ? beta[i - 1] * c[i - 1] : 0);
      c[i] = i < j - 1 ? beta[i] / diag : 0;
      d[i] = (y[i] - (i > 0 ? beta[i - 1] * d[i - 1] : 0)) / diag;
    }
    const x = new Float64Array(j);
    for (let i = j - 1; i >= 0; i--) x[i] = d[i] - (i < j - 1 ? c[i] * x[i + 1] : 0);
    let norm = 0;
    for (let i = 0; i < j; i++) norm += x[i] * x[i];
    norm = Math.sqrt(norm);
    for (let i = 0; i < j; i++) x[i] /= norm;
    y = x;
  }
  return Math.abs(y[j - 1]);
}

export interface LanczosExtremes {
  min: number;
  max: number;
  minResidual: number;
  maxResidual: number;
  steps: number;
  /** the Lanczos tridiagonal (first `steps` entries), e.g. for a one-probe quadrature */
  alpha?: Float64Array;
  beta?: Float64Array;
}

/** Extreme eigenvalues of a symmetric sparse matrix by Lanczos. */
export function lanczosExtremes(s: CsrMatrix, seed = 1, maxSteps = 300, tolerance = 1e-10, needMax = true): LanczosExtremes {
  const n = s.n;
  const steps = Math.min(n, maxSteps);
  const alpha = new Float64Array(steps), beta = new Float64Array(steps);
  // a continuous random start: ±1 entries can be exactly orthogonal to an eigenvector of a small
  // component (a linked pair has eigenvector (1, −1))
  const uniform = seededRandom(seed);
  let v: Float64Array = new Float64Array(n).map(() => uniform() - 0.5 + 1e-3 * (uniform() - 0.5));
  let norm = 0;
  for (let i = 0; i < n; i++) norm += v[i] * v[i];
  norm = Math.sqrt(norm);
  for (let i = 0; i < n; i++) v[i] /= norm;
  let vPrev: Float64Array = new Float64Array(n);
  let wv: Float64Array = new Float64Array(n);
  const bound = maxAbsRowSum(s);
  let result: LanczosExtremes = { min: -bound, max: bound, minResidual: Infinity, maxResidual: Infinity, steps: 0 };
  for (let j = 0; j < steps; j++) {
    csrMultiply(s, v, wv);
    let a = 0;
    for (let i = 0; i < n; i++) a += wv[i] * v[i];
    alpha[j] = a;
    const bPrev = j > 0 ? beta[j - 1] : 0;
    norm = 0;
    for (let i = 0; i < n; i++) {
      const x = wv[i] - a * v[i] - bPrev * vPrev[i];
      wv[i] = x;
      norm += x * x;
    }
    const b = Math.sqrt(norm);
    beta[j] = b;
    const done = j + 1 === steps || b < 1e-14;
    if (done || (j + 1) % 10 === 0) {
      const jj = j + 1;
      const lo = -bound - 1, hi = bound + 1;
      const min = tridiagonalEigenvalue(alpha, beta, jj, 0, lo, hi);
      const max = tridiagonalEigenvalue(alpha, beta, jj, jj - 1, lo, hi);
      const minResidual = b * lastComponent(alpha, beta, jj, min, false);
      const maxResidual = b * lastComponent(alpha, beta, jj, max, true);
      result = { min, max, minResidual, maxResidual, steps: jj, alpha, beta };
      if (done || (minResidual < tolerance && (!needMax || maxResidual < tolerance))) break;
    }
    const t = vPrev;
    vPrev = v;
    v = t;
    for (let i = 0; i < n; i++) v[i] = wv[i] / b;
  }
  return result;
}

