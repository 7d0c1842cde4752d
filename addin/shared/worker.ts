/**
 * The engine in a Web Worker, so the sidebar stays responsive and a run can be cancelled by ending
 * the worker. Pure engine calls only: files come in as bytes, plain data goes back.
 */
import { InputError } from '../../src/errors.js';
import { readTable, joinAreas, JoinError, idPropertyCandidates, emptyJoinReport, workbookSheets } from '../../src/geo/index.js';
import { readLayerAndTable, runAnalysis, type AnalysisResult } from '../../src/pipeline/index.js';
import { buildReport, projectedNote, resultsGeoJsonText, scatterPoints } from '../../src/report/index.js';
import type { WeightsSpec } from '../../src/weights/index.js';
import { buildWeights, suggestBandDistance, summarizeWeights, tieWarning } from '../../src/weights/index.js';
import { baseWorkbookRisks, writeResultsWorkbook } from '../../src/workbook/index.js';
import type { CheckRequest, CheckResult, EngineAnswer, EngineError, EngineJob, WorkerMessage } from './engine-protocol.js';
import { modelChoices } from './model-choices.js';
import { summaryLines } from './run-summary.js';
import { runSummary } from './run-summary-build.js';
import type { RunOutput, TableSnapshot } from './types.js';

const scope = self as unknown as { postMessage(m: WorkerMessage): void; onmessage: ((e: MessageEvent<{ id: number; job: EngineJob }>) => void) | null };

function asEngineError(e: unknown): EngineError {
  if (e instanceof InputError) return { message: e.message, input: true, where: e.where, join: e instanceof JoinError ? e.report : undefined };
  return { message: e instanceof Error ? e.message : String(e), input: false };
}

async function tableOf(file: { name: string; bytes: Uint8Array }, sheet?: string): Promise<TableSnapshot> {
  const t = await readTable(file, { sheet });
  const rowNumbers = t.rowNumbers ?? t.rows.map((_, i) => t.firstRow + i);
  return { sheet: t.sheet ?? file.name, headerRow: t.firstRow - 1, firstColumn: 1, headers: t.columns, rows: t.rows, rowNumbers };
}

async function check(c: CheckRequest): Promise<CheckResult> {
  const { layer, table } = await readLayerAndTable(c);
  const base = {
    features: layer.areas.length, propertyNames: layer.propertyNames, coordinates: layer.coordinates,
    // what was noted reading both files stays in view when the join fails (an encoding guessed, a merged cell)
    coordinateEvidence: layer.coordinateEvidence, coordinatesGuessed: layer.coordinatesGuessed ?? false, warnings: [...layer.warnings, ...(table.warnings ?? [])],
  };
  const idProperty = c.boundaryId ?? c.id;
  if (!layer.propertyNames.includes(idProperty)) {
    // the boundary file names its IDs otherwise: offer the properties that hold the table's IDs
    return {
      ...base, matched: 0, join: emptyJoinReport(), idCandidates: idPropertyCandidates(layer, table, c.id),
      joinError: `${layer.sourceName} has no property "${idProperty}"; choose the property that holds the areas' IDs.`,
    };
  }
  let joined;
  try {
    joined = joinAreas(layer, table, c.id, { featureIdProperty: c.boundaryId, ignoreLeadingZeros: c.idsIgnoreLeadingZeros ?? false });
  } catch (e) {
    if (e instanceof JoinError) return { ...base, matched: 0, join: e.report, joinError: e.message };
    throw e;
  }
  // the joined areas carry the layer's and the table's notes already
  const result: CheckResult = { ...base, matched: joined.ids.length, join: joined.report, warnings: [...joined.warnings] };
  try {
    const input = { ids: joined.ids, geometries: joined.geometries, coordinates: joined.coordinates };
    let spec = c.weights;
    if (spec.method === 'band') {
      result.bandSuggestion = suggestBandDistance(input);
      if (spec.distance === undefined) {
        if (!result.bandSuggestion) throw new InputError('Every area shares its location with another, so no distance can be suggested; give the band distance yourself.');
        spec = { method: 'band', distance: result.bandSuggestion.distance };
      }
    }
    const w = buildWeights(input, spec as WeightsSpec, { transform: c.transform, linkUnneighboured: c.linkUnneighboured });
    result.neighbours = { ...summarizeWeights(w), description: w.description, ...(w.tiesDecided ? { tiesWarning: tieWarning(w.tiesDecided, w.spec) } : {}) };
  } catch (e) {
    result.neighboursError = asEngineError(e);
  }
  return result;
}

/** The last run's result, kept for "Save areas with results". */
let lastResult: AnalysisResult | null = null;

function areasGeoJson(): EngineAnswer {
  if (!lastResult) throw new InputError('There are no results yet: run the analysis first.');
  return { op: 'geojson', text: resultsGeoJsonText(lastResult), areas: lastResult.n, note: projectedNote(lastResult) };
}

async function run(id: number, request: EngineJob & { op: 'run' }): Promise<RunOutput> {
  lastResult = null;
  const result = await runAnalysis({
    ...request.request,
    onProgress: (fraction, stage) => scope.postMessage({ id, kind: 'progress', fraction: 0.9 * fraction, stage }),
  });
  lastResult = result;
  scope.postMessage({ id, kind: 'progress', fraction: 0.92, stage: 'Laying out the results' });
  // The pictures come back as SVG; the page draws them to PNG (a worker has no SVG decoder).
  const report = buildReport(result);
  const d = scatterPoints(result); // without any withheld areas' points
  const summary = runSummary(result);
  return {
    report,
    scatter: { valueName: result.request.y, z: Array.from(d.z), lag: Array.from(d.lag), slope: d.slope },
    summary,
    headline: summaryLines(summary).join(' '),
    warnings: result.warnings,
  };
}

async function answer(id: number, job: EngineJob): Promise<EngineAnswer> {
  switch (job.op) {
    case 'models': return { op: 'models', models: modelChoices() };
    case 'sheets': {
      const sheets = await workbookSheets(job.file.bytes, job.file.name);
      return { op: 'sheets', sheets: sheets.map((x) => x.name), hidden: sheets.filter((x) => x.hidden).map((x) => x.name) };
    }
    case 'table': return { op: 'table', table: await tableOf(job.file, job.sheet) };
    case 'check': return { op: 'check', result: await check(job.check) };
    case 'run': return { op: 'run', output: await run(id, job) };
    case 'workbook': {
      // as on the command line: a workbook holding parts a copy would lose is not copied
      const risks = job.base ? baseWorkbookRisks(job.base) : [];
      const base = risks.length ? undefined : job.base;
      const bytes = await writeResultsWorkbook(job.report, { base, baseName: job.baseName });
      return { op: 'workbook', bytes, ...(risks.length ? { note: `${job.baseName ?? 'Your workbook'} holds ${risks.join(', ')}, which a copy could not keep, so the results are in a new workbook of their own.` } : {}) };
    }
    case 'geojson': return areasGeoJson();
  }
}

scope.onmessage = (e) => {
  const { id, job } = e.data;
  answer(id, job).then(
    (a) => scope.postMessage({ id, kind: 'done', answer: a }),
    (err) => scope.postMessage({ id, kind: 'failed', error: asEngineError(err) }),
  );
};
