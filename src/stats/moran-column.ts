import { csrMultiply, type CsrMatrix } from '../linalg/index.js';
import { InputError } from '../errors.js';
import type { MoranTest } from '../core/types.js';
import { normalTwoSided } from './distributions.js';
import { seededRandom } from './random.js';
import { centred, weightsSums } from './weights-sums.js';
import { formatCount } from '../core/count.js';

/**
 * Moran's I of one variable (Moran 1950) with moments under randomisation (Cliff & Ord 1981,
 * eq. 1.38): I = (n/S₀) Σᵢⱼ w_ij z_i z_j / Σ z_i², E[I] = −1/(n − 1),
 *   E[I²] = [n((n² − 3n + 3)S₁ − nS₂ + 3S₀²) − b₂((n² − n)S₁ − 2nS₂ + 6S₀²)] / ((n − 1)(n − 2)(n − 3)S₀²),
 * b₂ = n Σz⁴/(Σz²)², Var[I] = E[I²] − E[I]². z two-sided normal.
 *
 * With `permutations`, a seeded random-permutation test: p = (1 + #{|I_π − E| ≥ |I − E|}) / (1 + R),
 * two-sided, so it lies in (0, 1].
 */
export function moranColumn(
  v: Float64Array,
  w: CsrMatrix,
  opts: { permutations?: number; seed?: number } = {},
): MoranTest & { permutationP?: number; permutations?: number } {
  const n = v.length;
  if (n !== w.n) throw new InputError(`The variable has ${formatCount(n)} values but the weights cover ${formatCount(w.n)} areas; use one value per area.`);
  if (n < 4) throw new InputError(`Moran's I needs at least 4 areas; there are ${n}.`);
  const { z, m2, m4 } = centred(v);
  if (!(m2 > 0)) throw new InputError('The variable has the same value in every area, so its spatial autocorrelation is undefined; choose a variable that varies.');
  const { s0, s1, s2 } = weightsSums(w);
  const wz = new Float64Array(n);
  const statistic = (values: Float64Array): number => {
    csrMultiply(w, values, wz);
    let s = 0;
    for (let i = 0; i < n; i++) s += values[i] * wz[i];
    return ((n / s0) * s) / m2;
  };
  const I = statistic(z);
  const expected = -1 / (n - 1);
  const b2 = (n * m4) / (m2 * m2);
  const eI2 =
    (n * ((n * n - 3 * n + 3) * s1 - n * s2 + 3 * s0 * s0) - b2 * ((n * n - n) * s1 - 2 * n * s2 + 6 * s0 * s0)) /
    ((n - 1) * (n - 2) * (n - 3) * s0 * s0);
  const variance = eI2 - expected * expected;
  const zScore = (I - expected) / Math.sqrt(variance);
  const result: MoranTest & { permutationP?: number; permutations?: number } = {
    I,
    expected,
    variance,
    z: zScore,
    p: normalTwoSided(zScore),
  };
  const count = opts.permutations ?? 0;
  if (count > 0) {
    const random = seededRandom(opts.seed ?? 1);
    const shuffled = Float64Array.from(z);
    const observed = Math.abs(I - expected);
    let extreme = 0;
    for (let r = 0; r < count; r++) {
      for (let i = n - 1; i > 0; i--) {
        const j = Math.floor(random() * (i + 1));
        const t = shuffled[i];
        shuffled[i] = shuffled[j];
        shuffled[j] = t;
      }
      // tolerance so that ties with the observed value count as at least as extreme
      if (Math.abs(statistic(shuffled) - expected) >= observed - 1e-12 * Math.abs(observed)) extreme++;
    }
    result.permutationP = (1 + extreme) / (1 + count);
    result.permutations = count;
  }
  return result;
}
