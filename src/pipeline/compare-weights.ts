/**
 * The same question under other neighbour definitions: the weights choice changes answers, so a
 * run can refit the residual tests and the spatial models under each alternative and lay them side
 * by side. The plain regression does not depend on the neighbours and is fitted once.
 */
import type { JoinedAreas } from '../geo/types.js';
import { buildWeights, describeRule, summarizeWeights, tieWarning } from '../weights/index.js';
import type { SpatialWeights, WeightsSpec, WeightsSummary, WeightsTransform } from '../weights/types.js';
import type { StartHelperThread } from '../linalg/index.js';
import { fittedInOrder, type FittedModels, type ModelKey } from '../models/index.js';
import type { LmTests, MoranTest, Recommendation } from '../models/types.js';
import { InputError } from '../errors.js';
import { fitUnderWeights, type BaseFit } from './fit-under-weights.js';
import type { ComparedFit, WeightsComparison } from './types.js';

/** At most this many alternatives in one run (each is a full set of spatial fits). */
export const MAX_ALTERNATIVES = 6;

/** Two specs name the same neighbours (ignoring how the options were spelt). */
export function sameSpec(a: WeightsSpec, b: WeightsSpec): boolean {
  const norm = (s: WeightsSpec) => {
    if (s.method === 'queen' || s.method === 'rook') {
      return `${s.method}|${s.tolerance ?? 0}|${s.order ?? 1}|${(s.order ?? 1) > 1 && !!s.cumulative}`;
    }
    if (s.method === 'knn') return `knn|${s.k}|${s.ties ?? 'lower-row'}`;
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
  /** the outcome, the design and the plain regression, fitted once */
  base: BaseFit;
  models: readonly ModelKey[];
  robust?: boolean;
  transform?: WeightsTransform;
  linkUnneighboured?: boolean;
  seed: number;
  /** simulation draws for the spillover effects */
  impactDraws: number;
  /** dense or sparse algebra, as for the run's own definition */
  method?: 'auto' | 'dense' | 'sparse';
  helper?: StartHelperThread;
}

/** What a run found under one definition (its own: the comparison's first row). */
export interface OwnFigures {
  spec: WeightsSpec | { method: 'edge-list'; source: string };
  description: string;
  summary: WeightsSummary;
  moran: MoranTest;
  lm: LmTests;
  recommendation: Recommendation;
  fits: FittedModels;
  /** the run's weights, so that an alternative linking the same neighbours is recognised (and ties among nearest neighbours reported) */
  weights?: Pick<SpatialWeights, 'rowPtr' | 'colIdx' | 'values' | 'tiesDecided'>;
}

/** The row's note when the tie rule decided some areas' nearest neighbours (the run warns of its own the same way). */
function ties(w: Pick<SpatialWeights, 'tiesDecided'> | undefined, spec: OwnFigures['spec']): Pick<WeightsComparison, 'tiesDecided' | 'tiesWarning'> {
  return w?.tiesDecided ? { tiesDecided: w.tiesDecided, tiesWarning: tieWarning(w.tiesDecided, spec) } : {};
}

type Links = Pick<SpatialWeights, 'rowPtr' | 'colIdx' | 'values'>;

/** The same links with the same weights (the same areas in the same order are assumed). */
function sameLinks(a: Links, b: Links): boolean {
  const eq = (x: ArrayLike<number>, y: ArrayLike<number>) => {
    if (x.length !== y.length) return false;
    for (let i = 0; i < x.length; i++) if (x[i] !== y[i]) return false;
    return true;
  };
  return eq(a.rowPtr, b.rowPtr) && eq(a.colIdx, b.colIdx) && eq(a.values, b.values);
}

/** One row per definition: the run's own first, then each alternative refitted. */
export function compareWeights(own: OwnFigures, alternatives: WeightsSpec[], ctx: CompareContext): WeightsComparison[] {
  const rows: WeightsComparison[] = [{ ...rowOf(describeRule(own.spec), true, own), ...ties(own.weights, own.spec) }];
  const built: { links: Links; row: number }[] = own.weights ? [{ links: own.weights, row: 0 }] : [];
  const { points } = ctx;
  for (const spec of alternatives) {
    let w: SpatialWeights;
    try {
      w = buildWeights(
        { ids: ctx.joined.ids, geometries: ctx.joined.geometries, coordinates: ctx.joined.coordinates, points },
        spec,
        { transform: ctx.transform, linkUnneighboured: ctx.linkUnneighboured },
      );
    } catch (e) {
      // a definition that cannot be built here (a band that links nothing...) is reported, not fatal
      if (e instanceof InputError) { rows.push({ ...emptyRow(describeRule(spec)), failed: e.message }); continue; }
      throw e;
    }
    // a rule that links exactly the same neighbours (queen and rook on a grid of irregular areas often do) gives the same figures
    const twin = built.find((b) => sameLinks(b.links, w));
    if (twin) {
      const { tiesDecided: _d, tiesWarning: _t, ...first } = rows[twin.row];
      rows.push({ ...first, label: describeRule(spec), description: w.description, asRun: false, sameAs: first.label, ...ties(w, spec) });
      continue;
    }
    built.push({ links: w, row: rows.length });
    let found;
    try {
      found = fitUnderWeights(ctx.base, w, ctx.models, { points, method: ctx.method, helper: ctx.helper, robust: ctx.robust, seed: ctx.seed, impactDraws: ctx.impactDraws });
    } catch (e) {
      // so is one under which a model cannot be estimated (no bounded range, no finite likelihood)
      if (e instanceof InputError) { rows.push({ ...emptyRow(describeRule(spec)), description: w.description, failed: e.message, ...ties(w, spec) }); continue; }
      throw e;
    }
    rows.push({ ...rowOf(describeRule(spec), false, { spec, description: w.description, summary: summarizeWeights(w), ...found }), ...ties(w, spec) });
  }
  return rows;
}

function rowOf(label: string, asRun: boolean, f: OwnFigures): WeightsComparison {
  const fits: WeightsComparison['fits'] = {};
  for (const { entry, fit } of fittedInOrder(f.fits)) {
    if (entry.baseline) continue;
    const h = entry.headline(fit);
    const compared: ComparedFit = {
      parameters: h.parameters.map((q) => ({ ...q })), logLik: h.logLik, aic: h.aic,
      converged: h.convergence ? h.convergence.converged && !h.convergence.atBound : true,
      ...(fit.impacts ? { impacts: fit.impacts.impacts.map((i) => ({ ...i })) } : {}),
    };
    fits[entry.key as ModelKey] = compared;
  }
  const { summary, moran, lm } = f;
  return {
    label, description: f.description, asRun,
    links: summary.links, meanNeighbours: summary.meanNeighbours, withoutNeighbours: summary.withoutNeighbours.length, components: summary.components,
    moran: { I: moran.I, z: moran.z, p: moran.p },
    lmP: { error: lm.error.p, lag: lm.lag.p, robustError: lm.robustError.p, robustLag: lm.robustLag.p },
    suggestion: f.recommendation.choice,
    ...(f.recommendation.borderline ? { borderline: true } : {}),
    fits,
  };
}

function emptyRow(label: string): WeightsComparison {
  return {
    label, description: label, asRun: false, links: NaN, meanNeighbours: NaN, withoutNeighbours: NaN, components: NaN,
    moran: { I: NaN, z: NaN, p: NaN }, lmP: { error: NaN, lag: NaN, robustError: NaN, robustLag: NaN }, fits: {},
  };
}
