/**
 * Traces at ρ through the sparse Cholesky factor of M = I − ρS, with W = T S T⁻¹ (T diagonal):
 *   A⁻¹ = T M⁻¹ T⁻¹,  G = W A⁻¹ = T H T⁻¹ with H = S M⁻¹ (symmetric, since S and M commute),
 *   tr A⁻¹ = tr M⁻¹,  tr G = tr H,  tr G² = ‖H‖²_F,  tr GᵀG = Σ_ij (t_i/t_j)² H_ij².
 * Exact: one solve per column when that is affordable. Otherwise Hutchinson's estimator
 * (Hutchinson 1990) with seeded Rademacher probes z: E[zᵀXz] = tr X, so
 *   tr M⁻¹ ≈ zᵀM⁻¹z,  tr H ≈ zᵀHz,  tr H² ≈ ‖Hz‖²,  tr GᵀG ≈ ‖T H T⁻¹ z‖²,
 * with the standard error of the probe mean reported.
 */
import { csrMultiply, type CsrMatrix } from '../csr.js';
import type { TracesAt } from '../algebra.js';
import type { SparseCholeskyLogDet } from './cholesky-logdet.js';
import { choleskySolve } from './solve.js';
import { meanAndError, rademacher, seededUniform } from './random.js';

export interface TraceErrors {
  trG: number;
  trG2: number;
  trGtG: number;
  trAinv: number;
}

export interface TraceOptions {
  seed?: number;
  probes?: number;
  /** n · nnz(L) above which traces are estimated rather than computed exactly */
  exactBudget?: number;
}

export class CholeskyTraces {
  readonly exact: boolean;
  readonly probes: number;
  readonly seed: number;
  lastErrors: TraceErrors | null = null;

  constructor(private readonly ld: SparseCholeskyLogDet, private readonly s: CsrMatrix, private readonly t: Float64Array, opts: TraceOptions = {}) {
    this.seed = opts.seed ?? 20240601;
    this.probes = opts.probes ?? 48;
    this.exact = s.n * ld.symbolic.nnzStored <= (opts.exactBudget ?? 1.5e8);
  }

  describe(): string {
    if (this.exact) return 'exact, one sparse Cholesky solve per area';
    const base = `Hutchinson estimate, ${this.probes} Rademacher probes (seed ${this.seed}), solves with the sparse Cholesky factor`;
    const e = this.lastErrors;
    if (!e) return base;
    const f = (x: number) => x.toPrecision(2);
    return `${base}; standard errors at the last ρ: tr G ${f(e.trG)}, tr G² ${f(e.trG2)}, tr GᵀG ${f(e.trGtG)}, tr A⁻¹ ${f(e.trAinv)}`;
  }

  traces(rho: number): TracesAt {
    const n = this.s.n;
    const { factor } = this.ld.factorAt(rho);
    const sym = this.ld.symbolic;
    const t = this.t;
    const x = new Float64Array(n), h = new Float64Array(n), work = new Float64Array(n), b = new Float64Array(n);
    if (this.exact) {
      let trAinv = 0, trG = 0, trG2 = 0, trGtG = 0;
      for (let j = 0; j < n; j++) {
        b[j] = 1;
        choleskySolve(sym, factor, b, x, work);
        b[j] = 0;
        csrMultiply(this.s, x, h);
        trAinv += x[j];
        trG += h[j];
        const tj = t[j];
        for (let i = 0; i < n; i++) {
          const hi = h[i];
          if (hi === 0) continue;
          const h2 = hi * hi;
          trG2 += h2;
          const ratio = t[i] / tj;
          trGtG += ratio * ratio * h2;
        }
      }
      this.lastErrors = { trG: 0, trG2: 0, trGtG: 0, trAinv: 0 };
      return { trG, trG2, trGtG, trAinv };
    }
    const uniform = seededUniform(this.seed);
    const p = this.probes;
    const sA = new Float64Array(p), sG = new Float64Array(p), sG2 = new Float64Array(p), sGtG = new Float64Array(p);
    const z = new Float64Array(n), u = new Float64Array(n);
    for (let q = 0; q < p; q++) {
      rademacher(z, uniform);
      choleskySolve(sym, factor, z, x, work);
      csrMultiply(this.s, x, h); // h = H z
      let a = 0, g = 0, g2 = 0;
      for (let i = 0; i < n; i++) { a += z[i] * x[i]; g += z[i] * h[i]; g2 += h[i] * h[i]; }
      // ‖T H T⁻¹ z‖²
      for (let i = 0; i < n; i++) b[i] = z[i] / t[i];
      choleskySolve(sym, factor, b, u, work);
      csrMultiply(this.s, u, h);
      let gtg = 0;
      for (let i = 0; i < n; i++) { const v = t[i] * h[i]; gtg += v * v; }
      sA[q] = a; sG[q] = g; sG2[q] = g2; sGtG[q] = gtg;
    }
    const A = meanAndError(sA), G = meanAndError(sG), G2 = meanAndError(sG2), GtG = meanAndError(sGtG);
    this.lastErrors = { trG: G.se, trG2: G2.se, trGtG: GtG.se, trAinv: A.se };
    return { trG: G.mean, trG2: G2.mean, trGtG: GtG.mean, trAinv: A.mean };
  }
}
