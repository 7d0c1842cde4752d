import type { CsrMatrix } from './csr.js';
import type { AdmissibleRange, LogDeterminant } from './logdet.js';
import type { TraceInverseCurve } from './trace-inverse-curve.js';

/** Traces needed by the ML information matrices and by impacts, at one value of ρ (or λ). */
export interface TracesAt {
  /** tr G, with G = W (I − ρW)⁻¹ */
  trG: number;
  /** tr G² */
  trG2: number;
  /** tr GᵀG */
  trGtG: number;
  /** tr (I − ρW)⁻¹ */
  trAinv: number;
  /** tr WᵀG (optional: the cross term of the test for remaining error dependence in the lag model) */
  trWtG?: number;
  /** tr WG (optional, as trWtG) */
  trWG?: number;
  /** Set when an iterative solve behind these traces stopped short of its tolerance: how many, how far. */
  unconverged?: string;
}

/**
 * Everything the models need from W beyond products W·v: log-determinant, admissible range and
 * traces. A dense implementation serves n ≤ 2,000; sparse ones serve large n. Which one ran is
 * stated in `method` and carried into the report.
 */
export interface WeightsAlgebra {
  readonly n: number;
  readonly w: CsrMatrix;
  readonly logdet: LogDeterminant;
  readonly range: AdmissibleRange;
  /** tr(WᵀW + WW), the constant T of the Lagrange-multiplier tests. */
  readonly lmTrace: number;
  traces(rho: number): TracesAt;
  /** tr(Wᵏ) for k = 1..count (index 0 holds k = 1), for series expansions of impacts. */
  powerTraces(count: number): Float64Array;
  /** How traces are computed (exact, or an estimate with its precision), for the report. */
  readonly traceMethod: string;
  /** Whether `traces` are exact (to rounding and solver tolerance) rather than stochastic estimates. */
  readonly tracesExact: boolean;
  /**
   * Optional: a cheap approximation of the log-determinant, used only to bracket the maximum of a
   * concentrated likelihood before exact evaluations polish it (its method and accuracy say what it is).
   */
  readonly roughLogdet?: LogDeterminant;
  /** Optional: x = (I − ρW)⁻¹ b by a direct method (e.g. the factor kept from `traces` at that ρ). */
  solve?(rho: number, b: Float64Array): Float64Array;
  /**
   * Optional: fast tr(I − ρW)⁻¹ at many ρ within [lo, hi] (the impact draws), when `traces` is
   * costly per ρ. Built once per call; its level may be an estimate (impacts anchor it to the
   * traces at ρ̂), its change with ρ is what the draws use.
   */
  traceInverseCurve?(lo: number, hi: number): TraceInverseCurve;
  /** Optional: lets go of what outlives a run (a helper thread); the algebra stays usable on one thread. */
  dispose?(): void;
}
