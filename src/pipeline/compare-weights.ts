/**
 * The same question under other neighbour definitions: the weights choice changes answers, so a
 * run can refit the residual tests and the spatial models under each alternative and lay them side
 * by side. The plain regression does not depend on the neighbours and is fitted once.
 */
import type { JoinedAreas } from '../geo/types.js';
import { buildWeights, summarizeWeights, symmetricForm } from '../weights/index.js';
import type { SpatialWeights, WeightsSpec, WeightsSummary, WeightsTransform } from '../weights/types.js';
import { chooseAlgebra } from '../linalg/choose-algebra.js';
import type { StartHelperThread } from '../linalg/sparse/index.js';
import { fitSpatialError, fitSpatialLag, lagImpacts, recommendModel } from '../models/index.js';
import type { Design, Impact, LmTests, MoranTest, OlsFit, Recommendation, SpatialFit } from '../models/types.js';
import { lmTests, moranResidualTest } from '../stats/index.js';
import { InputError } from '../errors.js';
import type { ModelName, WeightsComparison } from './types.js';

/** At most this many alternatives in one run (each is a full set of spatial fits). */
export const MAX_ALTERNATIVES = 6;

/** Two specs name the same neighbours (ignoring how the options were spelt). */
export function sameSpec(a: WeightsSpec, b: WeightsSpec): boolean {
  const norm = (s: WeightsSpec) => {
    if (s.method === 'queen' || s.method === 'rook') {
      return `${s.method}|${s.tolerance ?? 0}|${s.order ?? 1}|${(s.order ?? 1) > 1 && !!s.includeLowerOrders}`;
    }
    if (s.method === 'knn') return `knn|${s.k}`;
    if (s.method === 'band') return `band|${s.distance}`;
    return `idw|${s.power}|${s.cutoff ?? ''}`;
  };
  return norm(a) === norm(b);
}

/**
 * Alternatives a practitioner would try first: for polygons the other contiguity rule and 4 and 6
 * nearest neighbours; for points 4, 6 and 8 nearest neighbours — without the one already used.
 */
export function suggestedAlternatives(main: WeightsSpec | { method: 'edge-list' }, polygons: boolean): WeightsSpec[] {
  const pool: WeightsSpec[] = polygons
    ? [{ method: 'queen' }, { method: 'rook' }, { method: 'knn', k: 4 }, { method: 'knn', k: 6 }]
    : [{ method: 'knn', k: 4 }, { method: 'knn', k: 6 }, { method: 'knn', k: 8 }];
  const kept = main.method === 'edge-list' ? pool : pool.filter((s) => !sameSpec(s, main as WeightsSpec));
  return kept.slice(0, 3);
}

export interface CompareContext {
  joined: JoinedAreas;
  /** one point per area (distance rules, and the orderings of large factorisations) */
  points: { x: Float64Array; y: Float64Array };
  y: Float64Array;
  design: Design;
  ols: OlsFit;
  models: ModelName[];
  transform?: WeightsTransform;
  linkIslands?: boolean;
  seed: number;
  /** simulation draws for the lag model's effects */
  impactDraws: number;
  /** dense or sparse algebra, as for the run's own definition */
  method?: 'auto' | 'dense' | 'sparse';
  helper?: StartHelperThread;
}

/** What the run found under its own definition: the comparison's first row. */
export interface OwnFigures {
  spec: WeightsSpec | { method: 'edge-list'; source: string };
  description: string;
  summary: WeightsSummary;
  moran: MoranTest;
  lm: LmTests;
  recommendation: Recommendation;
  lag?: SpatialFit;
  error?: SpatialFit;
  impacts?: Impact[];
}

/** One row per definition: the run's own first, then each alternative refitted. */
export function compareWeights(own: OwnFigures, alternatives: WeightsSpec[], ctx: CompareContext): WeightsComparison[] {
  const ownLabel = own.spec.method === 'edge-list' ? `neighbour list ${own.spec.source}` : describeSpec(own.spec);
  const rows: WeightsComparison[] = [rowOf(ownLabel, own.description, true, own.summary, own.moran, own.lm, own.recommendation, own.lag, own.error, own.impacts)];
  const { points } = ctx;
  for (const spec of alternatives) {
    let w: SpatialWeights;
    try {
      w = buildWeights(
        { ids: ctx.joined.ids, geometries: ctx.joined.geometries, coordinates: ctx.joined.coordinates, points },
        spec,
        { transform: ctx.transform, linkIslands: ctx.linkIslands },
      );
    } catch (e) {
      // a definition that cannot be built here (a band that links nothing...) is reported, not fatal
      if (e instanceof InputError) { rows.push({ ...emptyRow(describeSpec(spec)), failed: e.message }); continue; }
      throw e;
    }
    const algebra = chooseAlgebra(w, symmetricForm(w), { coordinates: points, method: ctx.method ?? 'auto', seed: ctx.seed, helper: ctx.helper });
    try {
      const moran = moranResidualTest(ctx.ols, ctx.design, algebra);
      const lm = lmTests(ctx.ols, ctx.design, algebra);
      const lag = ctx.models.includes('lag') ? fitSpatialLag(ctx.y, ctx.design, algebra, ctx.ols) : undefined;
      const impacts = lag ? lagImpacts(lag, ctx.design, algebra, { draws: ctx.impactDraws, seed: ctx.seed }).impacts : undefined;
      const error = ctx.models.includes('error') ? fitSpatialError(ctx.y, ctx.design, algebra, ctx.ols) : undefined;
      rows.push(rowOf(describeSpec(spec), w.description, false, summarizeWeights(w), moran, lm, recommendModel(lm), lag, error, impacts));
    } finally {
      algebra.dispose?.();
    }
  }
  return rows;
}

function rowOf(
  label: string, description: string, asRun: boolean, summary: WeightsSummary, moran: MoranTest, lm: LmTests, recommendation: Recommendation,
  lag: SpatialFit | undefined, error: SpatialFit | undefined, impacts: Impact[] | undefined,
): WeightsComparison {
  const model = (f: SpatialFit | undefined) => f && {
    parameter: f.parameter, se: f.parameterSe, p: f.parameterP, logLik: f.logLik, aic: f.aic, converged: f.convergence.converged && !f.convergence.atBound,
  };
  return {
    label, description, asRun,
    links: summary.links, meanNeighbours: summary.meanNeighbours, islands: summary.islands.length, components: summary.components,
    moran: { I: moran.I, z: moran.z, p: moran.p },
    lmP: { error: lm.error.p, lag: lm.lag.p, robustError: lm.robustError.p, robustLag: lm.robustLag.p },
    suggestion: recommendation.choice,
    lag: model(lag), error: model(error),
    ...(impacts ? { impacts: impacts.map((i) => ({ ...i })) } : {}),
  };
}

function emptyRow(label: string): WeightsComparison {
  return {
    label, description: label, asRun: false, links: NaN, meanNeighbours: NaN, islands: NaN, components: NaN,
    moran: { I: NaN, z: NaN, p: NaN }, lmP: { error: NaN, lag: NaN, robustError: NaN, robustLag: NaN },
  };
}

/** A definition in a few words, for the comparison's tables (the built weights describe themselves in full). */
export function describeSpec(s: WeightsSpec): string {
  switch (s.method) {
    case 'queen': case 'rook': return `${s.method} contiguity${(s.order ?? 1) > 1 ? `, order ${s.order}${s.includeLowerOrders ? ' and below' : ''}` : ''}`;
    case 'knn': return `${s.k} nearest neighbours`;
    case 'band': return `all areas within ${s.distance}`;
    case 'idw': return `inverse distance, power ${s.power}${s.cutoff ? `, within ${s.cutoff}` : ''}`;
  }
}
