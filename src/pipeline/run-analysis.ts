import { readBoundary, readTable, tableFromLayer, joinAreas, representativePoints, decodeText, areaShapeWarnings } from '../geo/index.js';
import {
  buildWeights, readEdgeList, subsetWeights, summarizeWeights, symmetricForm, spatialLag,
} from '../weights/index.js';
import type { SpatialWeights, WeightsSpec } from '../weights/types.js';
import { tieWarning } from '../weights/index.js';
import { compareWeights, sameSpec, suggestedAlternatives, MAX_ALTERNATIVES } from './compare-weights.js';
import { chooseAlgebra } from '../linalg/index.js';
import {
  fitOls, fitSpatialLag, fitSpatialError, lagImpacts, recommendModel,
} from '../models/index.js';
import { moranResidualTest, lmTests, moranColumn } from '../stats/index.js';
import type { Design } from '../models/types.js';
import { InputError } from '../errors.js';
import { ENGINE_VERSION } from '../version.js';
import { sha256Hex } from './hash.js';
import { localPatterns, normaliseLocalRequest } from './local-patterns.js';
import { addRates, checkLocalRate, columnsWithRates, localRateName, localRateValues, ratesRecord } from './rates.js';
import { readModelColumns } from './missing.js';
import { checkRunSettings } from './limits.js';
import { withReadNotes } from './read-notes.js';
import { checkFittedLikelihood, checkModelColumns, checkSpatialModelSize, checkSpatialRange, checkWeights, isPerfectFit, perfectFitError } from './check-values.js';
import type { AnalysisRequest, AnalysisResult, AnalysisRuntime, InputRecord, ModelName } from './types.js';

const DEFAULT_SEED = 20261201;
export const PERMUTATION_AREA_LIMIT = 10_000;

/**
 * The whole job in one call: read the boundaries and the table, join them by ID, build the
 * neighbours, fit the plain regression and its spatial diagnostics, then the spatial lag and error
 * models and the lag model's impacts. Pure: bytes in, numbers out; the CLI and the add-in share it.
 * `runtime` carries what the platform offers beyond that (a second thread) and never changes a figure
 * beyond rounding.
 */
export async function runAnalysis(request: AnalysisRequest, runtime: AnalysisRuntime = {}): Promise<AnalysisResult> {
  const timings: Record<string, number> = {};
  const clock = () => (globalThis.performance ? performance.now() : Date.now());
  let t = clock();
  const lap = (name: string) => { const now = clock(); timings[name] = (now - t) / 1000; t = now; };
  const progress = request.onProgress ?? (() => {});
  const seed = request.seed ?? DEFAULT_SEED;
  const impactDraws = request.impactDraws ?? 1000;
  const models = request.models.length ? request.models : ['ols', 'lag', 'error'];
  validateRequest(request);

  progress(0.02, 'Reading the files');
  const inputs: InputRecord[] = [];
  for (const f of request.boundary) inputs.push(await record('boundary', f));
  if (request.data) inputs.push(await record('data', request.data));
  if (request.edgeList) inputs.push(await record('edge list', request.edgeList));

  const maxBytes = request.maxBytes;
  const layer = await readBoundary(request.boundary, { layer: request.layer, coordinates: request.coordinates, maxBytes });
  const table = request.data ? await readTable(request.data, { sheet: request.sheet, maxBytes }) : tableFromLayer(layer);
  if (request.edgeList && maxBytes !== undefined && request.edgeList.bytes.length > maxBytes) {
    throw new InputError(`${request.edgeList.name} is ${request.edgeList.bytes.length} bytes, over the ${maxBytes}-byte limit for neighbour lists.`, { file: request.edgeList.name });
  }
  lap('read');
  progress(0.1, 'Joining the table to the areas');
  const boundaryId = request.boundaryId?.trim() || undefined;
  const readNotes = [...(layer.readNotes ?? []), ...(request.data ? table.warnings ?? [] : [])];
  const joinedAll = withReadNotes(readNotes, () => joinAreas(layer, table, request.id, { featureIdProperty: boundaryId }));
  const local = request.local ? normaliseLocalRequest(request.local) : undefined;
  checkLocalRate(local?.of, request.rates);
  const localColumn = local && local.of !== 'outcome' && localRateName(local.of) === undefined && !['residuals', 'residuals:lag', 'residuals:error'].includes(local.of) && local.of !== request.y && !request.x.includes(local.of) ? [local.of] : [];
  const { joined, values, dropped } = withReadNotes(readNotes, () => readModelColumns(joinedAll, columnsWithRates([request.y, ...request.x, ...localColumn], request.rates), request.dropMissing ?? false));
  checkModelColumns(values, joined);
  checkSpatialModelSize(joined.ids.length, request.x.length + 1, models);
  lap('join');

  progress(0.2, 'Finding neighbours');
  const needsPoints = request.weights.method === 'knn' || request.weights.method === 'band' || request.weights.method === 'idw';
  const points = representativePoints(joined.geometries);
  let w: SpatialWeights;
  if (request.edgeList) {
    const text = decodeText(request.edgeList.bytes, request.edgeList.name, { kind: 'a neighbour list (CSV)', latinFallback: true }).text;
    const listOpts = { transform: request.transform, source: request.edgeList.name };
    if (dropped.length > 0) {
      // The list names the areas of the whole table: read it on all of them, then leave out the dropped rows.
      const position = new Map(joinedAll.ids.map((id, i) => [id, i]));
      w = subsetWeights(readEdgeList(text, joinedAll.ids, listOpts), joined.ids.map((id) => position.get(id)!));
    } else {
      w = readEdgeList(text, joined.ids, listOpts);
    }
  } else {
    w = buildWeights(
      { ids: joined.ids, geometries: joined.geometries, coordinates: joined.coordinates, points: needsPoints ? points : undefined },
      request.weights,
      { transform: request.transform, linkUnneighboured: request.linkUnneighboured },
    );
  }
  checkWeights(w, w.description);
  const summary = summarizeWeights(w);
  lap('weights');
  const rates = request.rates?.recipes.length
    ? addRates(request.rates, values, w, { ids: joined.ids, rows: joined.rows }, { permutations: request.permutations ?? 999, seed })
    : undefined;

  progress(0.3, 'Preparing the log-determinant');
  const algebra = chooseAlgebra(w, symmetricForm(w), { coordinates: points, method: request.algebra ?? 'auto', seed, helper: runtime.helper });
  // A refusal after this point frees the algebra (it may hold a second thread's factor).
  const unlessRefused = (check: () => void) => { try { check(); } catch (e) { algebra.dispose?.(); throw e; } };
  unlessRefused(() => checkSpatialRange(algebra.range, w.description, models));
  lap('algebra');

  const y = values.get(request.y)!;
  // Above PERMUTATION_AREA_LIMIT areas the randomisation p-value is accurate and 999 shuffles of n
  // values cost more than the whole model fit, so the permutation test runs only when asked for.
  const permutations = request.permutations ?? (y.length <= PERMUTATION_AREA_LIMIT ? 999 : 0);
  if (y.length > 0 && y.every((v) => v === y[0])) {
    throw new InputError(
      `The outcome column "${request.y}" has the same value (${y[0]}) in every ${joined.rowKind === 'feature' ? 'feature' : 'row'}, so there is nothing to explain; choose an outcome that varies.`,
      { column: request.y },
    );
  }
  const design: Design = {
    names: ['constant', ...request.x],
    columns: [new Float64Array(y.length).fill(1), ...request.x.map((c) => values.get(c)!)],
  };

  progress(0.4, 'Fitting the plain regression');
  const ols = fitOls(y, design, { robust: request.robust });
  unlessRefused(() => { if (isPerfectFit(y, ols.residuals)) throw perfectFitError(request.y, request.x); });
  const moran = moranResidualTest(ols, design, algebra);
  const lm = lmTests(ols, design, algebra);
  const recommendation = recommendModel(lm);
  const olsResidualLag = spatialLag(w, ols.residuals);
  const moranY = moranColumn(y, w, { permutations, seed });
  lap('ols');

  let lag: AnalysisResult['lag'];
  let error: AnalysisResult['error'];
  let impacts: AnalysisResult['impacts'];
  let comparison: AnalysisResult['comparison'];
  try {
    if (models.includes('lag')) {
      progress(0.5, 'Fitting the spatial lag model');
      const fit = fitSpatialLag(y, design, algebra, ols);
      checkFittedLikelihood('spatial lag model', fit.logLik, y.length, design.columns.length);
      lag = { ...fit, residualLag: spatialLag(w, fit.residuals) };
      lap('lag');
      progress(0.7, 'Simulating the spillover effects');
      impacts = lagImpacts(fit, design, algebra, { draws: impactDraws, seed });
      lap('impacts');
    }
    if (models.includes('error')) {
      progress(0.8, 'Fitting the spatial error model');
      const fit = fitSpatialError(y, design, algebra, ols);
      checkFittedLikelihood('spatial error model', fit.logLik, y.length, design.columns.length);
      error = { ...fit, residualLag: spatialLag(w, fit.residuals) };
      lap('error');
    }
  } finally {
    algebra.dispose?.();
  }
  const asked = request.compareWeights === 'suggested'
    ? suggestedAlternatives(w.spec, joined.geometries.some((g) => g.kind === 'polygon'))
    : request.compareWeights ?? [];
  const alternatives = asked.filter((spec) => w.spec.method === 'edge-list' || !sameSpec(spec, w.spec as WeightsSpec));
  if (alternatives.length > 0) {
    progress(0.9, 'Refitting under the other neighbour definitions');
    comparison = compareWeights(
      { spec: w.spec, description: w.description, summary, moran, lm, recommendation, lag, error, impacts: impacts?.impacts },
      alternatives,
      { joined, points, y, design, ols, models: models as ModelName[], transform: request.transform, linkUnneighboured: request.linkUnneighboured, seed, impactDraws, method: request.algebra, helper: runtime.helper },
    );
    lap('comparison');
  }

  let localResult: AnalysisResult['local'];
  if (local) {
    progress(0.93, 'Looking for where the pattern is');
    const of = local.of;
    const fitted = { residuals: ols, 'residuals:lag': lag, 'residuals:error': error } as const;
    const source = Object.hasOwn(fitted, of) ? fitted[of as keyof typeof fitted] : undefined;
    if (of.startsWith('residuals') && !source) {
      throw new InputError(`--local-of ${of}: the ${of === 'residuals:lag' ? 'spatial lag' : 'spatial error'} model was not fitted; add it to the models or choose residuals (of the plain regression).`);
    }
    const residualWords = { residuals: 'residuals of the plain regression', 'residuals:lag': 'residuals of the spatial lag model', 'residuals:error': 'residuals of the spatial error model' } as const;
    const rate = localRateValues(of, rates ?? []);
    const [v, label] = of === 'outcome' ? [y, request.y] : source ? [source.residuals, residualWords[of as keyof typeof residualWords]] : rate ? [rate.values, rate.label] : [values.get(of)!, of];
    localResult = localPatterns(local, v, label, w, seed, { ids: joined.ids, rows: joined.rows }, (f) => progress(0.93 + 0.06 * f, 'Looking for where the pattern is'));
    lap('local');
  }

  const warnings = [...joined.warnings, ...areaShapeWarnings(joined, points, layer.sourceName), ...ols.warnings, ...(lag?.warnings ?? []), ...(impacts?.warnings ?? []), ...(error?.warnings ?? [])];
  if (summary.withoutNeighbours.length > 0) {
    warnings.push(`${summary.withoutNeighbours.length} area(s) have no neighbours (${summary.withoutNeighbours.slice(0, 10).join(', ')}${summary.withoutNeighbours.length > 10 ? ', …' : ''}); their spatial lag is 0.`);
  }
  if (w.tiesDecided) warnings.push(tieWarning(w.tiesDecided, w.spec));
  if (w.notes) warnings.push(...w.notes);
  if (request.permutations === undefined && permutations === 0) {
    warnings.push(`With ${y.length} areas the permutation test of Moran's I was not run by default (the randomisation p-value is reliable at this size); ask for it with a number of permutations.`);
  }
  if (summary.components > 1) warnings.push(`The neighbour graph falls into ${summary.components} separate groups of areas.`);
  if (dropped.length > 0) warnings.push(`${dropped.length} row(s) with missing values were left out (rows ${dropped.slice(0, 10).map((d) => d.row).join(', ')}${dropped.length > 10 ? ', …' : ''}); the neighbours were built on the remaining areas.`);

  progress(1, 'Done');
  return {
    engineVersion: ENGINE_VERSION,
    createdAt: new Date().toISOString(),
    request: {
      id: request.id, ...(boundaryId ? { boundaryId } : {}), y: request.y, x: [...request.x], sheet: request.sheet,
      weights: request.edgeList ? { method: 'edge-list', source: request.edgeList.name } : request.weights,
      transform: w.transform, models: [...models] as AnalysisResult['request']['models'],
      dropMissing: request.dropMissing ?? false, robust: request.robust ?? false,
      seed, impactDraws, permutations,
      ...(alternatives.length ? { compareWeights: alternatives } : {}),
      ...(local ? { local } : {}),
      ...(request.rates?.recipes.length ? { rates: ratesRecord(request.rates) } : {}),
    },
    inputs,
    n: joined.ids.length,
    ids: joined.ids,
    rows: joined.rows,
    droppedRows: dropped,
    geometries: joined.geometries,
    coordinates: joined.coordinates,
    coordinateEvidence: joined.coordinateEvidence,
    ...(joined.coordinatesGuessed ? { coordinatesGuessed: true } : {}),
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
    algebra: {
      logDeterminant: algebra.logdet.method,
      accuracy: algebra.logdet.accuracy,
      traces: algebra.traceMethod,
      range: { lower: algebra.range.lower, upper: algebra.range.upper, method: algebra.range.method },
    },
    ols: { ...ols, moran, lm, recommendation },
    olsResidualLag,
    lag,
    error,
    impacts,
    moranY,
    ...(comparison ? { comparison } : {}),
    ...(localResult ? { local: localResult } : {}),
    ...(rates ? { rates } : {}),
    warnings,
    timings,
  };
}

async function record(role: InputRecord['role'], f: { name: string; bytes: Uint8Array }): Promise<InputRecord> {
  return { role, name: f.name, bytes: f.bytes.length, sha256: await sha256Hex(f.bytes) };
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
  for (const m of r.models) {
    if (!['ols', 'lag', 'error'].includes(m)) throw new InputError(`Unknown model "${m}": choose from ols, lag, error.`);
  }
}
