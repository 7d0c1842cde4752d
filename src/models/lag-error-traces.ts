import { csrMultiply, isSymmetric, rademacher, seededRandom, shiftedSolver, type WeightsAlgebra } from '../linalg/index.js';

/** Up to this n the cross trace tr(HᵀG) is exact (two solves per area); above it, a stochastic estimate. */
const EXACT_LIMIT = 2000;
const PROBES = 32;
/** Below this |ρ − λ| the divided difference for tr(GH) gives way to its limit, the mean of tr G² at both ends. */
const CLOSE = 1e-4;

export interface CrossTraces {
  /** tr(GH), G = W(I − ρW)⁻¹, H = W(I − λW)⁻¹ */
  trGH: number;
  /** tr(HᵀG) */
  trHtG: number;
  exact: boolean;
  method: string;
}

/**
 * The two traces that join ρ and λ in the information matrix of the lag-and-error model.
 * - tr(GH) exactly from traces the algebra already gives: G and H are functions of the same W, so by
 *   partial fractions (I − ρW)⁻¹(I − λW)⁻¹ = [ρ(I − ρW)⁻¹ − λ(I − λW)⁻¹]/(ρ − λ), and with
 *   W²(I − ρW)⁻¹ = (G − W)/ρ, tr(GH) = (tr G(ρ) − tr G(λ))/(ρ − λ), a divided difference of tr G
 *   whose limit as λ → ρ is tr G² (used, as the mean at both ends, when |ρ − λ| < 1e-4).
 * - tr(HᵀG) equals tr(GH) when W is symmetric; otherwise Σᵢ (H eᵢ)·(G eᵢ) from one solve with each
 *   of I − ρW and I − λW per area (exact) up to 2,000 areas, and beyond that Hutchinson's estimator
 *   (Hutchinson 1990) mean (Hz)·(Gz) over 32 seeded Rademacher probes, its standard error stated.
 * Solves use the algebra's direct solve when it has one (all the λ solves first, then the ρ ones, so
 * a factor kept per value is built once each), else restarted GMRES.
 */
export function lagErrorCrossTraces(algebra: WeightsAlgebra, rho: number, lambda: number, trG: (x: number) => { trG: number; trG2: number }): CrossTraces {
  const w = algebra.w;
  const n = w.n;
  let trGH: number;
  if (Math.abs(rho - lambda) >= CLOSE) {
    trGH = (trG(rho).trG - trG(lambda).trG) / (rho - lambda);
  } else {
    trGH = 0.5 * (trG(rho).trG2 + trG(lambda).trG2);
  }
  if (isSymmetric(w)) return { trGH, trHtG: trGH, exact: true, method: 'from tr G at ρ and at λ (W is symmetric, so tr HᵀG = tr GH, a divided difference of tr G)' };

  const solverAt = (at: number) => {
    if (algebra.solve) return (b: Float64Array) => algebra.solve!(at, b);
    const s = shiftedSolver(w, at);
    return (b: Float64Array) => s(b).x;
  };
  const exact = n <= EXACT_LIMIT;
  const count = exact ? n : PROBES;
  const probe = (r: number, uniform: () => number): Float64Array => {
    const z = new Float64Array(n);
    if (exact) z[r] = 1;
    else rademacher(z, uniform);
    return z;
  };
  // H z for every probe first (one factor at λ), then G z (one at ρ)
  const hz: Float64Array[] = [];
  let uniform = seededRandom(20_261_202);
  const solveLambda = solverAt(lambda);
  for (let r = 0; r < count; r++) hz.push(csrMultiply(w, solveLambda(probe(r, uniform))));
  uniform = seededRandom(20_261_202);
  const solveRho = solverAt(rho);
  const samples = new Float64Array(count);
  for (let r = 0; r < count; r++) {
    const gz = csrMultiply(w, solveRho(probe(r, uniform)));
    let s = 0;
    const h = hz[r];
    for (let i = 0; i < n; i++) s += h[i] * gz[i];
    samples[r] = s;
  }
  let sum = 0;
  for (const s of samples) sum += s;
  if (exact) return { trGH, trHtG: sum, exact: true, method: `tr GH a divided difference of tr G at ρ and at λ; tr HᵀG exact from ${2 * n} solves` };
  const mean = sum / count;
  let ss = 0;
  for (const s of samples) ss += (s - mean) ** 2;
  const se = Math.sqrt(ss / (count - 1) / count);
  return {
    trGH,
    trHtG: mean,
    exact: false,
    method: `tr GH a divided difference of tr G at ρ and at λ; tr HᵀG estimated from ${count} random probes (Hutchinson), ${mean.toPrecision(6)} with standard error ${se.toPrecision(2)}`,
  };
}
