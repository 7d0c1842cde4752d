import type { CsrMatrix } from './csr.js';
import type { AdmissibleRange, LogDeterminant } from './logdet.js';

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
  /** How traces are computed ("exact ..." or an estimate with its precision). */
  readonly traceMethod: string;
}
