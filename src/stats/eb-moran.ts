import type { CsrMatrix } from '../linalg/index.js';
import { ebMoments } from './eb-moments.js';
import { moranColumn } from './moran-column.js';

/**
 * Rate-adjusted Moran's I (Assunção & Reis 1999, "A new proposal to adjust Moran's I for
 * population density", Statistics in Medicine 18: 2147–2162): each rate is standardised by its
 * empirical-Bayes prior, zᵢ = (rᵢ − b) / √vᵢ with vᵢ = a + b / nᵢ (b, a from Marshall's moments
 * over all areas; vᵢ = b / nᵢ when a is clipped to 0), and Moran's I is taken of the zᵢ,
 * I = (m/S₀) Σ w_ij z̃ᵢ z̃ⱼ / Σ z̃ᵢ² with z̃ the centred zᵢ. Inference by seeded random permutation
 * of the zᵢ (two-sided, as in moran-column.ts); the normal z under randomisation is given too.
 */
export function ebMoran(
  events: ArrayLike<number>,
  population: ArrayLike<number>,
  w: CsrMatrix,
  opts: { permutations?: number; seed?: number } = {},
): { I: number; z: number; p: number; permutationP?: number; permutations: number; seed: number; standardised: Float64Array } {
  const n = events.length;
  const { b, a } = ebMoments(events, population);
  const standardised = new Float64Array(n);
  for (let i = 0; i < n; i++) standardised[i] = (events[i] / population[i] - b) / Math.sqrt(a + b / population[i]);
  const permutations = opts.permutations ?? 999;
  const seed = opts.seed ?? 1;
  const t = moranColumn(standardised, w, { permutations, seed });
  return { I: t.I, z: t.z, p: t.p, permutationP: t.permutationP, permutations, seed, standardised };
}
