/**
 * Traces at ρ for W without a symmetric form, by solves with A = I − ρW and Hutchinson's estimator
 * (seeded Rademacher probes z):
 *   x = A⁻¹z, y = Wx = Gz, u = G y:  tr A⁻¹ ≈ zᵀx, tr G ≈ zᵀy, tr G² ≈ zᵀu, tr GᵀG ≈ ‖y‖².
 * Exact (unit vectors instead of probes) when that is affordable. The solves go through a direct
 * factor when the algebra has one (the sparse LU kept at the last ρ; right-hand sides in blocks of
 * 16, each factor entry read once per block), else BiCGSTAB (van der Vorst 1992).
 */
import { csrMultiply, csrMultiplyTransposed, type CsrMatrix } from '../csr.js';
import type { TracesAt } from '../algebra.js';
import type { TraceErrors } from './traces.js';
import { meanAndError, rademacher, seededRandom } from '../random.js';
import { bicgstabShifted } from '../iterative.js';

/** A direct solver for blocks of right-hand sides, interleaved (B[i·r + c] is row i of column c). */
export interface BlockSolver {
  solveBlock(rho: number, b: Float64Array, r: number, x: Float64Array, work?: Float64Array): Float64Array;
  /** doubles of the factor: one solve costs about twice that many multiply-adds per right-hand side */
  readonly factorSize: number;
}

export interface GeneralTraceOptions {
  seed?: number;
  /** Rademacher probes when the traces are estimated (default 48) */
  probes?: number;
  /** solves with a factor instead of BiCGSTAB */
  direct?: BlockSolver;
  /** with a factor: n · factorSize up to which the traces are exact (default 1.5e8) */
  exactBudget?: number;
}

/** Right-hand sides per blocked direct solve. */
const BLOCK = 16;

export class GeneralTraces {
  readonly exact: boolean;
  readonly seed: number;
  readonly probes: number;
  private readonly direct: BlockSolver | null;
  lastErrors: TraceErrors | null = null;

  /** Exact up to 1,500 areas with BiCGSTAB; with a factor, while n solves cost at most 2 · exactBudget multiply-adds. */
  constructor(private readonly w: CsrMatrix, opts: GeneralTraceOptions = {}) {
    this.seed = opts.seed ?? 20240601;
    this.probes = opts.probes ?? 48;
    this.direct = opts.direct ?? null;
    this.exact = this.direct ? w.n * this.direct.factorSize <= (opts.exactBudget ?? 1.5e8) : w.n <= 1500;
  }

  describe(): string {
    const how = this.direct ? 'solves with the sparse LU factor' : 'BiCGSTAB solves to relative residual 1e-12';
    if (this.exact) return `exact, one ${this.direct ? 'sparse LU' : 'iterative (BiCGSTAB)'} solve per area`;
    const base = `Hutchinson estimate, ${this.probes} Rademacher probes (seed ${this.seed}), ${how}`;
    const e = this.lastErrors;
    if (!e) return base;
    const f = (x: number) => x.toPrecision(2);
    return `${base}; standard errors at the last ρ: tr G ${f(e.trG)}, tr G² ${f(e.trG2)}, tr GᵀG ${f(e.trGtG)}, tr A⁻¹ ${f(e.trAinv)}`;
  }

  /** The traces at ρ (the last ρ's are kept: the fit's standard errors and its tests ask twice). */
  traces(rho: number): TracesAt {
    if (this.last && this.last.rho === rho) return { ...this.last.traces };
    const traces = this.compute(rho);
    this.last = { rho, traces };
    return { ...traces };
  }

  private last: { rho: number; traces: TracesAt } | null = null;
  private unconverged = 0;
  private worstResidual = 0;

  /** X = A⁻¹B for r interleaved columns: through the factor, or column by column by BiCGSTAB. */
  private solveMany(rho: number, b: Float64Array, r: number, x: Float64Array): void {
    if (this.direct) { this.direct.solveBlock(rho, b, r, x); return; }
    const n = this.w.n, col = new Float64Array(n), out = new Float64Array(n);
    for (let c = 0; c < r; c++) {
      for (let i = 0; i < n; i++) col[i] = b[i * r + c];
      const solved = bicgstabShifted(this.w, rho, col, out);
      if (!solved.converged) {
        this.unconverged++;
        this.worstResidual = Math.max(this.worstResidual, solved.relativeResidual);
      }
      for (let i = 0; i < n; i++) x[i * r + c] = out[i];
    }
  }

  private compute(rho: number): TracesAt {
    this.unconverged = 0;
    this.worstResidual = 0;
    const out = this.computeTraces(rho);
    if (this.unconverged > 0) {
      out.unconverged = `${this.unconverged} of the iterative solves behind the traces at ρ = ${rho} stopped short of relative residual 1e-12 (worst ${this.worstResidual.toExponential(1)})`;
    }
    return out;
  }

  private computeTraces(rho: number): TracesAt {
    const n = this.w.n;
    const rounds = this.exact ? n : this.probes;
    const uniform = seededRandom(this.seed);
    const block = Math.min(BLOCK, rounds);
    const Z = new Float64Array(n * block), X = new Float64Array(n * block), Y = new Float64Array(n * block), X2 = new Float64Array(n * block);
    const z = new Float64Array(n), x = new Float64Array(n), y = new Float64Array(n), x2 = new Float64Array(n), u = new Float64Array(n);
    const sA = new Float64Array(rounds), sG = new Float64Array(rounds), sG2 = new Float64Array(rounds), sGtG = new Float64Array(rounds);
    // the cross traces of the remaining-error test from the same Gz: tr WᵀG ≈ (Wz)ᵀGz, tr WG ≈ (Wᵀz)ᵀGz
    const sWtG = new Float64Array(rounds), sWG = new Float64Array(rounds);
    const wz = new Float64Array(n), wtz = new Float64Array(n);
    const column = (from: Float64Array, r: number, c: number, to: Float64Array) => { for (let i = 0; i < n; i++) to[i] = from[i * r + c]; };
    for (let q0 = 0; q0 < rounds; q0 += block) {
      const r = Math.min(block, rounds - q0);
      for (let c = 0; c < r; c++) {
        if (this.exact) { z.fill(0); z[q0 + c] = 1; } else rademacher(z, uniform);
        for (let i = 0; i < n; i++) Z[i * r + c] = z[i];
      }
      this.solveMany(rho, Z, r, X);
      for (let c = 0; c < r; c++) {
        column(X, r, c, x);
        csrMultiply(this.w, x, y);
        for (let i = 0; i < n; i++) Y[i * r + c] = y[i];
      }
      this.solveMany(rho, Y, r, X2);
      for (let c = 0; c < r; c++) {
        const q = q0 + c;
        column(Z, r, c, z);
        column(X, r, c, x);
        column(Y, r, c, y);
        column(X2, r, c, x2);
        csrMultiply(this.w, x2, u);
        csrMultiply(this.w, z, wz);
        csrMultiplyTransposed(this.w, z, wtz);
        let a = 0, g = 0, g2 = 0, gtg = 0, wtg = 0, wg = 0;
        for (let i = 0; i < n; i++) {
          const yi = y[i];
          a += z[i] * x[i]; g += z[i] * yi; g2 += z[i] * u[i]; gtg += yi * yi; wtg += wz[i] * yi; wg += wtz[i] * yi;
        }
        sA[q] = a; sG[q] = g; sG2[q] = g2; sGtG[q] = gtg; sWtG[q] = wtg; sWG[q] = wg;
      }
    }
    if (this.exact) {
      const sum = (v: Float64Array) => v.reduce((s, t) => s + t, 0);
      this.lastErrors = { trG: 0, trG2: 0, trGtG: 0, trAinv: 0, trWtG: 0, trWG: 0 };
      return { trG: sum(sG), trG2: sum(sG2), trGtG: sum(sGtG), trAinv: sum(sA), trWtG: sum(sWtG), trWG: sum(sWG) };
    }
    const A = meanAndError(sA), G = meanAndError(sG), G2 = meanAndError(sG2), GtG = meanAndError(sGtG);
    const WtG = meanAndError(sWtG), WG = meanAndError(sWG);
    this.lastErrors = { trG: G.se, trG2: G2.se, trGtG: GtG.se, trAinv: A.se, trWtG: WtG.se, trWG: WG.se };
    return { trG: G.mean, trG2: G2.mean, trGtG: GtG.mean, trAinv: A.mean, trWtG: WtG.mean, trWG: WG.mean };
  }
}
