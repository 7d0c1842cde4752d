/**
 * The most negative real eigenvalue of W ≥ 0 without a symmetric form, for the admissible range
 * (range.ts): shift-and-invert Arnoldi (Saad, Numerical Methods for Large Eigenvalue Problems,
 * 2nd ed., §7.1 and §4.2) on M = (I − ρ₀W)⁻¹, ρ₀ = −1/(1.001·λ̄), each step one solve with the
 * sparse LU. The eigenvalues μ = 1/(1 − ρ₀λ) of M are largest for the λ nearest σ = 1/ρ₀ (just
 * below −λ̄, so below every real eigenvalue), and among the real ones μ falls as λ grows: the
 * most negative real λ is the largest real μ, which Arnoldi finds first.
 *
 * The range only has to be right to a few digits, and on the right side: it must contain the true
 * range, or an estimate could be cut off. So the run stops as soon as the bound is known to
 * RANGE_TOLERANCE (relative, on the range's lower end 1/λmin), not when the Ritz value itself has
 * converged to rounding: the Ritz value μ̃ of the largest real Ritz pair, with its residual
 * r = h_{j+1,j}|y_j| = ‖Mx − μ̃x‖ (x the unit Ritz vector), lies within r of an eigenvalue of M
 * when M is normal (the Bauer–Fike theorem, 1960, whose factor κ(V) is 1 for a normal M), so λmin is
 * taken at μ̃ − r, on the side that widens the range. W from k-nearest neighbours is not normal, but
 * close to it where most links are mutual, and the Ritz values of the largest μ approach from below
 * (as they must for a symmetric M). On the 20,000-point bench it took 59 steps instead of the 80 that bring the
 * residual to 1e-10; checked against all eigenvalues on small cases (test/numerics-general-weights).
 *
 * Full reorthogonalisation by classical Gram–Schmidt applied twice ("twice is enough": Giraud,
 * Langou & Rozložník 2005), four basis vectors per sweep so that u is read once for four.
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { seededRandom } from '../random.js';

/** Most Arnoldi steps (memory: this many vectors of n). */
export const ARNOLDI_STEPS = 80;

/** Relative width of the range's lower end at which the run stops (the fits search 1e-6 inside the range). */
export const RANGE_TOLERANCE = 1e-7;

/** Relative width up to which a bound that has not reached RANGE_TOLERANCE in ARNOLDI_STEPS is still used. */
const LOOSE_TOLERANCE = 1e-4;

export interface ArnoldiLowest {
  /** the bound on λmin used for the range (null when the run found none) */
  lambda: number | null;
  /** the Ritz estimate itself */
  ritz: number | null;
  steps: number;
  method: string;
}

export function arnoldiLowest(
  n: number,
  shiftSolve: (rho: number, b: Float64Array) => Float64Array,
  radius: number,
  seed: number,
): ArnoldiLowest {
  const rho0 = -1 / (1.001 * radius);
  const m = Math.min(n, ARNOLDI_STEPS);
  const basis: Float64Array[] = [];
  const h = new Float64Array((m + 1) * m); // h[i*m + j]
  const coef = new Float64Array(m + 1);
  const uniform = seededRandom(seed);
  let v = new Float64Array(n).map(() => uniform() - 0.5);
  let norm = Math.sqrt(dot(v, v));
  for (let i = 0; i < n; i++) v[i] /= norm;
  basis.push(v);
  const lambdaOf = (mu: number) => (1 - 1 / mu) / rho0;
  let found: { ritz: number; safe: number; width: number; residual: number } | null = null;
  let steps = 0;
  for (let j = 0; j < m; j++) {
    const u = shiftSolve(rho0, basis[j]);
    for (let pass = 0; pass < 2; pass++) {
      orthogonalise(u, basis, j + 1, coef);
      for (let i = 0; i <= j; i++) h[i * m + j] += coef[i];
    }
    norm = Math.sqrt(dot(u, u));
    h[(j + 1) * m + j] = norm;
    steps = j + 1;
    const invariant = norm <= 1e-14 * Math.abs(h[j * m + j] || 1);
    if (invariant || steps === m || (steps >= 10 && steps % 2 === 0)) {
      const best = largestRealRitz(h, m, steps, invariant ? 0 : norm);
      if (best) {
        // μ̃ − r: the smaller μ, the larger (less negative) λ, the wider the range
        const low = best.mu - best.residual;
        const ritz = lambdaOf(best.mu);
        const safe = low > 1 ? lambdaOf(low) : 0;
        const width = safe < 0 ? Math.abs(1 / safe - 1 / ritz) / Math.abs(1 / ritz) : Infinity;
        found = { ritz, safe, width, residual: best.residual / best.mu };
        if (width <= RANGE_TOLERANCE) break;
      }
    }
    if (invariant) break;
    v = new Float64Array(n);
    for (let t = 0; t < n; t++) v[t] = u[t] / norm;
    basis.push(v);
  }
  if (!found) return { lambda: null, ritz: null, steps, method: `shift-and-invert Arnoldi found no real Ritz value in ${steps} steps` };
  const how = `shift-and-invert Arnoldi on (I − ρ₀W)⁻¹, ρ₀ = ${rho0.toPrecision(6)}, through the sparse LU (${steps} steps; Ritz value ${found.ritz.toPrecision(12)}, relative residual ${found.residual.toExponential(1)}`;
  if (!(found.width <= LOOSE_TOLERANCE)) return { lambda: null, ritz: found.ritz, steps, method: `${how}) did not converge` };
  return {
    lambda: found.safe,
    ritz: found.ritz,
    steps,
    method: `${how}; taken at the Ritz value less its residual, which widens the range by ${found.width.toExponential(1)} relative, so that it contains the true one)`,
  };
}

/**
 * u ← u − Σ_i (u·b_i) b_i over the first `count` basis vectors, the coefficients (all from the same
 * u: classical Gram–Schmidt) left in `coef`.
 */
function orthogonalise(u: Float64Array, basis: Float64Array[], count: number, coef: Float64Array): void {
  const n = u.length;
  let i = 0;
  for (; i + 4 <= count; i += 4) {
    const b0 = basis[i], b1 = basis[i + 1], b2 = basis[i + 2], b3 = basis[i + 3];
    let c0 = 0, c1 = 0, c2 = 0, c3 = 0;
    for (let t = 0; t < n; t++) {
      const x = u[t];
      c0 += x * b0[t]; c1 += x * b1[t]; c2 += x * b2[t]; c3 += x * b3[t];
    }
    coef[i] = c0; coef[i + 1] = c1; coef[i + 2] = c2; coef[i + 3] = c3;
  }
  for (; i < count; i++) coef[i] = dot(u, basis[i]);
  i = 0;
  for (; i + 4 <= count; i += 4) {
    const b0 = basis[i], b1 = basis[i + 1], b2 = basis[i + 2], b3 = basis[i + 3];
    const c0 = coef[i], c1 = coef[i + 1], c2 = coef[i + 2], c3 = coef[i + 3];
    for (let t = 0; t < n; t++) u[t] -= c0 * b0[t] + c1 * b1[t] + c2 * b2[t] + c3 * b3[t];
  }
  for (; i < count; i++) {
    const b = basis[i], c = coef[i];
    for (let t = 0; t < n; t++) u[t] -= c * b[t];
  }
}

/** The largest real Ritz value of the leading j×j Hessenberg matrix and its residual β|y_j|. */
function largestRealRitz(h: Float64Array, m: number, j: number, beta: number): { mu: number; residual: number } | null {
  const rows: number[][] = [];
  for (let r = 0; r < j; r++) {
    const row = new Array<number>(j).fill(0);
    for (let c = Math.max(0, r - 1); c < j; c++) row[c] = h[r * m + c];
    rows.push(row);
  }
  const evd = new EigenvalueDecomposition(new Matrix(rows));
  const re = evd.realEigenvalues, im = evd.imaginaryEigenvalues;
  const vectors = evd.eigenvectorMatrix;
  let best: { mu: number; residual: number } | null = null;
  for (let c = 0; c < j; c++) {
    if (im[c] !== 0 || !(re[c] > 0)) continue;
    if (best && re[c] <= best.mu) continue;
    let norm = 0;
    for (let r = 0; r < j; r++) norm += vectors.get(r, c) ** 2;
    best = { mu: re[c], residual: (beta * Math.abs(vectors.get(j - 1, c))) / Math.sqrt(norm) };
  }
  return best;
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}
