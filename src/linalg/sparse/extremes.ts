/**
 * Admissible range (1/λmin, 1/λmax) from the extreme eigenvalues of W.
 * Symmetric form S: Lanczos (Lanczos 1950; Golub & Van Loan, Matrix Computations, §10.1) without
 * reorthogonalisation — enough for the extreme Ritz values — with Sturm-sequence bisection on the
 * tridiagonal matrix and the residual bound β_j |y_j| (Parlett, The Symmetric Eigenvalue Problem,
 * §13.2). The reported λmin is the Ritz value minus its residual bound (Ritz values lie inside the
 * spectrum), never below −(spectral radius bound). A bipartite neighbour graph with row-standardised
 * W has λmin = −1 exactly (symmetric spectrum), and its Lanczos run is kept short: it then serves
 * only the one-probe quadrature that brackets ρ (see quadrature.ts).
 * No symmetric form: power iteration for the Perron root λmax of a nonnegative W, which is also its
 * spectral radius (Perron–Frobenius), so every eigenvalue has |λ| ≤ λmax and (−1/λmax, 1/λmax) is
 * a safe interval.
 */
import { csrMultiply, type CsrMatrix } from '../csr.js';
import type { AdmissibleRange } from '../logdet.js';
import { seededUniform } from './random.js';

/** Row sums all 1 and entries nonnegative: λmax = 1 exactly. */
export function isRowStochastic(w: CsrMatrix): boolean {
  for (let i = 0; i < w.n; i++) {
    let sum = 0;
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      if (w.values[p] < 0) return false;
      sum += w.values[p];
    }
    if (Math.abs(sum - 1) > 1e-10 && w.rowPtr[i + 1] > w.rowPtr[i]) return false;
  }
  return true;
}

function maxAbsRowSum(a: CsrMatrix): number {
  let best = 0;
  for (let i = 0; i < a.n; i++) {
    let sum = 0;
    for (let p = a.rowPtr[i], pEnd = a.rowPtr[i + 1]; p < pEnd; p++) sum += Math.abs(a.values[p]);
    if (sum > best) best = sum;
  }
  return best;
}

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
  const uniform = seededUniform(seed);
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

/** Range from the symmetric form S of W. */
export function symmetricRange(w: CsrMatrix, s: CsrMatrix, seed = 1): AdmissibleRange {
  return symmetricRangeWithLanczos(w, s, seed).range;
}

/** The same, with the Lanczos run behind it (its tridiagonal serves a one-probe quadrature). */
export function symmetricRangeWithLanczos(w: CsrMatrix, s: CsrMatrix, seed = 1): { range: AdmissibleRange; lanczos: LanczosExtremes } {
  const plan = lanczosPlan(w, s);
  const lanczos = lanczosExtremes(s, seed, plan.steps, plan.tolerance, plan.needMax);
  return { range: rangeFromLanczos(plan, lanczos), lanczos };
}

/** What the Lanczos run behind the range must do, decided from W and S before it runs. */
export interface LanczosPlan {
  stochastic: boolean;
  bipartite: boolean;
  radius: number;
  steps: number;
  tolerance: number;
  needMax: boolean;
}

export function lanczosPlan(w: CsrMatrix, s: CsrMatrix): LanczosPlan {
  const stochastic = isRowStochastic(w);
  const radius = stochastic ? 1 : maxAbsRowSum(s);
  // A bipartite neighbour graph (e.g. a rook lattice) has a spectrum symmetric about 0 (Chung 1997,
  // Spectral Graph Theory, lemma 1.8), so λmin = −λmax = −1 exactly for row-standardised W; there
  // Lanczos converges slowly on the clustered end and would only meet the −1 floor, so it runs
  // just long enough for the bracketing quadrature.
  const bipartite = stochastic && isBipartite(s);
  return { stochastic, bipartite, radius, steps: bipartite ? 120 : 300, tolerance: 1e-10, needMax: !stochastic };
}

/** The admissible range from the plan and the Lanczos run it asked for. */
export function rangeFromLanczos(plan: LanczosPlan, ex: LanczosExtremes): AdmissibleRange {
  const { stochastic, radius } = plan;
  if (plan.bipartite) {
    return { lower: -1, upper: 1, eigenMin: -1, eigenMax: 1, method: 'λmax = 1 (rows of W sum to one); λmin = −1 (the neighbour graph is bipartite, so the spectrum is symmetric about 0)' };
  }
  const eigenMin = Math.max(-radius, ex.min - ex.minResidual);
  const eigenMax = stochastic ? 1 : ex.max + ex.maxResidual;
  const parts = [
    `Lanczos on the symmetric form (${ex.steps} steps): λmin ${ex.min.toPrecision(12)} (residual bound ${ex.minResidual.toExponential(1)})`,
    stochastic ? 'λmax = 1 (rows of W sum to one)' : `λmax ${ex.max.toPrecision(12)} (residual bound ${ex.maxResidual.toExponential(1)})`,
  ];
  if (eigenMin === -radius) parts.push(`λmin taken as −${radius} (spectral radius bound)`);
  return { lower: 1 / eigenMin, upper: 1 / eigenMax, eigenMin, eigenMax, method: parts.join('; ') };
}

/** True when the pattern of S (a symmetric matrix) is bipartite: a two-colouring by breadth-first search. */
export function isBipartite(s: CsrMatrix): boolean {
  const n = s.n;
  const colour = new Int8Array(n).fill(-1);
  const queue = new Int32Array(n);
  for (let root = 0; root < n; root++) {
    if (colour[root] !== -1) continue;
    colour[root] = 0;
    let head = 0, tail = 0;
    queue[tail++] = root;
    while (head < tail) {
      const i = queue[head++];
      for (let p = s.rowPtr[i], pEnd = s.rowPtr[i + 1]; p < pEnd; p++) {
        const j = s.colIdx[p];
        if (j === i) { if (s.values[p] !== 0) return false; continue; }
        if (colour[j] === -1) { colour[j] = 1 - colour[i]; queue[tail++] = j; }
        else if (colour[j] === colour[i]) return false;
      }
    }
  }
  return true;
}

/** Range for W without a symmetric form: (−1/λmax, 1/λmax) with λmax the Perron root. */
export function spectralRadiusRange(w: CsrMatrix): AdmissibleRange {
  let lambda: number;
  let how: string;
  if (isRowStochastic(w)) {
    lambda = 1;
    how = 'λmax = 1 (rows of W sum to one)';
  } else {
    const n = w.n;
    let v = new Float64Array(n).fill(1 / Math.sqrt(n));
    let next = new Float64Array(n);
    lambda = 0;
    let it = 0;
    for (; it < 2000; it++) {
      csrMultiply(w, v, next);
      for (let i = 0; i < n; i++) next[i] = 0.5 * (next[i] + v[i]); // (W + I)/2 removes periodicity
      let norm = 0;
      for (let i = 0; i < n; i++) norm += next[i] * next[i];
      norm = Math.sqrt(norm);
      const estimate = 2 * norm - 1;
      for (let i = 0; i < n; i++) next[i] /= norm;
      const t = v; v = next; next = t;
      if (Math.abs(estimate - lambda) < 1e-12 * Math.abs(estimate)) { lambda = estimate; break; }
      lambda = estimate;
    }
    how = `λmax ${lambda.toPrecision(12)} by power iteration on (W + I)/2 (${it + 1} steps)`;
  }
  return {
    lower: -1 / lambda, upper: 1 / lambda, eigenMin: -lambda, eigenMax: lambda,
    method: `${how}; W has no symmetric form, so the range is (−1/λmax, 1/λmax): every |λ| ≤ λmax (Perron–Frobenius)`,
  };
}
