import type { CsrMatrix } from './csr.js';

/**
 * A way of evaluating ln|I − ρW| over ρ. Dense eigenvalues serve small n; sparse methods
 * (Cholesky of the symmetric similar matrix, LU, or approximations) serve large n. The model
 * fitters only see this interface, so the choice is made once, in `chooseLogDeterminant`.
 */
export interface LogDeterminant {
  /** ln|I − ρW| for ρ inside the admissible interval. */
  evaluate(rho: number): number;
  /** Plain description for the report, e.g. "exact, eigenvalues of the symmetric similar matrix". */
  readonly method: string;
  /** "exact" or a stated error bound. */
  readonly accuracy: string;
  /** Optional: the error bound at one ρ (an approximation quotes it at the estimate, never elsewhere). */
  accuracyAt?(rho: number): string;
  /** Optional: the interval outside which an approximation means nothing (a series' radius of convergence). */
  readonly domain?: { lower: number; upper: number };
}

/** What a log-determinant strategy is built from. */
export interface LogDetInput {
  /** W as used by the model (row-standardised or not). */
  w: CsrMatrix;
  /** A symmetric matrix similar to W (same eigenvalues), when one exists; else null. */
  symmetric: CsrMatrix | null;
}

/** Admissible interval for ρ or λ: (1/λmin, 1/λmax) of W. */
export interface AdmissibleRange {
  lower: number;
  upper: number;
  eigenMin: number;
  eigenMax: number;
  method: string;
}
