/**
 * One place decides how the weights algebra is computed: all eigenvalues (dense) for n ≤ 2,000,
 * sparse methods above (sparse Cholesky with a symmetric form; Monte Carlo series without).
 */
import type { CsrMatrix } from './csr.js';
import type { WeightsAlgebra } from './algebra.js';
import { denseAlgebra } from './dense-algebra.js';
import { sparseAlgebra as sparse, type SparseOptions } from './sparse/sparse-algebra.js';

export const DENSE_LIMIT = 2000;

export interface ChooseOptions extends SparseOptions {
  method?: 'auto' | 'dense' | 'sparse';
}

export function chooseAlgebra(w: CsrMatrix, symmetric: CsrMatrix | null, opts: ChooseOptions = {}): WeightsAlgebra {
  const method = opts.method ?? 'auto';
  if (method === 'dense' || (method === 'auto' && w.n <= DENSE_LIMIT)) return denseAlgebra(w, symmetric);
  return sparse(w, symmetric, opts);
}

export function sparseAlgebra(w: CsrMatrix, symmetric: CsrMatrix | null, opts: SparseOptions = {}): WeightsAlgebra {
  return sparse(w, symmetric, opts);
}
