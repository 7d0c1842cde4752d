/**
 * The rate cell functions as pure functions of cell ranges (see logic.ts for the range rules):
 * empirical-Bayes rates from an events range and a population range, spilled per area, and the
 * rate-adjusted Moran's I. The arithmetic is the engine's (src/stats: Marshall 1991; Assunção &
 * Reis 1999), the same the results workbook's "Rates" sheet shows.
 */
import { InputError } from '../../src/errors.js';
import {
  ebGlobal, ebLocal, ebMoran, rateFlags, rateFromCounts, RATE_MULTIPLIERS, type RateMultiplier,
} from '../../src/stats/index.js';
import { readColumns, weightsFromRange, type Grid, type NeighbourOptions } from './logic.js';
import { trimTogether } from './ranges.js';

export interface RateCellOptions {
  /** the multiplier: 1, 100, 1000 (default) or 100000 */
  per?: number;
  /** spill four columns: raw rate, smoothed rate, shrinkage weight, flag */
  detail?: boolean;
}

const FLAG_WORDS = 'few events';

function multiplier(per: number | undefined): RateMultiplier {
  const p = per ?? 1000;
  if (!RATE_MULTIPLIERS.includes(p as RateMultiplier)) throw new InputError(`The rate is shown per 1, 100, 1000 or 100000 people; got ${per}.`);
  return p as RateMultiplier;
}

/** The IDs and the two count columns, read by the same rules as every cell function (a text first row is a header). */
/** The engine's refusal in the words of ranges: its rows are the cells of the ranges, counted from 1. */
function inCells(message: string): string {
  return message
    .replace(/^Row (\d+):/, 'Cell $1 of the ranges:')
    .replace(/^([\d,]+) rows cannot/, '$1 cells of the ranges cannot')
    .replace(/\brow (\d+) \(/g, 'cell $1 (')
    .replace(/ more \(rows /, ' more (cells ');
}

function readCounts(eventsRange: Grid, populationRange: Grid, idsRange: Grid): { ids: string[]; events: Float64Array; population: Float64Array } {
  // blank rows at the end of the three ranges (whole columns) are cut together
  const [events, population, ids] = trimTogether([eventsRange, populationRange, idsRange], ['The events range', 'The population range', 'The ID range']);
  const e = readColumns(events, ids);
  const p = readColumns(population, ids);
  // a header in one range and not in the other leaves them a row apart
  if (e.ids.length !== p.ids.length) throw new InputError('The events and population ranges must cover the same rows, both with a header or both without.');
  const first = rowsBefore(events, e.ids.length);
  try {
    const c = rateFromCounts(e.values, p.values, { eventsName: 'events', populationName: 'population', rows: e.ids.map((_, i) => i + first) });
    return { ids: e.ids, events: c.events, population: c.population };
  } catch (err) {
    if (err instanceof InputError) throw new InputError(inCells(err.message), err.where);
    throw err;
  }
}

/** 1-based position in the range of the first area (2 when the range starts with a header). */
function rowsBefore(range: Grid, areas: number): number {
  const cells = range.length === 1 ? range[0].length : range.length;
  return cells - areas + 1;
}

/** Rows of ID placeholders for the global smoother, which needs no IDs: one per cell of the events range. */
function placeholderIds(events: Grid): Grid {
  const cells = events.length === 1 ? events[0].length : events.length;
  return Array.from({ length: cells }, (_, i) => [`area ${i + 1}`]);
}

function spill(raw: Float64Array, smoothed: Float64Array, weight: Float64Array, events: Float64Array, o: RateCellOptions): (number | string)[][] {
  const per = multiplier(o.per);
  if (!o.detail) return Array.from(smoothed, (x) => [x * per]);
  const flags = rateFlags(events);
  return Array.from(smoothed, (x, i) => [raw[i] * per, x * per, weight[i], flags[i] ? FLAG_WORDS : '']);
}

/**
 * Global empirical-Bayes rates (Marshall 1991): each raw rate pulled towards the overall rate by its
 * own reliability. One value per area (per `per` people), or with detail the raw rate, the smoothed
 * rate, the shrinkage weight and the small-count flag.
 */
export function globalRateRows(events: Grid, population: Grid, o: RateCellOptions = {}): (number | string)[][] {
  multiplier(o.per);
  const [ev, pop] = trimTogether([events, population], ['The events range', 'The population range']);
  const c = readCounts(ev, pop, placeholderIds(ev));
  const g = ebGlobal(c.events, c.population);
  return spill(rawRates(c), g.rate, g.weight, c.events, o);
}

/** Local empirical-Bayes rates: the same with each area and its neighbours (from the neighbour range) as the reference. */
export function localRateRows(events: Grid, population: Grid, ids: Grid, neighbours: Grid, o: RateCellOptions = {}): (number | string)[][] {
  multiplier(o.per);
  const c = readCounts(events, population, ids);
  const w = weightsFromRange(c.ids, neighbours);
  const l = ebLocal(c.events, c.population, w);
  return spill(rawRates(c), l.rate, l.weight, c.events, o);
}

function rawRates(c: { events: Float64Array; population: Float64Array }): Float64Array {
  return c.events.map((d, i) => d / c.population[i]);
}

/**
 * The rate-adjusted Moran's I (Assunção & Reis 1999): Moran's I of the empirical-Bayes standardised
 * rates. [I] or, with detail, [I, z, p (normal), p (permutation; blank with 0 permutations)].
 */
export function rateMoranRow(
  events: Grid, population: Grid, ids: Grid, neighbours: Grid, detail = false, permutations = 999, seed = 1, opts: NeighbourOptions = {},
): (number | string)[][] {
  const count = Math.round(permutations);
  if (!(count >= 0 && count <= 100000)) throw new InputError(`The number of permutations must be between 0 and 100000; got ${permutations}.`);
  const c = readCounts(events, population, ids);
  if (c.events.every((d) => d === 0)) throw new InputError('Every events cell is 0, so there is no rate to test.');
  const w = weightsFromRange(c.ids, neighbours, opts);
  const t = ebMoran(c.events, c.population, w, { permutations: detail ? count : 0, seed: Math.round(seed) });
  return detail ? [[t.I, t.z, t.p, t.permutationP ?? '']] : [[t.I]];
}
