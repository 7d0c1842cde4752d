import type { CsrMatrix } from '../linalg/index.js';
import { ebMoments } from './eb-moments.js';

/** The area and its neighbours (every column with a non-zero weight in its row). */
export function neighbourhoodOf(w: CsrMatrix, i: number): number[] {
  const members = [i];
  for (let k = w.rowPtr[i]; k < w.rowPtr[i + 1]; k++) if (w.values[k] !== 0 && w.colIdx[k] !== i) members.push(w.colIdx[k]);
  return members;
}

/**
 * Local (spatial) empirical Bayes rate (Marshall 1991, local version): for each area i the
 * method-of-moments prior bᵢ, aᵢ is taken over its neighbourhood (the area and its neighbours
 * under the run's weights, unweighted), then θᵢ = bᵢ + Cᵢ (rᵢ − bᵢ), Cᵢ = aᵢ / (aᵢ + bᵢ / nᵢ).
 * `clipped` counts the areas whose local aᵢ was negative and set to 0.
 */
export function ebLocal(events: ArrayLike<number>, population: ArrayLike<number>, w: CsrMatrix): {
  rate: Float64Array; weight: Float64Array; clipped: number;
} {
  const n = events.length;
  const rate = new Float64Array(n);
  const weight = new Float64Array(n);
  let clipped = 0;
  for (let i = 0; i < n; i++) {
    const m = ebMoments(events, population, neighbourhoodOf(w, i));
    if (m.clipped) clipped++;
    const c = m.a > 0 ? m.a / (m.a + m.b / population[i]) : 0;
    weight[i] = c;
    rate[i] = m.b + c * (events[i] / population[i] - m.b);
  }
  return { rate, weight, clipped };
}
