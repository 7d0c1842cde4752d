export { sparseAlgebra, type SparseOptions, type SparseWeightsAlgebra } from './sparse-algebra.js';
export { SparseCholeskyLogDet } from './cholesky-logdet.js';
export { NotPositiveDefiniteError } from './frontal.js';
export { PivotError } from './lu-front.js';
export { SeriesLogDet } from './series-logdet.js';
export { lanczosExtremes } from './extremes.js';
export { coordinateDissection, levelDissection, graphOf, isPermutation } from './ordering.js';
export { serveHelper, type StartHelperThread, type HelperInit } from './helper-thread.js';
