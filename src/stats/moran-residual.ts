import { csrMultiply } from '../linalg/index.js';
import type { WeightsAlgebra } from '../linalg/index.js';
import type { Design, MoranTest, RegressionResiduals } from '../core/types.js';
import { normalTwoSided } from './distributions.js';
import { dot, residualMakerTraces, weightsTotal } from './residual-maker.js';

/**
 * Moran's I of regression residuals with its exact moments under normal errors (Cliff & Ord 1981,
 * §8.3; Anselin 1988, ch. 8): I = (n/S₀) e'We / e'e,
 *   E[I]   = (n/S₀) tr(MW) / (n − k),
 *   Var[I] = (n/S₀)² [tr(MWMWᵀ) + tr((MW)²) + (tr MW)²] / ((n − k)(n − k + 2)) − E[I]²,
 * M = I − X(X'X)⁻¹X'. z = (I − E[I]) / √Var[I], two-sided normal p.
 */
export function moranResidualTest(ols: RegressionResiduals, x: Design, algebra: WeightsAlgebra): MoranTest {
  const { n, k, residuals: e } = ols;
  const w = algebra.w;
  const scale = n / weightsTotal(w);
  const I = (scale * dot(e, csrMultiply(w, e))) / dot(e, e);
  const t = residualMakerTraces(x, w);
  const expected = (scale * t.trMW) / (n - k);
  const variance = (scale * scale * (t.trMWMWt + t.trMWMW + t.trMW * t.trMW)) / ((n - k) * (n - k + 2)) - expected * expected;
  const z = (I - expected) / Math.sqrt(variance);
  return { I, expected, variance, z, p: normalTwoSided(z) };
}
