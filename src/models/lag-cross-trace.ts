import { csrMultiply, isSymmetric, seededRandom, shiftedSolver, traceOf, transpose, type WeightsAlgebra } from '../linalg/index.js';

/** Up to this n the trace is exact (one solve per area); above it, a stochastic estimate. */
const EXACT_LIMIT = 2000;
const PROBES = 64;

/**
 * T₂₁ = tr(WᵀG + WG) with G = W(I − ρW)⁻¹, the cross term of the LM test for error dependence in
 * the lag model. When the algebra's traces carry tr WᵀG and tr WG (the sparse Cholesky algebra
 * computes them from the same solves or probes as its other traces), those are used. Otherwise:
 * - tr(WG) comes from the identity G = W + ρWG: tr(WG) = (tr G − tr W)/ρ, with tr G from the
 *   algebra (for |ρ| < 1e-4, the series Σⱼ ρʲ tr Wʲ⁺² instead, to avoid cancellation).
 * - tr(WᵀG) = tr(WG) when W is symmetric; otherwise Σᵢ (W e_i)·(G e_i), exact from n solves for
 *   n ≤ 2,000 and beyond that Hutchinson's estimator (Hutchinson 1990) tr(WᵀG) ≈ mean (Wz)ᵀGz
 *   over 64 seeded Rademacher probes, the method being said in `method`.
 * `exact` is a flag for decisions; `unconverged` is set when an iterative solve stopped short.
 */
export function lagCrossTrace(algebra: WeightsAlgebra, rho: number): { value: number; method: string; exact: boolean; unconverged?: string } {
  const w = algebra.w;
  const n = w.n;
  const given = algebra.traces(rho);
  if (given.trWtG !== undefined && given.trWG !== undefined) {
    // the algebra computed both with its other traces at ρ (same solves, same probes)
    const exact = algebra.tracesExact;
    return {
      value: given.trWtG + given.trWG,
      method: exact ? 'exact' : `estimated with the other traces (${algebra.traceMethod})`,
      exact,
      ...(given.unconverged ? { unconverged: given.unconverged } : {}),
    };
  }
  const trW = traceOf(w);
  let trWG: number;
  if (Math.abs(rho) >= 1e-4) {
    trWG = (given.trG - trW) / rho;
  } else {
    const pt = algebra.powerTraces(8);
    trWG = 0;
    for (let j = 0; j <= 5; j++) trWG += rho ** j * pt[j + 1];
  }
  if (isSymmetric(w)) return { value: 2 * trWG, method: 'exact', exact: true };
  const wt = transpose(w);
  const solve = shiftedSolver(w, rho);
  const g = new Float64Array(n);
  let missed = 0, worst = 0;
  const solved = (b: Float64Array): Float64Array => {
    const r = solve(b);
    if (!r.converged) { missed++; worst = Math.max(worst, r.relativeResidual); }
    return r.x;
  };
  const note = (count: number) => (missed > 0
    ? { unconverged: `${missed} of the ${count} GMRES solves behind tr(WᵀG) at ρ = ${rho} stopped short of relative residual 1e-12 (worst ${worst.toExponential(1)})` }
    : {});
  if (n <= EXACT_LIMIT) {
    // column i of W is row i of Wᵀ
    const unit = new Float64Array(n);
    let sum = 0;
    for (let i = 0; i < n; i++) {
      unit.fill(0);
      unit[i] = 1;
      csrMultiply(w, solved(unit), g);
      for (let p = wt.rowPtr[i], pEnd = wt.rowPtr[i + 1]; p < pEnd; p++) sum += wt.values[p] * g[wt.colIdx[p]];
    }
    return { value: sum + trWG, method: 'exact', exact: true, ...note(n) };
  }
  const uniform = seededRandom(20_240_601);
  const z = new Float64Array(n);
  const wz = new Float64Array(n);
  let sum = 0;
  for (let r = 0; r < PROBES; r++) {
    for (let i = 0; i < n; i++) z[i] = uniform() < 0.5 ? -1 : 1;
    csrMultiply(w, z, wz);
    csrMultiply(w, solved(z), g);
    for (let i = 0; i < n; i++) sum += wz[i] * g[i];
  }
  return { value: sum / PROBES + trWG, method: `estimated from ${PROBES} random probes (Hutchinson)`, exact: false, ...note(PROBES) };
}
