/**
 * The one door into linalg: every other stage imports numeric kernels from here, never from a file
 * inside src/linalg (scripts/check-imports.mjs enforces it).
 */
export {
  type CsrMatrix, csrMultiply, csrMultiplyTransposed, csrEntry, rowSums, isNonNegative, isRowStochastic,
  maxAbsRowSum, transpose, isSymmetric, traceOf, traceOfSquare, lmTrace, ROW_SUM_TOLERANCE,
} from './csr.js';
export type { WeightsAlgebra, TracesAt } from './algebra.js';
export type { LogDeterminant, AdmissibleRange } from './logdet.js';
export { chebyshevCurve, type TraceInverseCurve } from './trace-inverse-curve.js';
export { chooseAlgebra, sparseAlgebra, DENSE_LIMIT, DENSE_LIMIT_NONSYMMETRIC, type ChooseOptions } from './choose-algebra.js';
export { denseAlgebra } from './dense-algebra.js';
export { admissibleRange, rangeFromEigenvalues, perronRoot } from './range.js';
export { symmetricForm as symmetricFormOf, scaledByRowSums, diagonalSimilarity } from './symmetric-form.js';
export { solveShifted, shiftedSolver, bicgstabShifted, type ShiftedSolve } from './iterative.js';
export { householderQr, qrSolve, applyQt, applyQ, thinQ, solveUpper, inverseCrossProduct, firstDependentColumn, type HouseholderQr } from './dense-qr.js';
export { seededRandom, normalSampler, rademacher, meanAndError } from './random.js';
export {
  NotPositiveDefiniteError, PivotError, type StartHelperThread, type HelperInit, serveHelper, type SparseOptions,
} from './sparse/index.js';
