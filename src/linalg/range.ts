/**
 * The admissible range of the spatial parameter (ρ of the lag model, λ of the error model): the
 * interval around 0 on which I − ρW stays nonsingular,
 *   (1/λmin, 1/λmax), λmin the most negative real eigenvalue of W, λmax the largest real one,
 * Ord (1975, "Estimation methods for models of spatial interaction", JASA 70, §2); for a
 * row-stochastic W, λmax = 1 and the range is (1/λmin, 1) (LeSage & Pace 2009, Introduction to
 * Spatial Econometrics, §4.3 — section number recalled from memory). Complex eigenvalues never make
 * I − ρW singular for real ρ, so only the real ones bound it.
 *
 * One rule, one function (`admissibleRange`) for every size and kind of W; only the way the
 * extreme real eigenvalues are found differs, and the method text says which:
 *  - all eigenvalues at hand (dense algebra): read off them;
 *  - a symmetric form S (contiguity and other symmetric links, row-standardised or not): Lanczos on
 *    S (sparse/extremes.ts), since W and S share their eigenvalues;
 *  - no symmetric form and W ≥ 0 (k-nearest neighbours): λmax is the Perron root, bracketed by the
 *    Collatz–Wielandt ratios; λmin by shift-and-invert Arnoldi (Saad, Numerical Methods for Large
 *    Eigenvalue Problems, 2nd ed., §7.1 and §4.2) on (I − ρ₀W)⁻¹ with ρ₀ = −1/(1.001·λ̄), solved by
 *    the sparse LU of the log-determinant. Its eigenvalues μ = 1/(1 − ρ₀λ) are largest for the λ
 *    nearest σ = 1/ρ₀ (just below −λ̄, hence below every real eigenvalue), and among the real ones
 *    μ decreases as λ grows, so the most negative real eigenvalue is the largest real μ: Arnoldi
 *    finds the outermost μ first. I − ρ₀W is an H-matrix there (|ρ₀|λ̄ < 1), so the LU without
 *    pivoting is stable. The run stops when the bound is known to 1e-7 relative and takes it on the
 *    side that widens the range (sparse/arnoldi.ts).
 */
import { csrMultiply, isNonNegative, isRowStochastic, maxAbsRowSum, type CsrMatrix } from './csr.js';
import type { AdmissibleRange } from './logdet.js';
import { arnoldiLowest } from './sparse/arnoldi.js';
import { lanczosExtremes, type LanczosExtremes } from './sparse/extremes.js';

/** The rule itself: (1/λmin, 1/λmax) from the extreme real eigenvalues, and how they were found. */
export function rangeFromEigenvalues(eigenMin: number, eigenMax: number, method: string): AdmissibleRange {
  return { lower: 1 / eigenMin, upper: 1 / eigenMax, eigenMin, eigenMax, method };
}

export interface RangeOptions {
  /** every eigenvalue of W (real parts, imaginary parts or null when all real) and where they came from */
  eigenvalues?: { re: Float64Array; im: Float64Array | null; source: string };
  /** the symmetric form S of W, when W has one */
  symmetric?: CsrMatrix | null;
  /** a Lanczos run on S already made (e.g. on a helper thread) */
  lanczos?: LanczosExtremes;
  /** x = (I − ρW)⁻¹ b by a direct factor, for the shift-and-invert Arnoldi run when W has no symmetric form */
  shiftSolve?: (rho: number, b: Float64Array) => Float64Array;
  /** the Perron root bracket already found (W ≥ 0) */
  perron?: PerronRoot;
  seed?: number;
}

/** The admissible range of W by the one rule; see the file comment for the ways λmin and λmax are found. */
export function admissibleRange(w: CsrMatrix, opts: RangeOptions = {}): AdmissibleRange {
  if (opts.eigenvalues) return rangeFromAllEigenvalues(opts.eigenvalues.re, opts.eigenvalues.im, opts.eigenvalues.source);
  if (opts.symmetric) {
    const plan = lanczosPlan(w, opts.symmetric);
    const ex = opts.lanczos ?? lanczosExtremes(opts.symmetric, opts.seed ?? 1, plan.steps, plan.tolerance, plan.needMax);
    return rangeFromLanczos(plan, ex);
  }
  if (!isNonNegative(w)) {
    const r = maxAbsRowSum(w);
    return rangeFromEigenvalues(-r, r, `W has negative entries and no symmetric form: every eigenvalue has |λ| ≤ ${r.toPrecision(12)} (the largest absolute row sum), so the range (−1/${r.toPrecision(6)}, 1/${r.toPrecision(6)}) is safe but may be narrower than the true one`);
  }
  const perron = opts.perron ?? perronRoot(w, opts.shiftSolve);
  const maxText = perron.stochastic ? 'λmax = 1 (rows of W sum to one)' : `λmax ≤ ${perron.upper.toPrecision(12)} (${perron.method})`;
  if (!opts.shiftSolve) {
    return rangeFromEigenvalues(-perron.upper, perron.upper, `${maxText}; λmin taken as −λmax (no factor of I − ρW to find it with): every |λ| ≤ λmax (Perron–Frobenius), so the range is safe but may be narrower than the true one`);
  }
  const low = arnoldiLowest(w.n, opts.shiftSolve, perron.upper, opts.seed ?? 1);
  if (low.lambda === null) {
    return rangeFromEigenvalues(-perron.upper, perron.upper, `${maxText}; λmin taken as −λmax (${low.method}): every |λ| ≤ λmax (Perron–Frobenius), so the range is safe but may be narrower than the true one`);
  }
  return rangeFromEigenvalues(Math.max(low.lambda, -perron.upper), perron.upper, `${maxText}; λmin ${low.lambda.toPrecision(12)} by ${low.method}`);
}

/** (1/λmin, 1/λmax) over the real eigenvalues of a complete set (real parts `re`, imaginary parts `im`). */
export function rangeFromAllEigenvalues(re: Float64Array, im: Float64Array | null, source: string): AdmissibleRange {
  const n = re.length;
  const isReal = (i: number): boolean => im === null || Math.abs(im[i]) <= 1e-10 * Math.max(1, Math.abs(re[i]));
  let eigenMin = Infinity, eigenMax = -Infinity, radius = 0;
  for (let i = 0; i < n; i++) {
    radius = Math.max(radius, im ? Math.hypot(re[i], im[i]) : Math.abs(re[i]));
    if (!isReal(i)) continue;
    eigenMin = Math.min(eigenMin, re[i]);
    eigenMax = Math.max(eigenMax, re[i]);
  }
  // no negative (or no positive) real eigenvalue: the range is unbounded on that side; the spectral
  // radius keeps it finite for the search
  const notes: string[] = [];
  if (!(eigenMin < 0)) { eigenMin = -radius; notes.push('no negative real eigenvalue: λmin taken as −(spectral radius)'); }
  if (!(eigenMax > 0)) { eigenMax = radius; notes.push('no positive real eigenvalue: λmax taken as the spectral radius'); }
  return rangeFromEigenvalues(eigenMin, eigenMax, `exact, ${source}${notes.length ? `; ${notes.join('; ')}` : ''}`);
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
    return rangeFromEigenvalues(-1, 1, 'λmax = 1 (rows of W sum to one); λmin = −1 (the neighbour graph is bipartite, so the spectrum is symmetric about 0)');
  }
  const eigenMin = Math.max(-radius, ex.min - ex.minResidual);
  const eigenMax = stochastic ? 1 : ex.max + ex.maxResidual;
  const parts = [
    `Lanczos on the symmetric form (${ex.steps} steps): λmin ${ex.min.toPrecision(12)} (residual bound ${ex.minResidual.toExponential(1)})`,
    stochastic ? 'λmax = 1 (rows of W sum to one)' : `λmax ${ex.max.toPrecision(12)} (residual bound ${ex.maxResidual.toExponential(1)})`,
  ];
  if (eigenMin === -radius) parts.push(`λmin taken as −${radius} (spectral radius bound)`);
  return rangeFromEigenvalues(eigenMin, eigenMax, parts.join('; '));
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

export interface PerronRoot {
  /** a guaranteed upper bound on the spectral radius (= λmax for W ≥ 0) */
  upper: number;
  /** a lower bound on it (Collatz–Wielandt minimum ratio; 0 when it says nothing) */
  lower: number;
  stochastic: boolean;
  method: string;
}

/**
 * The Perron root of W ≥ 0 (its spectral radius, which is also its largest real eigenvalue;
 * Perron–Frobenius), bracketed by the Collatz–Wielandt ratios: for any x > 0,
 *   min_i (Wx)_i/x_i ≤ λmax ≤ max_i (Wx)_i/x_i
 * (Horn & Johnson, Matrix Analysis, 2nd ed., §8.1; the maximum ratio bounds λmax for every W ≥ 0,
 * the minimum only when W is irreducible). x comes from power iteration on (W + I)/2 (the shift
 * removes periodicity and keeps x > 0); when that has not closed the bracket to 1e-12 and a solver
 * is given, from inverse iteration with (I − ρ₁W)⁻¹, ρ₁ just below 1/(the bound so far): that
 * inverse is ≥ I entrywise (a nonsingular M-matrix's inverse, Σ ρ₁ᵏWᵏ), so x stays positive, and it
 * converges fast because 1 − ρ₁λmax is small. Row-stochastic W: λmax = 1 exactly.
 */
export function perronRoot(w: CsrMatrix, shiftSolve?: (rho: number, b: Float64Array) => Float64Array): PerronRoot {
  if (isRowStochastic(w)) return { upper: 1, lower: 1, stochastic: true, method: 'rows of W sum to one' };
  const n = w.n;
  let v = new Float64Array(n).fill(1);
  let next = new Float64Array(n);
  let upper = Infinity, lower = 0, powerSteps = 0, inverseSteps = 0;
  const bracket = (x: Float64Array, wx: Float64Array): boolean => {
    let hi = 0, lo = Infinity;
    for (let i = 0; i < n; i++) {
      const ratio = wx[i] / x[i];
      if (ratio > hi) hi = ratio;
      if (ratio < lo) lo = ratio;
    }
    upper = Math.min(upper, hi);
    lower = Math.max(lower, lo);
    return upper - lower <= 1e-12 * upper;
  };
  const powerLimit = shiftSolve ? 200 : 5000;
  for (; powerSteps < powerLimit; powerSteps++) {
    csrMultiply(w, v, next);
    if (bracket(v, next)) break;
    let norm = 0;
    for (let i = 0; i < n; i++) { next[i] = 0.5 * (next[i] + v[i]); if (next[i] > norm) norm = next[i]; }
    for (let i = 0; i < n; i++) next[i] /= norm;
    const t = v; v = next; next = t;
  }
  if (shiftSolve && !(upper - lower <= 1e-12 * upper)) {
    let previous = upper;
    for (; inverseSteps < 60; inverseSteps++) {
      const x = shiftSolve(1 / (upper * (1 + 1e-4)), v);
      let norm = 0;
      for (let i = 0; i < n; i++) if (x[i] > norm) norm = x[i];
      for (let i = 0; i < n; i++) v[i] = Math.max(x[i] / norm, 1e-300);
      csrMultiply(w, v, next);
      if (bracket(v, next)) break;
      // a reducible W: the minimum ratio need not reach λmax; stop when the bound stops moving
      if (inverseSteps >= 5 && previous - upper <= 1e-15 * upper) break;
      previous = upper;
    }
  }
  const closed = upper - lower <= 1e-12 * upper;
  const how = `${powerSteps + 1} power steps on (W + I)/2${inverseSteps > 0 ? ` and ${inverseSteps + 1} inverse-iteration steps with the LU` : ''}`;
  return {
    upper,
    lower,
    stochastic: false,
    method: `Collatz–Wielandt bound after ${how}; the Perron root lies in [${lower.toPrecision(12)}, ${upper.toPrecision(12)}]${closed ? '' : ' (the lower end is loose: W is reducible or the iteration stopped first)'}`,
  };
}
