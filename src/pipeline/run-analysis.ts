import { representativePoints, areaShapeWarnings } from '../geo/index.js';
import { summarizeWeights } from '../weights/index.js';
import type { SpatialWeights, WeightsSpec } from '../weights/types.js';
import { tieWarning } from '../weights/index.js';
import { compareWeights, sameSpec, suggestedAlternatives, MAX_ALTERNATIVES } from './compare-weights.js';
import { inSentence, baselineModel, entriesOf, fitOls, fittedInOrder, modelByCli, withBaseline, MODELS, DEFAULT_MODEL_KEYS, type FittedModels, type ModelEntry } from '../models/index.js';
import { moranColumn } from '../stats/index.js';
import { InputError } from '../errors.js';
import { ENGINE_VERSION } from '../version.js';
import { localPatterns, normaliseLocalRequest } from './local-patterns.js';
import { addRates, checkLocalRate, localRateName, localRateValues, ratesRecord } from './rates.js';
import { checkRunSettings, PERMUTATION_AREA_LIMIT } from './limits.js';
import { checkSpatialModelSize, checkWeights, isPerfectFit, perfectFitError } from './check-values.js';
import { designOf, neighboursOf, prepareAreas, type PreparedAreas } from './prepare.js';
import { fitUnderWeights, type BaseFit, type UnderWeights } from './fit-under-weights.js';
import type { AnalysisRequest, AnalysisResult, AnalysisRuntime } from './types.js';
import { formatCount } from '../core/count.js';

const DEFAULT_SEED = 20261201;
export { PERMUTATION_AREA_LIMIT };

/**
 * The whole job in one call: read the boundaries and the table, join them by ID, build the
 * neighbours, fit the plain regression and the tests on its residuals, then every asked-for model of
 * the registry (with its spillover effects), the comparison of neighbour definitions and the local
 * statistics when asked. Pure: bytes in, numbers out; the CLI and the add-in share it. `runtime`
 * carries what the platform offers beyond that (a second thread) and never changes a figure beyond
 * rounding.
 */
export async function runAnalysis(request: AnalysisRequest, runtime: AnalysisRuntime = {}): Promise<AnalysisResult> {
  const timings: Record<string, number> = {};
  const clock = () => (globalThis.performance ? performance.now() : Date.now());
  let t = clock();
  const lap = (name: string) => { const now = clock(); timings[name] = (now - t) / 1000; t = now; };
  const progress = request.onProgress ?? (() => {});
  const seed = request.seed ?? DEFAULT_SEED;
  const impactDraws = request.impactDraws ?? 1000;
  validateRequest(request);
  const models = withBaseline(request.models.length ? request.models : DEFAULT_MODEL_KEYS);
  const spatial = entriesOf(models).filter((m) => m.parameters.length > 0);

  progress(0.02, 'Reading the files');
  const local = request.local ? normaliseLocalRequest(request.local) : undefined;
  checkLocalRate(local?.of, request.rates);
  const residualsOf = local ? residualSource(local.of) : undefined;
  if (local && residualsOf && !(models as readonly string[]).includes(residualsOf.key)) {
    throw new InputError(`--local-of ${local.of}: the ${inSentence(residualsOf.label)} was not fitted; add it to the models or choose residuals (of the plain regression).`);
  }
  const localColumn = local && local.of !== 'outcome' && !residualsOf && localRateName(local.of) === undefined && local.of !== request.y && !request.x.includes(local.of) ? [local.of] : [];
  const areas = await prepareAreas(request, localColumn, (stage) => {
    lap(stage);
    if (stage === 'read') progress(0.1, 'Joining the table to the areas');
  });
  const { joined, values, dropped } = areas;
  checkSpatialModelSize(joined.ids.length, request.x.length + 1, spatial);

  progress(0.2, 'Finding neighbours');
  const points = representativePoints(joined.geometries);
  const w = neighboursOf(request, areas, points);
  checkWeights(w, w.description);
  const summary = summarizeWeights(w);
  lap('weights');
  // Above PERMUTATION_AREA_LIMIT areas the randomisation p-value is accurate and 999 shuffles of n
  // values cost more than the whole model fit, so the permutation tests of the global Moran's I (of
  // the outcome and of each rate) run only when asked for.
  const permutations = request.permutations ?? (joined.ids.length <= PERMUTATION_AREA_LIMIT ? 999 : 0);
  const rates = request.rates?.recipes.length
    ? addRates(request.rates, values, w, { ids: joined.ids, rows: joined.rows }, {
      permutations, seed, skippedBySize: request.permutations === undefined && permutations === 0,
    })
    : undefined;

  progress(0.3, 'Fitting the plain regression');
  const base = plainRegression(request, areas);
  const { y } = base;
  const moranY = moranColumn(y, w, { permutations, seed });
  lap('ols');

  const fitOptions = { robust: request.robust, seed, impactDraws, points, method: request.algebra, helper: runtime.helper };
  const own = fitUnderWeights(base, w, models, {
    ...fitOptions,
    onProgress: (f, stage) => progress(0.35 + 0.5 * f, stage),
    onStepDone: lap,
  });

  const comparison = compareDefinitions(request, w, summary, own, { joined, base, models, ...fitOptions }, progress, lap);

  let localResult: AnalysisResult['local'];
  if (local) {
    progress(0.93, 'Looking for where the pattern is');
    const rate = localRateValues(local.of, rates ?? []);
    const [v, label] = local.of === 'outcome' ? [y, request.y]
      : residualsOf ? [(own.fits as Record<string, { residuals: Float64Array }>)[residualsOf.key].residuals, `residuals of the ${inSentence(residualsOf.label)}`]
      : rate ? [rate.values, rate.label]
      : [values.get(local.of)!, local.of];
    localResult = localPatterns(local, v, label, w, seed, { ids: joined.ids, rows: joined.rows }, (f) => progress(0.93 + 0.06 * f, 'Looking for where the pattern is'));
    lap('local');
  }

  progress(1, 'Done');
  return {
    engineVersion: ENGINE_VERSION,
    createdAt: new Date().toISOString(),
    request: {
      id: request.id, ...(areas.boundaryId ? { boundaryId: areas.boundaryId } : {}), idsIgnoreLeadingZeros: request.idsIgnoreLeadingZeros ?? false,
      ...(areas.labelColumn ? { label: areas.labelColumn } : {}), y: request.y, x: [...request.x], sheet: request.sheet,
      weights: request.edgeList ? { method: 'edge-list', source: request.edgeList.name } : request.weights,
      transform: w.transform, models: [...models],
      dropMissing: request.dropMissing ?? false, robust: request.robust ?? false,
      seed, impactDraws, permutations,
      ...(comparison ? { compareWeights: comparison.alternatives } : {}),
      ...(local ? { local } : {}),
      ...(request.rates?.recipes.length ? { rates: ratesRecord(request.rates) } : {}),
    },
    inputs: areas.inputs,
    n: joined.ids.length,
    ids: joined.ids,
    ...(areas.labels ? { labels: areas.labels } : {}),
    rows: joined.rows,
    droppedRows: dropped,
    geometries: joined.geometries,
    coordinates: joined.coordinates,
    coordinateEvidence: joined.coordinateEvidence,
    ...(joined.coordinatesGuessed ? { coordinatesGuessed: true } : {}),
    ...(joined.coordinateUnit ? { coordinateUnit: joined.coordinateUnit } : {}),
    join: joined.report,
    y,
    xNames: [...request.x],
    weights: {
      method: w.spec.method,
      description: w.description,
      transform: w.transform,
      links: w.colIdx.length,
      withoutNeighbours: summary.withoutNeighbours,
      components: summary.components,
      summary,
      edges: edgesOf(w),
    },
    algebra: own.algebra,
    ols: { ...base.ols, moran: own.moran, lm: own.lm, recommendation: own.recommendation },
    fits: own.fits,
    moranY,
    ...(comparison ? { comparison: comparison.rows } : {}),
    ...(localResult ? { local: localResult } : {}),
    ...(rates ? { rates } : {}),
    warnings: runWarnings(request, { joined, shapes: [...areas.rateWarnings, ...areaShapeWarnings(joined, points, areas.boundaryName)], dropped, w, summary, fits: own.fits, permutations, n: y.length, comparison: comparison?.rows }),
    timings,
  };
}

/** The outcome, the design and the plain regression on them, refusing an outcome that cannot be explained. */
function plainRegression(request: AnalysisRequest, areas: PreparedAreas): BaseFit {
  const y = areas.values.get(request.y)!;
  if (y.length > 0 && y.every((v) => v === y[0])) {
    throw new InputError(
      `The outcome column "${request.y}" has the same value (${y[0]}) in every ${areas.joined.rowKind === 'feature' ? 'feature' : 'row'}, so there is nothing to explain; choose an outcome that varies.`,
      { column: request.y },
    );
  }
  const design = designOf(request.x, areas.values, y.length);
  const ols = fitOls(y, design, { robust: request.robust });
  if (isPerfectFit(y, ols.residuals)) throw perfectFitError(request.y, request.x);
  return { y, design, ols };
}

/** The same question under the other neighbour definitions asked for (none: undefined). */
function compareDefinitions(
  request: AnalysisRequest, w: SpatialWeights, summary: ReturnType<typeof summarizeWeights>, own: UnderWeights,
  ctx: Parameters<typeof compareWeights>[2], progress: (f: number, stage: string) => void, lap: (stage: string) => void,
): { alternatives: WeightsSpec[]; rows: NonNullable<AnalysisResult['comparison']> } | undefined {
  const asked = request.compareWeights === 'suggested'
    ? suggestedAlternatives(w.spec, ctx.joined.geometries.some((g) => g.kind === 'polygon'))
    : request.compareWeights ?? [];
  const alternatives = asked.filter((spec) => w.spec.method === 'edge-list' || !sameSpec(spec, w.spec as WeightsSpec));
  if (alternatives.length === 0) return undefined;
  progress(0.9, 'Refitting under the other neighbour definitions');
  const rows = compareWeights({ spec: w.spec, description: w.description, summary, ...own, weights: w }, alternatives, ctx);
  lap('comparison');
  return { alternatives, rows };
}

/** `--local-of residuals` (the plain regression's) or `residuals:MODEL` (a model's, by its command-line spelling); undefined for a column. */
function residualSource(of: string): ModelEntry | undefined {
  if (of === 'residuals') return baselineModel();
  if (!of.startsWith('residuals:')) return undefined;
  const spelling = of.slice('residuals:'.length);
  const entry = modelByCli(spelling);
  if (!entry) throw new InputError(`--local-of ${of}: no model is called "${spelling}"; choose residuals or residuals: followed by one of ${MODELS.filter((m) => !m.baseline).map((m) => m.cli).join(', ')}.`);
  return entry;
}

/** Warnings from every stage of the run, in the order the stages ran. */
function runWarnings(
  request: AnalysisRequest,
  r: {
    joined: { warnings: string[] }; shapes: string[]; dropped: { row: number }[]; w: SpatialWeights;
    summary: ReturnType<typeof summarizeWeights>; fits: FittedModels; permutations: number; n: number;
    comparison?: NonNullable<AnalysisResult['comparison']>;
  },
): string[] {
  const { summary, w, dropped } = r;
  // each model's warnings, then those of its spillover effects (e.g. no standard errors when the
  // covariance of (β, ρ) is not positive definite)
  const warnings = [...r.joined.warnings, ...r.shapes, ...fittedInOrder(r.fits).flatMap(({ fit }) => [...fit.warnings, ...(fit.impacts?.warnings ?? [])])];
  if (summary.withoutNeighbours.length > 0) {
    warnings.push(`${formatCount(summary.withoutNeighbours.length)} area(s) have no neighbours (${summary.withoutNeighbours.slice(0, 10).join(', ')}${summary.withoutNeighbours.length > 10 ? ', …' : ''}); their spatial lag is 0.`);
  }
  if (w.tiesDecided) warnings.push(tieWarning(w.tiesDecided, w.spec));
  // the compared definitions' ties too: their figures stand beside the run's (#18 §2)
  for (const c of r.comparison ?? []) if (!c.asRun && c.tiesWarning) warnings.push(`Under the compared definition "${c.label}": ${c.tiesWarning}`);
  if (w.notes) warnings.push(...w.notes);
  if (request.permutations === undefined && r.permutations === 0) {
    warnings.push(`With ${formatCount(r.n)} areas the permutation test of Moran's I${request.rates?.recipes.length ? " (and of each rate's Moran's I)" : ''} was not run by default (the randomisation p-value is reliable at this size); ask for it with a number of permutations.`);
  }
  if (summary.components > 1) warnings.push(`The neighbour graph falls into ${summary.components} separate groups of areas.`);
  if (dropped.length > 0) warnings.push(`${formatCount(dropped.length)} row(s) with missing values were left out (rows ${dropped.slice(0, 10).map((d) => d.row).join(', ')}${dropped.length > 10 ? ', …' : ''}); the neighbours were built on the remaining areas.`);
  return warnings;
}

function edgesOf(w: SpatialWeights) {
  const m = w.colIdx.length;
  const from = new Int32Array(m);
  for (let i = 0; i < w.n; i++) from.fill(i, w.rowPtr[i], w.rowPtr[i + 1]);
  return { from, to: Int32Array.from(w.colIdx), weight: Float64Array.from(w.values) };
}

function validateRequest(r: AnalysisRequest): void {
  if (!r.boundary || r.boundary.length === 0) throw new InputError('No boundary file was given: name a GeoJSON, TopoJSON or shapefile.');
  if (!r.id?.trim()) throw new InputError('No ID column was given: name the column that identifies each area.');
  if (!r.y?.trim()) throw new InputError('No outcome column was given: name the column to explain.');
  if (!r.x || r.x.length === 0) throw new InputError('No explanatory columns were given: name at least one.');
  const seen = new Set<string>();
  for (const c of [r.y, ...r.x]) {
    if (seen.has(c)) throw new InputError(`Column "${c}" is named twice among the outcome and explanatory columns.`, { column: c });
    seen.add(c);
  }
  checkRunSettings(r);
  if (Array.isArray(r.compareWeights) && r.compareWeights.length > MAX_ALTERNATIVES) {
    throw new InputError(`${r.compareWeights.length} neighbour definitions were asked for the comparison; at most ${MAX_ALTERNATIVES} fit in one run.`);
  }
  entriesOf(r.models);
}
