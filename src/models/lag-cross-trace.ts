import { csrMultiply, type CsrMatrix } from '../linalg/csr.js';
import { solveShifted } from '../linalg/dense-iterative.js';
import { seededRandom } from '../stats/index.js';

/** Up to this n the trace is exact (one solve per area); above it, a stochastic estimate. */
const EXACT_LIMIT = 3000;
const PROBES = 64;

/**
 * T₂₁ = tr(WᵀG + WG) with G = W(I − ρW)⁻¹, the cross term of the LM test for error dependence in
 * the lag model. tr(BG) = Σᵢ Σₘ B_im (G e_i)_m with B = W + Wᵀ: exact from n solves for n ≤ 3,000;
 * beyond that Hutchinson's estimator (Hutchinson 1990) tr(BG) ≈ mean zᵀBGz over 64 seeded
 * Rademacher probes, with the method said in `method`.
 */
export function lagCrossTrace(w: CsrMatrix, rho: number): { value: number; method: string } {
  const n = w.n;
  const sym = symmetricPart(w);
  const g = new Float64Array(n);
  if (n <= EXACT_LIMIT) {
    const unit = new Float64Array(n);
    let sum = 0;
    for (let i = 0; i < n; i++) {
      unit.fill(0);
      unit[i] = 1;
      csrMultiply(w, solveShifted(w, rho, unit).x, g);
      for (let p = sym.rowPtr[i]; p < sym.rowPtr[i + 1]; p++) sum += sym.values[p] * g[sym.colIdx[p]];
    }
    return { value: sum, method: 'exact' };
  }
  const uniform = seededRandom(20_240_601);
  const z = new Float64Array(n);
  const bz = new Float64Array(n);
  let sum = 0;
  for (let r = 0; r < PROBES; r++) {
    for (let i = 0; i < n; i++) z[i] = uniform() < 0.5 ? -1 : 1;
    csrMultiply(sym, z, bz);
    csrMultiply(w, solveShifted(w, rho, z).x, g);
    for (let i = 0; i < n; i++) sum += bz[i] * g[i];
  }
  return { value: sum / PROBES, method: `estimated from ${PROBES} random probes (Hutchinson)` };
}

/** W + Wᵀ in CSR (same pattern union, columns sorted). */
function symmetricPart(w: CsrMatrix): CsrMatrix {
  const n = w.n;
  const rows: Map<number, number>[] = Array.from({ length: n }, () => new Map());
  for (let i = 0; i < n; i++) {
    for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) {
      const j = w.colIdx[p];
      const v = w.values[p];
      rows[i].set(j, (rows[i].get(j) ?? 0) + v);
      rows[j].set(i, (rows[j].get(i) ?? 0) + v);
    }
  }
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let i = 0; i < n; i++) {
    const entries = [...rows[i].entries()].sort((a, b) => a[0] - b[0]);
    for (const [j, v] of entries) {
      cols.push(j);
      vals.push(v);
    }
    rowPtr[i + 1] = cols.length;
  }
  return { n, rowPtr, colIdx: Int32Array.from(cols), values: Float64Array.from(vals) };
}
