import { InputError } from '../errors.js';
import { formatCount } from '../core/count.js';
import { PERMUTATION_AREA_LIMIT } from './limits.js';
import type { CsrMatrix } from '../linalg/index.js';
import {
  ebGlobal, ebLocal, ebMoran, moranColumn, neighbourhoodRate, rateFlags, rateFromCounts, RATE_FLAG_RULE, RATE_MULTIPLIERS,
  type RateMultiplier,
} from '../stats/index.js';

/** One rate the user defines: NAME = EVENTS / POPULATION, shown per `per` people. */
export interface RateRecipe {
  name: string;
  events: string;
  population: string;
  per: RateMultiplier;
}

export type RateSmoothing = 'global' | 'local' | 'neighbourhood';

/** A Moran's I with its normal z and p, and the permutation p when permutations were drawn. */
export interface RateMoran { I: number; z: number; p: number; permutationP?: number; permutations: number; seed: number }

export interface RateResult extends RateRecipe {
  flagRule: string;
  smoothing: RateSmoothing;
  /** the overall rate b (in the units of `per`) and the between-area variance a (per person, squared) of the global prior */
  overall: { rate: number; variance: number };
  /** areas whose between-area variance was estimated below zero and set to 0 (global: 0 or all) */
  clippedGlobal: boolean;
  clippedLocal: number;
  /** the rate-adjusted Moran's I (Assunção & Reis 1999) */
  ebMoran: RateMoran;
  /** the plain Moran's I of the raw rate, same weights, permutations and seed, for comparison */
  moranRaw: RateMoran;
  /** the empirical-Bayes standardised rates zᵢ = (rᵢ − b)/√(a + b/nᵢ) that ebMoran tests; local statistics may use them */
  standardised: Float64Array;
  /** why no permutations were drawn, when the run's size left them out by default (above 10,000 areas) */
  permutationNote?: string;
  /** the written workbook leaves the flagged areas' counts and rates blank (privacy); figures here stay whole */
  withholdFlagged: boolean;
  areas: { id: string; events: number; population: number; rate: number; flagged: boolean; ebGlobal: number; ebLocal: number; neighbourhood: number; weightGlobal: number; weightLocal: number }[];
  /** the column the model uses: the chosen smoothed rate, in the units of `per` */
  modelled: Float64Array;
}

/** Reads `NAME=EVENTS/POPULATION`; the multiplier comes from --per. */
export function parseRateRecipe(text: string, per: number = 1000): RateRecipe {
  const m = /^\s*([^=\s][^=]*?)\s*=\s*([^/]+?)\s*\/\s*(.+?)\s*$/.exec(text);
  if (!m) throw new InputError(`--rate ${text}: write NAME=EVENTS/POPULATION, e.g. --rate cases_rate=cases/residents.`);
  if (!RATE_MULTIPLIERS.includes(per as RateMultiplier)) throw new InputError(`--per ${per}: choose 1, 100, 1000 or 100000.`);
  return { name: m[1], events: m[2], population: m[3], per: per as RateMultiplier };
}

/**
 * Builds one rate from its two columns, flags small denominators, computes all three smoothed
 * rates and the rate-adjusted Moran's I under the run's weights; `smoothing` only picks which
 * smoothed rate becomes the modelled column.
 */
export function computeRate(
  recipe: RateRecipe,
  events: ArrayLike<number>,
  population: ArrayLike<number>,
  w: CsrMatrix,
  where: { ids: string[]; rows: number[] },
  opts: { smoothing: RateSmoothing; permutations: number; seed: number; withholdFlagged?: boolean; skippedBySize?: boolean },
): RateResult {
  const counts = rateFromCounts(events, population, { eventsName: recipe.events, populationName: recipe.population, rows: where.rows });
  if (counts.events.every((d) => d === 0)) {
    throw new InputError(`--rate ${recipe.name}: the events column "${recipe.events}" is 0 in every area, so there is no rate to smooth or test.`, { column: recipe.events });
  }
  const flags = rateFlags(counts.events);
  const g = ebGlobal(counts.events, counts.population);
  const l = ebLocal(counts.events, counts.population, w);
  const h = neighbourhoodRate(counts.events, counts.population, w);
  const t = ebMoran(counts.events, counts.population, w, { permutations: opts.permutations, seed: opts.seed });
  const raw = plainMoran(counts.rate, w, opts.permutations, opts.seed);
  const per = recipe.per;
  const chosen = opts.smoothing === 'global' ? g.rate : opts.smoothing === 'local' ? l.rate : h;
  return {
    ...recipe,
    flagRule: RATE_FLAG_RULE,
    smoothing: opts.smoothing,
    overall: { rate: g.b * per, variance: g.a },
    clippedGlobal: g.clipped,
    clippedLocal: l.clipped,
    ebMoran: { I: t.I, z: t.z, p: t.p, permutationP: t.permutationP, permutations: t.permutations, seed: t.seed },
    moranRaw: raw,
    ...(opts.skippedBySize ? { permutationNote: permutationsSkippedNote(where.ids.length) } : {}),
    standardised: t.standardised,
    withholdFlagged: opts.withholdFlagged ?? false,
    areas: where.ids.map((id, i) => ({
      id,
      events: counts.events[i],
      population: counts.population[i],
      rate: counts.rate[i] * per,
      flagged: flags[i],
      ebGlobal: g.rate[i] * per,
      ebLocal: l.rate[i] * per,
      neighbourhood: h[i] * per,
      weightGlobal: g.weight[i],
      weightLocal: l.weight[i],
    })),
    modelled: Float64Array.from(chosen, (x) => x * per),
  };
}

/** Why the rate's Moran's I has no permutation p: the run's size left the permutations out by default. */
export function permutationsSkippedNote(n: number): string {
  return `No permutations were drawn: with ${formatCount(n)} areas (above ${formatCount(PERMUTATION_AREA_LIMIT)}) the permutation tests run only when asked for, ` +
    'and the p-values are the normal approximation under randomisation, which is reliable at this size; ask for a number of permutations to have them.';
}

/** Moran's I of the raw rates; NaN (not a refusal) when every area has the same rate. */
function plainMoran(rate: Float64Array, w: CsrMatrix, permutations: number, seed: number): RateMoran {
  let varies = false;
  for (let i = 1; i < rate.length && !varies; i++) varies = rate[i] !== rate[0];
  if (!varies) return { I: NaN, z: NaN, p: NaN, permutations, seed };
  const m = moranColumn(rate, w, { permutations, seed });
  return { I: m.I, z: m.z, p: m.p, permutationP: m.permutationP, permutations, seed };
}

/** IDs of the areas whose counts and rates the written workbook leaves blank (none unless asked). */
export function withheldIds(r: RateResult): string[] {
  return r.withholdFlagged ? r.areas.filter((a) => a.flagged).map((a) => a.id) : [];
}

/**
 * The JSON `rates` entry of one rate (the shape issue #14 sets out, plus the raw rate's Moran's I and
 * what the workbook withholds). Each test gives `p` from the normal z (two-sided) and `permutationP`
 * (null when no permutations were drawn, with `note` saying why when the run's size left them out).
 */
export function rateToJson(r: RateResult): Record<string, unknown> {
  const num = (x: number) => (Number.isFinite(x) ? x : null);
  const test = (m: RateMoran) => ({
    I: num(m.I), z: num(m.z), p: num(m.p), permutationP: m.permutationP === undefined ? null : num(m.permutationP), permutations: m.permutations, seed: m.seed,
    ...(r.permutationNote ? { note: r.permutationNote } : {}),
  });
  return {
    events: r.events,
    population: r.population,
    per: r.per,
    flagRule: r.flagRule,
    smoothing: r.smoothing,
    ebMoran: test(r.ebMoran),
    areas: r.areas.map((a) => ({ id: a.id, rate: a.rate, flagged: a.flagged, ebGlobal: a.ebGlobal, ebLocal: a.ebLocal, neighbourhood: a.neighbourhood })),
    moranOfRawRate: test(r.moranRaw),
    withholdFlagged: r.withholdFlagged,
    withheldInWorkbook: withheldIds(r),
  };
}

/** What a request carries about rates: the recipes and which smoothed rate is modelled. */
export interface RatesRequest {
  recipes: RateRecipe[];
  smoothing?: RateSmoothing;
  /** leave the flagged areas' counts and rates blank in the written workbook (for privacy) */
  withholdFlagged?: boolean;
}

/** The table columns to read: every rate NAME is replaced by its events and population columns. */
export function columnsWithRates(columns: string[], rates: RatesRequest | undefined): string[] {
  if (!rates || rates.recipes.length === 0) return columns;
  const byName = new Map(rates.recipes.map((r) => [r.name, r]));
  const out: string[] = [];
  for (const c of columns) {
    const r = byName.get(c);
    for (const k of r ? [r.events, r.population] : [c]) if (!out.includes(k)) out.push(k);
  }
  for (const r of rates.recipes) for (const k of [r.events, r.population]) if (!out.includes(k)) out.push(k);
  return out;
}

/** Computes every defined rate under the run's weights and puts the modelled column under its NAME. */
export function addRates(
  rates: RatesRequest,
  values: Map<string, Float64Array>,
  w: CsrMatrix,
  where: { ids: string[]; rows: number[] },
  opts: { permutations: number; seed: number; skippedBySize?: boolean },
): RateResult[] {
  const names = new Set<string>();
  return rates.recipes.map((recipe) => {
    if (names.has(recipe.name)) throw new InputError(`--rate ${recipe.name} is defined twice; give each rate its own name.`);
    names.add(recipe.name);
    const r = computeRate(recipe, values.get(recipe.events)!, values.get(recipe.population)!, w, where, {
      smoothing: rates.smoothing ?? 'global', permutations: opts.permutations, seed: opts.seed, withholdFlagged: rates.withholdFlagged ?? false,
      skippedBySize: opts.skippedBySize ?? false,
    });
    values.set(recipe.name, r.modelled);
    return r;
  });
}

/** The request's rates as the run record keeps them, defaults filled in. */
export function ratesRecord(rates: RatesRequest): Required<RatesRequest> {
  return { recipes: rates.recipes, smoothing: rates.smoothing ?? 'global', withholdFlagged: rates.withholdFlagged ?? false };
}

/** How the local statistics name a rate's empirical-Bayes standardised values: `rate:NAME`. */
export const RATE_LOCAL_PREFIX = 'rate:';

/** The rate NAME in `rate:NAME`, or undefined for any other choice. */
export function localRateName(of: string | undefined): string | undefined {
  return of?.startsWith(RATE_LOCAL_PREFIX) ? of.slice(RATE_LOCAL_PREFIX.length).trim() : undefined;
}

/** Refuses `rate:NAME` for a NAME that no --rate defines, before any work is done. */
export function checkLocalRate(of: string | undefined, rates: RatesRequest | undefined): void {
  const name = localRateName(of);
  if (name === undefined) return;
  const names = rates?.recipes.map((r) => r.name) ?? [];
  if (!names.includes(name)) {
    throw new InputError(names.length
      ? `--local-of ${of}: no rate is called "${name}"; the rates defined are ${names.join(', ')}.`
      : `--local-of ${of}: define the rate first with --rate ${name || 'NAME'}=EVENTS/POPULATION.`);
  }
}

/**
 * The values behind `rate:NAME`: the rate's empirical-Bayes standardised values (Assunção & Reis
 * 1999), which put areas of every size on one scale so that small areas do not dominate the local
 * statistics the way their raw rates would.
 */
export function localRateValues(of: string, rates: readonly RateResult[]): { values: Float64Array; label: string } | undefined {
  const name = localRateName(of);
  if (name === undefined) return undefined;
  const r = rates.find((x) => x.name === name);
  if (!r) throw new InputError(`--local-of ${of}: no rate is called "${name}".`);
  return { values: r.standardised, label: `${name}, standardised by empirical Bayes` };
}
