import { ebMoments } from './eb-moments.js';

/**
 * Global empirical Bayes rate (Marshall 1991): θᵢ = b + Cᵢ (rᵢ − b) with shrinkage weight
 * Cᵢ = a / (a + b / nᵢ), b and a the method-of-moments prior over all areas (see eb-moments.ts).
 * When a is clipped to 0 every rate is shrunk fully to b; `clipped` reports it.
 */
export function ebGlobal(events: ArrayLike<number>, population: ArrayLike<number>): {
  rate: Float64Array; weight: Float64Array; b: number; a: number; clipped: boolean;
} {
  const n = events.length;
  const { b, a, clipped } = ebMoments(events, population);
  const rate = new Float64Array(n);
  const weight = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const c = a > 0 ? a / (a + b / population[i]) : 0;
    weight[i] = c;
    rate[i] = b + c * (events[i] / population[i] - b);
  }
  return { rate, weight, b, a, clipped };
}
