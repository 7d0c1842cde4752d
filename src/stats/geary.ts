import type { CsrMatrix } from '../linalg/index.js';
import { InputError } from '../errors.js';
import { normalTwoSided } from './distributions.js';
import { centred, weightsSums } from './weights-sums.js';
import { formatCount } from '../core/count.js';

/**
 * Geary's C (Geary 1954) with moments under randomisation (Cliff & Ord 1981, eq. 1.39):
 * C = (n − 1) Σᵢⱼ w_ij (x_i − x_j)² / (2 S₀ Σ z_i²), E[C] = 1,
 *   Var[C] = [(n − 1)S₁(n² − 3n + 3 − (n − 1)b₂) − ¼(n − 1)S₂(n² + 3n − 6 − (n² − n + 2)b₂)
 *            + S₀²(n² − 3 − (n − 1)²b₂)] / (n(n − 2)(n − 3)S₀²),
 * b₂ = n Σz⁴/(Σz²)². z = (C − 1)/√Var, two-sided normal p.
 */
export function gearyC(v: Float64Array, w: CsrMatrix): { C: number; expected: number; variance: number; z: number; p: number } {
  const n = v.length;
  if (n !== w.n) throw new InputError(`The variable has ${formatCount(n)} values but the weights cover ${formatCount(w.n)} areas; use one value per area.`);
  if (n < 4) throw new InputError(`Geary's C needs at least 4 areas; there are ${n}.`);
  const { m2, m4 } = centred(v);
  if (!(m2 > 0)) throw new InputError('The variable has the same value in every area, so Geary\'s C is undefined; choose a variable that varies.');
  const { s0, s1, s2 } = weightsSums(w);
  let sum = 0;
  for (let i = 0; i < n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      const d = v[i] - v[w.colIdx[p]];
      sum += w.values[p] * d * d;
    }
  }
  const C = ((n - 1) * sum) / (2 * s0 * m2);
  const b2 = (n * m4) / (m2 * m2);
  const variance =
    ((n - 1) * s1 * (n * n - 3 * n + 3 - (n - 1) * b2) -
      0.25 * (n - 1) * s2 * (n * n + 3 * n - 6 - (n * n - n + 2) * b2) +
      s0 * s0 * (n * n - 3 - (n - 1) * (n - 1) * b2)) /
    (n * (n - 2) * (n - 3) * s0 * s0);
  const z = (C - 1) / Math.sqrt(variance);
  return { C, expected: 1, variance, z, p: normalTwoSided(z) };
}
