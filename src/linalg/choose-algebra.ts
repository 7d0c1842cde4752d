/**
 * One place decides how the weights algebra is computed, by size and by whether W has a symmetric
 * form S (W = T S T⁻¹, T diagonal — contiguity and other symmetric links, row-standardised or not):
 *  - with S: all eigenvalues (dense) up to 500 areas; above, the exact sparse Cholesky of I − ρS
 *    (dense work grows as n³; bench/README.md has the crossover measured);
 *  - without S (e.g. k-nearest neighbours): all complex eigenvalues (dense, ml-matrix) up to 150
 *    areas; above, the exact sparse LU (sparse/sparse-algebra.ts).
 * Whichever serves, the admissible range follows the one rule of range.ts, so it does not move
 * where the method changes.
 */
import type { CsrMatrix } from './csr.js';
import type { WeightsAlgebra } from './algebra.js';
import { denseAlgebra } from './dense-algebra.js';
import { sparseAlgebra as sparse, type SparseOptions } from './sparse/sparse-algebra.js';
import { symmetricForm } from './symmetric-form.js';

/** Largest n served by dense eigenvalues when W has a symmetric form. */
export const DENSE_LIMIT = 500;
/** Largest n served by dense eigenvalues when W has none. */
export const DENSE_LIMIT_NONSYMMETRIC = 150;

export interface ChooseOptions extends SparseOptions {
  method?: 'auto' | 'dense' | 'sparse';
}

export function chooseAlgebra(w: CsrMatrix, symmetric: CsrMatrix | null, opts: ChooseOptions = {}): WeightsAlgebra {
  const method = opts.method ?? 'auto';
  if (method === 'dense') return denseAlgebra(w, symmetric);
  if (method === 'sparse') return sparse(w, symmetric, opts);
  const limit = w.n <= DENSE_LIMIT_NONSYMMETRIC ? Infinity : symmetricForm(w, symmetric) ? DENSE_LIMIT : DENSE_LIMIT_NONSYMMETRIC;
  return w.n <= limit ? denseAlgebra(w, symmetric) : sparse(w, symmetric, opts);
}

export function sparseAlgebra(w: CsrMatrix, symmetric: CsrMatrix | null, opts: SparseOptions = {}): WeightsAlgebra {
  return sparse(w, symmetric, opts);
}
