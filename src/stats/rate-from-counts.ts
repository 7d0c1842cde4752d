import { formatCount } from '../core/count.js';
import { InputError, listSome } from '../errors.js';

/** How many bad rows a refusal spells out before it only lists the rest by number. */
const MAX_LISTED = 10;

export type RateMultiplier = 1 | 100 | 1000 | 100000;
export const RATE_MULTIPLIERS: readonly RateMultiplier[] = [1, 100, 1000, 100000];

/**
 * Crude rate r_i = d_i / n_i from an events count d_i and a population (exposure) n_i, per one
 * person (multiply by `per` only when showing it). Counts must be whole and non-negative,
 * events may not exceed the population, and the population must be positive; zero events are
 * valid. `rows` gives each value's 1-based row in the user's table so messages can name it; a
 * refusal names every bad row (the first ten with what is wrong, the rest by number), not only the first.
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
  const bad: { row: number; column: string; text: string; short: string }[] = [];
  for (let i = 0; i < n; i++) {
    const row = opts.rows ? opts.rows[i] : i + 2;
    const problem = countProblem(events[i], population[i], en, pn);
    if (problem) { bad.push({ row, ...problem }); continue; }
    d[i] = events[i] as number;
    p[i] = population[i] as number;
    rate[i] = d[i] / p[i];
  }
  if (bad.length === 1) throw new InputError(`Row ${bad[0].row}: ${bad[0].text}`, { row: bad[0].row, column: bad[0].column });
  if (bad.length > 1) {
    const shown = bad.slice(0, MAX_LISTED).map((b) => `row ${b.row} (${b.short})`).join(', ');
    const rest = bad.slice(MAX_LISTED).map((b) => b.row);
    throw new InputError(
      `${formatCount(bad.length)} rows cannot give a rate from "${en}" and "${pn}": ${shown}` +
      (rest.length ? `, and ${formatCount(rest.length)} more (rows ${listSome(rest, 20)})` : '') +
      '. Counts must be whole numbers of 0 or more (0 events is allowed), events may not exceed the population, and the population must be above 0.',
      { row: bad[0].row, column: bad[0].column },
    );
  }
  return { events: d, population: p, rate };
}

/** What is wrong with one area's counts (in a sentence, and in a few words for a list), or undefined when they make a rate. */
function countProblem(e: number | null | undefined, q: number | null | undefined, en: string, pn: string): { column: string; text: string; short: string } | undefined {
  if (e === null || e === undefined || !Number.isFinite(e)) return { column: en, text: `the events count "${en}" is missing; every area needs a count (0 is allowed).`, short: 'events missing' };
  if (e < 0) return { column: en, text: `the events count "${en}" is negative (${e}); counts cannot be below 0.`, short: `events ${e}, below 0` };
  if (!Number.isInteger(e)) return { column: en, text: `the events count "${en}" is ${e}, not a whole number; a rate is built from counts.`, short: `events ${e}, not whole` };
  if (q === null || q === undefined || !Number.isFinite(q)) return { column: pn, text: `the population "${pn}" is missing.`, short: 'population missing' };
  if (q <= 0) return { column: pn, text: `the population "${pn}" is ${q}; it must be above 0.`, short: `population ${q}` };
  if (!Number.isInteger(q)) return { column: pn, text: `the population "${pn}" is ${q}, not a whole number.`, short: `population ${q}, not whole` };
  if (e > q) return { column: en, text: `${e} events in "${en}" exceed the population of ${q} in "${pn}".`, short: `${e} events above a population of ${q}` };
  return undefined;
}
