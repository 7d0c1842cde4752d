import { csrMultiply, isSymmetric, scaledByRowSums, type CsrMatrix } from '../linalg/index.js';
import type { SpatialWeights, WeightsTransform } from './types.js';
import { formatCount } from '../core/count.js';

/**
 * 'row': each row divided by its sum, so rows sum to 1 (rows of areas without neighbours stay 0).
 * 'binary': every link weighs 1.
 */
export function applyTransform(base: CsrMatrix, transform: WeightsTransform): CsrMatrix {
  const { n, rowPtr, colIdx } = base;
  const values = new Float64Array(colIdx.length);
  if (transform === 'binary') {
    values.fill(1);
  } else {
    for (let i = 0; i < n; i++) {
      let sum = 0;
      for (let p = rowPtr[i], pEnd = rowPtr[i + 1]; p < pEnd; p++) sum += base.values[p];
      for (let p = rowPtr[i], pEnd = rowPtr[i + 1]; p < pEnd; p++) values[p] = base.values[p] / sum;
    }
  }
  return { n, rowPtr, colIdx, values };
}

/**
 * A symmetric matrix S similar to W, so that W and S have the same eigenvalues (used for
 * log-determinants and eigenvalue bounds). W itself when W is symmetric. When W = D⁻¹C is the
 * row-standardised form of a symmetric C (the stored symmetricBase), S = D^{-1/2} C D^{-1/2}
 * = D^{1/2} W D^{-1/2} (Ord 1975, "Estimation methods for models of spatial interaction", JASA 70).
 * Null when W has no symmetric counterpart of this kind (e.g. k-nearest neighbours).
 */
export function symmetricForm(w: SpatialWeights): CsrMatrix | null {
  const plain: CsrMatrix = { n: w.n, rowPtr: w.rowPtr, colIdx: w.colIdx, values: w.values };
  if (isSymmetric(plain)) return plain;
  const c = w.symmetricBase;
  if (!c || w.transform !== 'row') return null;
  return scaledByRowSums(c);
}

/** The spatial lag Wv: for each area, the weighted sum (with row weights, the mean) of its neighbours' values. */
export function spatialLag(w: CsrMatrix, v: Float64Array, out?: Float64Array): Float64Array {
  if (v.length !== w.n) throw new RangeError(`spatialLag: vector of length ${v.length} for ${formatCount(w.n)} areas`);
  return csrMultiply(w, v, out ?? new Float64Array(w.n));
}
