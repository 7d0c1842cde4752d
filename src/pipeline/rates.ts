import { InputError } from '../errors.js';
import type { CsrMatrix } from '../linalg/index.js';
import {
  ebGlobal, ebLocal, ebMoran, neighbourhoodRate, rateFlags, rateFromCounts, RATE_FLAG_RULE, RATE_MULTIPLIERS,
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

export interface RateResult extends RateRecipe {
  flagRule: string;
  smoothing: RateSmoothing;
  /** areas whose between-area variance was estimated below zero and set to 0 (global: 0 or all) */
  clippedGlobal: boolean;
  clippedLocal: number;
  ebMoran: { I: number; z: number; p: number; permutationP?: number; permutations: number; seed: number };
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
  opts: { smoothing: RateSmoothing; permutations: number; seed: number },
): RateResult {
  const counts = rateFromCounts(events, population, { eventsName: recipe.events, populationName: recipe.population, rows: where.rows });
  const flags = rateFlags(counts.events);
  const g = ebGlobal(counts.events, counts.population);
  const l = ebLocal(counts.events, counts.population, w);
  const h = neighbourhoodRate(counts.events, counts.population, w);
  const t = ebMoran(counts.events, counts.population, w, { permutations: opts.permutations, seed: opts.seed });
  const per = recipe.per;
  const chosen = opts.smoothing === 'global' ? g.rate : opts.smoothing === 'local' ? l.rate : h;
  return {
    ...recipe,
    flagRule: RATE_FLAG_RULE,
    smoothing: opts.smoothing,
    clippedGlobal: g.clipped,
    clippedLocal: l.clipped,
    ebMoran: { I: t.I, z: t.z, p: t.p, permutationP: t.permutationP, permutations: t.permutations, seed: t.seed },
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

/** The JSON `rates` entry of one rate (the shape issue #14 sets out). */
export function rateToJson(r: RateResult): Record<string, unknown> {
  return {
    events: r.events,
    population: r.population,
    per: r.per,
    flagRule: r.flagRule,
    smoothing: r.smoothing,
    ebMoran: { I: r.ebMoran.I, z: r.ebMoran.z, p: r.ebMoran.permutationP ?? r.ebMoran.p, permutations: r.ebMoran.permutations, seed: r.ebMoran.seed },
    areas: r.areas.map((a) => ({ id: a.id, rate: a.rate, flagged: a.flagged, ebGlobal: a.ebGlobal, ebLocal: a.ebLocal, neighbourhood: a.neighbourhood })),
  };
}

/** What a request carries about rates: the recipes and which smoothed rate is modelled. */
export interface RatesRequest {
  recipes: RateRecipe[];
  smoothing?: RateSmoothing;
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
  opts: { permutations: number; seed: number },
): RateResult[] {
  const names = new Set<string>();
  return rates.recipes.map((recipe) => {
    if (names.has(recipe.name)) throw new InputError(`--rate ${recipe.name} is defined twice; give each rate its own name.`);
    names.add(recipe.name);
    const r = computeRate(recipe, values.get(recipe.events)!, values.get(recipe.population)!, w, where, {
      smoothing: rates.smoothing ?? 'global', permutations: opts.permutations, seed: opts.seed,
    });
    values.set(recipe.name, r.modelled);
    return r;
  });
}
