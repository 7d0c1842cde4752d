/**
 * The ranges the engine accepts for the run's reproducibility settings. A seed is a 32-bit number
 * (the generator keeps 32 bits of it: larger values would repeat the draws of smaller ones); the
 * number of permutations and simulation draws is capped so that a slip of the keyboard (1e8) is
 * refused at once rather than running for hours: p-values from P permutations resolve to 1/(P + 1),
 * and the simulated standard errors of the impacts settle within a few thousand draws.
 */
import { InputError } from '../errors.js';
import { formatCount } from '../core/count.js';

export const MAX_SEED = 2 ** 32 - 1;
export const MAX_PERMUTATIONS = 99_999;
/** Above this many areas the global permutation tests (Moran's I of the outcome and of each rate) run only when asked for. */
export const PERMUTATION_AREA_LIMIT = 10_000;
export const MIN_IMPACT_DRAWS = 2;
export const MAX_IMPACT_DRAWS = 100_000;

function wholeIn(value: number | undefined, min: number, max: number, what: string): void {
  if (value === undefined) return;
  if (!Number.isInteger(value) || value < min || value > max) {
    throw new InputError(`${what} must be a whole number from ${min} to ${formatCount(max)}; got ${value}.`);
  }
}

export function checkRunSettings(r: { seed?: number; permutations?: number; impactDraws?: number }): void {
  wholeIn(r.seed, 0, MAX_SEED, 'The seed');
  wholeIn(r.permutations, 0, MAX_PERMUTATIONS, 'The number of permutations');
  wholeIn(r.impactDraws, MIN_IMPACT_DRAWS, MAX_IMPACT_DRAWS, 'The number of simulation draws for the impacts');
}
