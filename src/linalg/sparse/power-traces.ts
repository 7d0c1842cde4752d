/**
 * tr(Wᵏ), k = 1..count, for series expansions (LeSage & Pace 2009, Introduction to Spatial
 * Econometrics, §4.2). tr W = Σ w_ii and tr W² = Σ_ij w_ij w_ji exactly from CSR; k ≥ 3 by
 * Hutchinson's estimator with seeded Rademacher probes (zᵀWᵏz), or exactly from unit vectors
 * when n is small. With a symmetric form S (same traces), zᵀS²ᵃz = ‖Sᵃz‖² and
 * zᵀS²ᵃ⁺¹z = (Sᵃz)ᵀS(Sᵃz) halve the products needed.
 */
import { csrMultiply, traceOf, traceOfSquare, type CsrMatrix } from '../csr.js';
import { meanAndError, rademacher, seededRandom } from '../random.js';

export interface PowerTraceEstimate {
  /** tr(Wᵏ) at index k − 1 */
  traces: Float64Array;
  /** standard error at index k − 1 (0 where exact) */
  errors: Float64Array;
  /** per-probe values zᵀWᵏz, probe-major (probes × count), for series estimates with errors */
  samples: Float64Array | null;
  probes: number;
  exact: boolean;
}

/**
 * tr(Wᵏ) for k = 1..count. `symmetric` is S with the same spectrum (or null). Exact from unit
 * vectors when n · count · nnz ≤ budget; else `probes` Rademacher probes from `seed`.
 */
export function powerTraces(w: CsrMatrix, symmetric: CsrMatrix | null, count: number, seed: number, probes: number, budget = 2e8): PowerTraceEstimate {
  const n = w.n;
  const a = symmetric ?? w;
  const nnz = a.rowPtr[n];
  const exact = n * count * Math.max(nnz, 1) <= budget;
  const traces = new Float64Array(count), errors = new Float64Array(count);
  const rounds = exact ? n : probes;
  const samples = new Float64Array(rounds * count);
  const uniform = seededRandom(seed);
  let v = new Float64Array(n), next = new Float64Array(n);
  const z = new Float64Array(n);
  let sv = new Float64Array(n);
  for (let q = 0; q < rounds; q++) {
    if (exact) { z.fill(0); z[q] = 1; } else rademacher(z, uniform);
    const row = q * count;
    v.set(z);
    if (symmetric) {
      // v = Sᵃ z; record ‖v‖² at k = 2a and vᵀSv at k = 2a + 1
      for (let aPow = 0; 2 * aPow + 1 <= count; aPow++) {
        csrMultiply(symmetric, v, sv);
        let odd = 0, even = 0;
        for (let i = 0; i < n; i++) { odd += v[i] * sv[i]; even += sv[i] * sv[i]; }
        samples[row + 2 * aPow] = odd; // k = 2a + 1
        if (2 * aPow + 2 <= count) samples[row + 2 * aPow + 1] = even; // k = 2a + 2
        const t = v; v = sv; sv = t;
      }
    } else {
      for (let k = 0; k < count; k++) {
        csrMultiply(w, v, next);
        let s = 0;
        for (let i = 0; i < n; i++) s += z[i] * next[i];
        samples[row + k] = s;
        const t = v; v = next; next = t;
      }
    }
  }
  for (let k = 0; k < count; k++) {
    if (exact) {
      let s = 0;
      for (let q = 0; q < rounds; q++) s += samples[q * count + k];
      traces[k] = s;
    } else {
      const col = new Float64Array(rounds);
      for (let q = 0; q < rounds; q++) col[q] = samples[q * count + k];
      const me = meanAndError(col);
      traces[k] = me.mean;
      errors[k] = me.se;
    }
  }
  // exact first two traces whatever the route
  if (count >= 1) { traces[0] = traceOf(w); errors[0] = 0; }
  if (count >= 2) { traces[1] = traceOfSquare(w); errors[1] = 0; }
  return { traces, errors, samples: exact ? null : samples, probes: rounds, exact };
}
