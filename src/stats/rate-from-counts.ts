import { InputError } from '../errors.js';
import { formatCount } from '../core/count.js';

export type RateMultiplier = 1 | 100 | 1000 | 100000;
export const RATE_MULTIPLIERS: readonly RateMultiplier[] = [1, 100, 1000, 100000];

/**
 * Crude rate r_i = d_i / n_i from an events count d_i and a population (exposure) n_i, per one
 * person (multiply by `per` only when showing it). Counts must be whole and non-negative,
 * events may not exceed the population, and the population must be positive; zero events are
 * valid. `rows` gives each value's 1-based row in the user's table so messages can name it.
 */
export function rateFromCounts(
  events: ArrayLike<number | null | undefined>,
  population: ArrayLike<number | null | undefined>,
  opts: { eventsName?: string; populationName?: string; rows?: ArrayLike<number> } = {},
): { events: Float64Array; population: Float64Array; rate: Float64Array } {
  const n = events.length;
  const en = opts.eventsName ?? 'events';
  const pn = opts.populationName ?? 'population';
  if (population.length !== n) throw new InputError(`The events column "${en}" has ${formatCount(n)} values but the population column "${pn}" has ${formatCount(population.length)}.`);
  const d = new Float64Array(n);
  const p = new Float64Array(n);
  const rate = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const row = opts.rows ? opts.rows[i] : i + 2;
    const e = events[i];
    const q = population[i];
    if (e === null || e === undefined || !Number.isFinite(e)) throw new InputError(`Row ${row}: the events count "${en}" is missing; every area needs a count (0 is allowed).`, { row, column: en });
    if (e < 0) throw new InputError(`Row ${row}: the events count "${en}" is negative (${e}); counts cannot be below 0.`, { row, column: en });
    if (!Number.isInteger(e)) throw new InputError(`Row ${row}: the events count "${en}" is ${e}, not a whole number; a rate is built from counts.`, { row, column: en });
    if (q === null || q === undefined || !Number.isFinite(q)) throw new InputError(`Row ${row}: the population "${pn}" is missing.`, { row, column: pn });
    if (q <= 0) throw new InputError(`Row ${row}: the population "${pn}" is ${q}; it must be above 0.`, { row, column: pn });
    if (!Number.isInteger(q)) throw new InputError(`Row ${row}: the population "${pn}" is ${q}, not a whole number.`, { row, column: pn });
    if (e > q) throw new InputError(`Row ${row}: ${e} events in "${en}" exceed the population of ${q} in "${pn}".`, { row, column: en });
    d[i] = e;
    p[i] = q;
    rate[i] = e / q;
  }
  return { events: d, population: p, rate };
}
