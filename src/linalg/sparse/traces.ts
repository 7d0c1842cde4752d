/**
 * Traces at ρ through the sparse Cholesky factor of M = I − ρS, with W = T S T⁻¹ (T diagonal):
 *   A⁻¹ = T M⁻¹ T⁻¹,  G = W A⁻¹ = T H T⁻¹ with H = S M⁻¹ (symmetric, since S and M commute),
 *   tr A⁻¹ = tr M⁻¹,  tr G = tr H,  tr G² = ‖H‖²_F,  tr GᵀG = Σ_ij (t_i/t_j)² H_ij²,
 * and the cross traces of the test for remaining error dependence, tr WᵀG and tr WG.
 * Exact: one solve per column when that is affordable. Otherwise Hutchinson's estimator
 * (Hutchinson 1990) with seeded Rademacher probes z: E[zᵀXz] = tr X, two solves per probe,
 *   x = M⁻¹z:     tr A⁻¹ ≈ zᵀx,  tr G ≈ zᵀSx,  tr G² ≈ ‖Sx‖²;
 *   u = M⁻¹T⁻¹z:  Gz = T S u,  tr GᵀG ≈ ‖Gz‖²,  tr WᵀG ≈ (Wz)ᵀGz,  tr WG ≈ (Wᵀz)ᵀGz,
 * with the standard error of the probe mean reported. All right-hand sides go through the factor
 * together (blocked solves). The factor at the last ρ is kept, so a solve with I − ρW at that ρ
 * (the reduced form of the lag model) costs one more pair of triangular solves.
 */
import { csrMultiply, csrMultiplyTransposed, type CsrMatrix } from '../csr.js';
import type { TracesAt } from '../algebra.js';

/** Every trace, the optional cross traces included. */
type FullTraces = Required<Omit<TracesAt, 'unconverged'>>;
import type { SparseCholeskyLogDet } from './cholesky-logdet.js';
import type { NumericFactor } from './frontal.js';
import { choleskySolveBlock } from './solve.js';
import { meanAndError, rademacher, seededRandom } from '../random.js';

export interface TraceErrors {
  trG: number;
  trG2: number;
  trGtG: number;
  trAinv: number;
  trWtG?: number;
  trWG?: number;
}

export interface TraceOptions {
  seed?: number;
  probes?: number;
  /** n · nnz(L) above which traces are estimated rather than computed exactly */
  exactBudget?: number;
}

/** Right-hand sides per blocked solve. */
const BLOCK = 16;

export class CholeskyTraces {
  readonly exact: boolean;
  readonly probes: number;
  readonly seed: number;
  lastErrors: TraceErrors | null = null;
  private lastTraces: { rho: number; traces: FullTraces } | null = null;

  /** `w` is W itself (for the cross traces); when omitted, W = T S T⁻¹ is applied through S. */
  constructor(private readonly ld: SparseCholeskyLogDet, private readonly s: CsrMatrix, private readonly t: Float64Array, opts: TraceOptions = {}, private readonly w?: CsrMatrix) {
    this.seed = opts.seed ?? 20240601;
    this.probes = opts.probes ?? 16;
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

  /** The numeric factor of I − ρS (the log-determinant keeps the last one; refactored when ρ changes). */
  factorAt(rho: number): NumericFactor {
    return this.ld.factorAt(rho).factor;
  }

  /** x = (I − ρW)⁻¹ b = T M⁻¹ T⁻¹ b by the Cholesky factor. */
  solve(rho: number, b: Float64Array): Float64Array {
    const n = this.s.n, t = this.t;
    const factor = this.factorAt(rho);
    const rhs = new Float64Array(n);
    for (let i = 0; i < n; i++) rhs[i] = b[i] / t[i];
    const x = new Float64Array(n);
    choleskySolveBlock(this.ld.symbolic, factor, rhs, 1, x);
    for (let i = 0; i < n; i++) x[i] *= t[i];
    return x;
  }

  traces(rho: number): FullTraces {
    if (this.lastTraces && this.lastTraces.rho === rho) return { ...this.lastTraces.traces };
    const out = this.exact ? this.exactTraces(rho) : this.estimatedTraces(rho);
    this.lastTraces = { rho, traces: out };
    return { ...out };
  }

  private applyW(v: Float64Array, out: Float64Array, scratch: Float64Array): void {
    if (this.w) { csrMultiply(this.w, v, out); return; }
    const n = this.s.n, t = this.t;
    for (let i = 0; i < n; i++) scratch[i] = v[i] / t[i];
    csrMultiply(this.s, scratch, out);
    for (let i = 0; i < n; i++) out[i] *= t[i];
  }

  private applyWt(v: Float64Array, out: Float64Array, scratch: Float64Array): void {
    if (this.w) { csrMultiplyTransposed(this.w, v, out); return; }
    const n = this.s.n, t = this.t;
    for (let i = 0; i < n; i++) scratch[i] = v[i] * t[i];
    csrMultiply(this.s, scratch, out);
    for (let i = 0; i < n; i++) out[i] /= t[i];
  }

  private exactTraces(rho: number): FullTraces {
    const n = this.s.n, t = this.t, sym = this.ld.symbolic;
    const factor = this.factorAt(rho);
    const b = new Float64Array(n * BLOCK), x = new Float64Array(n * BLOCK), work = new Float64Array(n * BLOCK);
    const col = new Float64Array(n), h = new Float64Array(n), g = new Float64Array(n), scratch = new Float64Array(n);
    const e = new Float64Array(n), we = new Float64Array(n), wte = new Float64Array(n);
    let trAinv = 0, trG = 0, trG2 = 0, trGtG = 0, trWtG = 0, trWG = 0;
    for (let j0 = 0; j0 < n; j0 += BLOCK) {
      const r = Math.min(BLOCK, n - j0);
      b.fill(0);
      for (let c = 0; c < r; c++) b[(j0 + c) * r + c] = 1;
      choleskySolveBlock(sym, factor, b, r, x, work);
      for (let c = 0; c < r; c++) {
        const j = j0 + c;
        for (let i = 0; i < n; i++) col[i] = x[i * r + c];
        csrMultiply(this.s, col, h); // column j of H
        trAinv += col[j];
        trG += h[j];
        const tj = t[j];
        for (let i = 0; i < n; i++) {
          const hi = h[i];
          const h2 = hi * hi;
          trG2 += h2;
          const gi = (t[i] * hi) / tj; // column j of G
          g[i] = gi;
          trGtG += gi * gi;
        }
        // tr WᵀG = Σ_i W_ij G_ij (column j of W), tr WG = Σ_i W_ji G_ij (row j of W)
        e[j] = 1;
        this.applyW(e, we, scratch);
        this.applyWt(e, wte, scratch);
        e[j] = 0;
        for (let i = 0; i < n; i++) { if (we[i] !== 0) trWtG += we[i] * g[i]; if (wte[i] !== 0) trWG += wte[i] * g[i]; }
      }
    }
    this.lastErrors = { trG: 0, trG2: 0, trGtG: 0, trAinv: 0, trWtG: 0, trWG: 0 };
    return { trG, trG2, trGtG, trAinv, trWtG, trWG };
  }

  private estimatedTraces(rho: number): FullTraces {
    const n = this.s.n, t = this.t, sym = this.ld.symbolic;
    const factor = this.factorAt(rho);
    const uniform = seededRandom(this.seed);
    const p = this.probes;
    const sA = new Float64Array(p), sG = new Float64Array(p), sG2 = new Float64Array(p), sGtG = new Float64Array(p);
    const sWtG = new Float64Array(p), sWG = new Float64Array(p);
    const half = BLOCK >> 1; // probes per block: each brings z and T⁻¹z
    const b = new Float64Array(n * BLOCK), x = new Float64Array(n * BLOCK), work = new Float64Array(n * BLOCK);
    const v = new Float64Array(n), sv = new Float64Array(n), gz = new Float64Array(n), wz = new Float64Array(n), scratch = new Float64Array(n);
    // with a second thread, every other block is solved there at the same time (same probes, same
    // arithmetic per column, so the same figures as on one thread)
    const helper = this.ld.helper;
    const buffer = helper ? helper.factors.indexOf(factor) : -1;
    const twoAtOnce = helper !== null && buffer >= 0 && helper.block >= BLOCK;

    const fill = (into: Float64Array, count: number): Float64Array[] => {
      const r = 2 * count;
      const probes: Float64Array[] = [];
      for (let c = 0; c < count; c++) {
        const z = rademacher(new Float64Array(n), uniform);
        probes.push(z);
        for (let i = 0; i < n; i++) { into[i * r + 2 * c] = z[i]; into[i * r + 2 * c + 1] = z[i] / t[i]; }
      }
      return probes;
    };
    const gather = (solved: Float64Array, q0: number, probes: Float64Array[]): void => {
      const count = probes.length, r = 2 * count;
      for (let c = 0; c < count; c++) {
        const z = probes[c], q = q0 + c;
        for (let i = 0; i < n; i++) v[i] = solved[i * r + 2 * c];
        csrMultiply(this.s, v, sv); // H z
        let a = 0, g = 0, g2 = 0;
        for (let i = 0; i < n; i++) { a += z[i] * v[i]; g += z[i] * sv[i]; g2 += sv[i] * sv[i]; }
        for (let i = 0; i < n; i++) v[i] = solved[i * r + 2 * c + 1];
        csrMultiply(this.s, v, sv);
        let gtg = 0;
        for (let i = 0; i < n; i++) { const gi = t[i] * sv[i]; gz[i] = gi; gtg += gi * gi; }
        this.applyW(z, wz, scratch);
        let wtg = 0;
        for (let i = 0; i < n; i++) wtg += wz[i] * gz[i];
        this.applyWt(z, wz, scratch);
        let wg = 0;
        for (let i = 0; i < n; i++) wg += wz[i] * gz[i];
        sA[q] = a; sG[q] = g; sG2[q] = g2; sGtG[q] = gtg; sWtG[q] = wtg; sWG[q] = wg;
      }
    };

    for (let q0 = 0; q0 < p; q0 += twoAtOnce ? 2 * half : half) {
      const count = Math.min(half, p - q0);
      const mine = fill(b, count);
      const q1 = q0 + count;
      const theirCount = twoAtOnce ? Math.min(half, p - q1) : 0;
      if (theirCount > 0) {
        const theirs = fill(helper!.input, theirCount);
        helper!.solveTwo(buffer as 0 | 1, b, 2 * count, x, work, 2 * theirCount);
        gather(x, q0, mine);
        gather(helper!.output, q1, theirs);
      } else {
        choleskySolveBlock(sym, factor, b.subarray(0, n * 2 * count), 2 * count, x, work);
        gather(x, q0, mine);
      }
    }
    const A = meanAndError(sA), G = meanAndError(sG), G2 = meanAndError(sG2), GtG = meanAndError(sGtG);
    const WtG = meanAndError(sWtG), WG = meanAndError(sWG);
    this.lastErrors = { trG: G.se, trG2: G2.se, trGtG: GtG.se, trAinv: A.se, trWtG: WtG.se, trWG: WG.se };
    return { trG: G.mean, trG2: G2.mean, trGtG: GtG.mean, trAinv: A.mean, trWtG: WtG.mean, trWG: WG.mean };
  }
}
