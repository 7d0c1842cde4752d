import type { WeightsAlgebra } from '../linalg/algebra.js';
import { csrMultiply, type CsrMatrix } from '../linalg/csr.js';
import { shiftedSolver } from '../linalg/dense-iterative.js';
import { seededRandom } from '../stats/index.js';

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
 */
export function lagCrossTrace(algebra: WeightsAlgebra, rho: number): { value: number; method: string } {
  const w = algebra.w;
  const n = w.n;
  const given = algebra.traces(rho);
  if (given.trWtG !== undefined && given.trWG !== undefined) {
    // the algebra computed both with its other traces at ρ (same solves, same probes)
    const exact = algebra.traceMethod.startsWith('exact');
    return { value: given.trWtG + given.trWG, method: exact ? 'exact' : `estimated with the other traces (${algebra.traceMethod})` };
  }
  let trW = 0;
  for (let i = 0; i < n; i++) for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) if (w.colIdx[p] === i) trW += w.values[p];
  let trWG: number;
  if (Math.abs(rho) >= 1e-4) {
    trWG = (given.trG - trW) / rho;
  } else {
    const pt = algebra.powerTraces(8);
    trWG = 0;
    for (let j = 0; j <= 5; j++) trWG += rho ** j * pt[j + 1];
  }
  const wt = transpose(w);
  if (isSame(w, wt)) return { value: 2 * trWG, method: 'exact' };
  const solve = shiftedSolver(w, rho);
  const g = new Float64Array(n);
  if (n <= EXACT_LIMIT) {
    // column i of W is row i of Wᵀ
    const unit = new Float64Array(n);
    let sum = 0;
    for (let i = 0; i < n; i++) {
      unit.fill(0);
      unit[i] = 1;
      csrMultiply(w, solve(unit).x, g);
      for (let p = wt.rowPtr[i], pEnd = wt.rowPtr[i + 1]; p < pEnd; p++) sum += wt.values[p] * g[wt.colIdx[p]];
    }
    return { value: sum + trWG, method: 'exact' };
  }
  const uniform = seededRandom(20_240_601);
  const z = new Float64Array(n);
  const wz = new Float64Array(n);
  let sum = 0;
  for (let r = 0; r < PROBES; r++) {
    for (let i = 0; i < n; i++) z[i] = uniform() < 0.5 ? -1 : 1;
    csrMultiply(w, z, wz);
    csrMultiply(w, solve(z).x, g);
    for (let i = 0; i < n; i++) sum += wz[i] * g[i];
  }
  return { value: sum / PROBES + trWG, method: `estimated from ${PROBES} random probes (Hutchinson)` };
}

function transpose(w: CsrMatrix): CsrMatrix {
  const n = w.n;
  const count = new Int32Array(n + 1);
  for (let p = 0; p < w.colIdx.length; p++) count[w.colIdx[p] + 1]++;
  for (let i = 0; i < n; i++) count[i + 1] += count[i];
  const rowPtr = Int32Array.from(count);
  const colIdx = new Int32Array(w.colIdx.length);
  const values = new Float64Array(w.values.length);
  const next = Int32Array.from(count.subarray(0, n));
  for (let i = 0; i < n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      const q = next[w.colIdx[p]]++;
      colIdx[q] = i; // rows visited in order, so columns come out sorted
      values[q] = w.values[p];
    }
  }
  return { n, rowPtr, colIdx, values };
}

function isSame(a: CsrMatrix, b: CsrMatrix): boolean {
  if (a.colIdx.length !== b.colIdx.length) return false;
  for (let i = 0; i <= a.n; i++) if (a.rowPtr[i] !== b.rowPtr[i]) return false;
  for (let p = 0; p < a.colIdx.length; p++) {
    if (a.colIdx[p] !== b.colIdx[p] || Math.abs(a.values[p] - b.values[p]) > 1e-12 * Math.abs(a.values[p])) return false;
  }
  return true;
}
