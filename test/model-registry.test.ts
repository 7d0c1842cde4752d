/**
 * The model registry drives every place that lists, fits, reports or writes models. An extra entry
 * added to the registry module alone (here by mocking that one module: no other file changes) is
 * fitted by the pipeline, refitted under other neighbour definitions, written to the JSON and the
 * report, and offered by the command line and the sidebar.
 *
 * The extra entry is a least-squares fit with the neighbours' averages of the explanatory columns
 * added (the shape of the model family still to come). Its coefficients are checked against ml-matrix's
 * least squares on the same columns built from the run's own edge list (a general-purpose library).
 */
import { describe, expect, it, vi } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Matrix, solve } from 'ml-matrix';
// @ts-ignore -- jstat ships no type declarations
import jstatModule from 'jstat';
import { columbusData, readGolden } from './helpers/columbus.js';

vi.mock('../src/models/registry.js', async (importOriginal) => {
  const original = await importOriginal<typeof import('../src/models/registry.js')>();
  const { fitOls } = await import('../src/models/ols.js');
  const { csrMultiply } = await import('../src/linalg/csr.js');
  const { coefficientJson } = await import('../src/models/model-entry.js');
  const { defineModel } = await import('../src/models/model-entry.js');
  const extra = defineModel({
    key: 'neighbourColumns',
    cli: 'neighbour-columns',
    label: 'Model with neighbours’ columns',
    about: 'the neighbours’ averages of the explanatory columns added',
    method: 'least squares',
    leastSquares: true,
    parameters: [],
    fit: (p) => {
      const x = p.design.columns.map((c, j) => ({ c, j })).filter(({ j }) => j !== p.design.intercept);
      const fit = fitOls(p.y, {
        names: [...p.design.names, ...x.map(({ j }) => `neighbours' average of ${p.design.names[j]}`)],
        columns: [...p.design.columns, ...x.map(({ c }) => csrMultiply(p.w, c))],
        intercept: p.design.intercept,
      });
      const k = p.design.columns.length;
      return { ...fit, coefficients: fit.coefficients.map((c, j) => (j >= k ? { ...c, lagged: true as const } : c)) };
    },
    headline: (f) => ({ parameters: [], logLik: f.logLik, aic: f.aic, bic: f.bic, r2: f.r2, sigma2: f.sigma2 }),
    // it reduces to the plain regression when every neighbours' column has coefficient 0
    nests: [{ key: 'ols', restriction: 'θ = 0', df: (p) => p.design.columns.length - (p.design.intercept === null ? 0 : 1) }],
    json: (f) => ({ coefficients: f.coefficients.map(coefficientJson), logLik: f.logLik, aic: f.aic }),
  });
  return { ...original, MODELS: [...original.MODELS, extra] };
});

const { MODELS, MODEL_KEYS } = await import('../src/models/index.js');
const { runAnalysis, resultToJson, fitUnderWeights, baseFit } = await import('../src/pipeline/index.js');
const { readEdgeList } = await import('../src/weights/index.js');
const { buildReport, MODEL_BLOCKS } = await import('../src/report/index.js');
const { FIT_USAGE, parseFitArgs } = await import('../src/cli/args.js');
const { formatSummary } = await import('../src/cli/summary.js');
const { modelChoices } = await import('../addin/shared/model-choices.js');
const { runSummary } = await import('../addin/shared/run-summary-build.js');
const { summaryLines } = await import('../addin/shared/run-summary.js');
const { InputError } = await import('../src/errors.js');
const { fitRows, effectsRows } = await import('../addin/functions/model-logic.js');
const { resultsGeoJson } = await import('../src/report/index.js');

const jStat = jstatModule as unknown as { chisquare: { cdf(x: number, df: number): number } };
const ROOT = join(import.meta.dirname, '..');
const dir = join(ROOT, 'test/fixtures/columbus');
const boundary = ['columbus.shp', 'columbus.dbf', 'columbus.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(dir, name))) }));
const EXTRA = 'neighbourColumns';
/** the registry's own models, in order */
const FAMILY = ['ols', 'lag', 'error', 'slx', 'durbin', 'durbinError', 'lagError', 'lagIV', 'errorGM'];

describe('the model registry drives every list of models', () => {
  it('holds the models of today in order, and the extra entry after them', () => {
    expect(MODELS.map((m) => m.key)).toEqual([...FAMILY, EXTRA]);
    expect(MODEL_KEYS).toEqual([...FAMILY, EXTRA]);
  });

  it('the command line\'s --models help and its refusal list exactly the registry\'s spellings', () => {
    const spellings = MODELS.map((m) => m.cli);
    const line = FIT_USAGE.split('\n').find((l) => l.trimStart().startsWith('--models'))!;
    expect(line).toContain(`any of ${spellings.join(',')}, or all`);
    const base = ['--boundary', 'b.geojson', '--id', 'ID', '--y', 'Y', '--x', 'X'];
    expect(parseFitArgs([...base, '--models', 'neighbour-columns']).models).toEqual(['ols', EXTRA]);
    expect(parseFitArgs([...base, '--models', 'all']).models).toEqual([...FAMILY, EXTRA]);
    // without --models: every model not fitted only on request
    expect(parseFitArgs(base).models).toEqual(['ols', 'lag', 'error', EXTRA]);
    expect(parseFitArgs([...base, '--models', 'error,lag']).models).toEqual(['ols', 'lag', 'error']);
    expect(() => parseFitArgs([...base, '--models', 'lag,hexagon'])).toThrow(InputError);
    expect(() => parseFitArgs([...base, '--models', 'lag,hexagon'])).toThrow(`--models: unknown model "hexagon"; choose from ${spellings.join(', ')}, or all.`);
  });

  it('the sidebar is offered exactly the registry\'s models, the plain regression marked as always fitted', () => {
    expect(modelChoices()).toEqual(MODELS.map((m) => ({ key: m.key, label: m.label, about: m.about, baseline: m.key === 'ols', onRequest: !['ols', 'lag', 'error', EXTRA].includes(m.key) })));
  });

  it('every registered model has its report blocks (the type asks for them; this says so at run time too)', () => {
    for (const key of FAMILY) expect(MODEL_BLOCKS).toHaveProperty(key);
  });
});

describe('an extra registry entry flows through the run, the comparison, the JSON and the report (Columbus)', async () => {
  const result = await runAnalysis({
    boundary, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
    models: [], permutations: 0, impactDraws: 50, compareWeights: [{ method: 'rook' }],
  });
  const extra = (result.fits as Record<string, { coefficients: { name: string; estimate: number }[]; fitted: Float64Array; residuals: Float64Array; residualLag: Float64Array; logLik: number }>)[EXTRA];

  it('the run fits every model by default, the extra one among them', () => {
    expect(result.request.models).toEqual(['ols', 'lag', 'error', EXTRA]);
    expect(Object.keys(result.fits)).toEqual(['ols', 'lag', 'error', EXTRA]);
  });

  it('the sidebar\'s done message names every fitted model by the registry\'s label, the extra one too', () => {
    const s = runSummary(result);
    expect(s.fitted.map((f) => f.key)).toEqual(['lag', 'error', EXTRA]);
    const lines = summaryLines(s);
    expect(lines).toContain('Model with neighbours’ columns: fitted.');
    expect(lines.some((l) => /^Spatial lag model: ρ = -?\d\.\d{3}\.$/.test(l))).toBe(true);
  });

  it('its coefficients equal least squares on [1, INC, HOVAL, W·INC, W·HOVAL] by ml-matrix', async () => {
    const { from, to, weight } = result.weights.edges;
    const n = result.n;
    const lagOf = (v: Float64Array) => { const out = new Float64Array(n); for (let e = 0; e < from.length; e++) out[from[e]] += weight[e] * v[to[e]]; return out; };
    // the run reads the boundary file's own attributes, so its areas are the .dbf's rows in order
    const { x } = await columbusData();
    expect(result.rows).toEqual(Array.from({ length: n }, (_, i) => i + 1));
    const [inc, hoval] = [x.columns[1], x.columns[2]];
    const X = new Matrix(n, 5);
    const wInc = lagOf(inc), wHoval = lagOf(hoval);
    for (let i = 0; i < n; i++) [1, inc[i], hoval[i], wInc[i], wHoval[i]].forEach((v, j) => X.set(i, j, v));
    const beta = solve(X, Matrix.columnVector(Array.from(result.y))).getColumn(0);
    expect(extra.coefficients.map((c) => c.name)).toEqual(['constant', 'INC', 'HOVAL', "neighbours' average of INC", "neighbours' average of HOVAL"]);
    extra.coefficients.forEach((c, j) => expect(Math.abs(c.estimate - beta[j])).toBeLessThan(1e-9 * Math.max(1, Math.abs(beta[j]))));
  });

  it('the cell function SPILL.FIT fits it by its key or its command-line spelling, with the run\'s coefficients; SPILL.EFFECTS says it has none', async () => {
    const { x } = await columbusData(); // the .dbf's rows in order, as the run read them (checked above)
    const { from, to } = result.weights.edges;
    const ids = result.ids;
    const links = [['origin', 'neighbour'], ...Array.from(from, (f, e) => [ids[f], ids[to[e]]])];
    const yr = [['CRIME'], ...Array.from(result.y, (v) => [v])];
    const xr = [['INC', 'HOVAL'], ...Array.from(result.y, (_, i) => [x.columns[1][i], x.columns[2][i]])];
    const idr = [['POLYID'], ...ids.map((id) => [id])];
    for (const model of [EXTRA, 'Neighbour-Columns']) {
      const rows = fitRows(yr, xr, idr, links, model);
      expect(rows[0]).toEqual(['term', 'estimate', 'standard error', 't', 'p']);
      extra.coefficients.forEach((c, j) => expect(Math.abs((rows[1 + j][1] as number) - c.estimate)).toBeLessThan(1e-9 * Math.max(1, Math.abs(c.estimate))));
      expect(rows.find((r) => r[0] === 'log-likelihood')![1]).toBeCloseTo(extra.logLik, 9);
    }
    expect(() => effectsRows(yr, xr, idr, links, EXTRA)).toThrow(/has no separate direct and indirect effects.*effects are given for "lag"/);
  });

  it('the areas as GeoJSON carry its fitted values and residuals under a name from its label', () => {
    const props = (resultsGeoJson(result).features[0] as { properties: Record<string, number> }).properties;
    expect(props.model_with_neighbours_columns_fitted).toBe(extra.fitted[0]);
    expect(props.model_with_neighbours_columns_residual).toBe(extra.residuals[0]);
    expect(props.model_with_neighbours_columns_neighbours_residual).toBe(extra.residualLag[0]);
    expect(props.spatial_lag_fitted).toBe(result.fits.lag!.fitted[0]);
  });

  it('the JSON carries its object under its key and its per-area columns; the existing models\' JSON is untouched', () => {
    const json = resultToJson(result, { perArea: true }) as Record<string, any>;
    expect(json[EXTRA].coefficients.map((c: { lagged?: boolean }) => c.lagged ?? false)).toEqual([false, false, false, true, true]);
    expect(json.lag.coefficients.some((c: object) => 'lagged' in c || 'intercept' in c)).toBe(false);
    expect(json[EXTRA].logLik).toBe(extra.logLik);
    expect(Object.keys(json).filter((k) => ['ols', 'lag', 'error', EXTRA, 'impacts', 'impactsMethod'].includes(k))).toEqual(['ols', 'lag', 'error', EXTRA, 'impacts', 'impactsMethod']);
    expect(json.areas[0][`${EXTRA}Fitted`]).toBe(extra.fitted[0]);
    expect(json.areas[0][`${EXTRA}Residual`]).toBe(extra.residuals[0]);
    expect(json.comparison[1][EXTRA].aic).toBeTypeOf('number');
    expect(json.lag.rho).toBe(result.fits.lag!.parameter);
  });

  it('the report gives it a sheet, a row in the models table, its columns by area and its AIC under each definition', () => {
    const report = buildReport(result);
    const fitted = MODELS.filter((m) => m.key in result.fits).map((m) => m.label);
    expect(report.sheets.filter((s) => s.role === 'model').map((s) => s.name)).toEqual(fitted);
    const summary = report.sheets.find((s) => s.role === 'overview')!;
    const models = summary.blocks.find((b) => b.kind === 'table' && b.title === 'How the models compare') as { rows: unknown[][] };
    expect(models.rows.map((r) => r[0])).toEqual(fitted);
    const areas = report.sheets.find((s) => s.role === 'areas')!.blocks[0] as { columns: { header: string; group?: string }[]; rows: unknown[][] };
    // each model's columns sit under its label as a group heading
    const k = areas.columns.findIndex((c) => c.group === 'Model with neighbours’ columns' && c.header === 'Fitted');
    expect(k).toBeGreaterThan(0);
    expect(areas.rows[0][k]).toBe(extra.fitted[0]);
    const compared = report.sheets.find((s) => s.role === 'comparison')!;
    const table = compared.blocks.find((b) => b.kind === 'table' && b.title === 'The spatial models under each definition') as { columns: { header: string; group?: string }[] };
    expect(table.columns.filter((c) => c.group === 'Model with neighbours’ columns').map((c) => c.header)).toEqual(['AIC']);
  });

  it('the run adds the likelihood-ratio test of the restriction it declares (θ = 0 against the plain regression; chi-square by jStat)', () => {
    const tests = (extra as unknown as { nestedTests: { against: string; restriction: string; stat: number; df: number; p: number }[] }).nestedTests;
    expect(tests).toHaveLength(1);
    const [t] = tests;
    expect([t.against, t.restriction, t.df]).toEqual(['ols', 'θ = 0', 2]);
    expect(t.stat).toBeCloseTo(2 * (extra.logLik - result.ols.logLik), 10);
    expect(Math.abs(t.p - (1 - jStat.chisquare.cdf(t.stat, 2)))).toBeLessThan(1e-12);
    expect((result.fits.lag as { nestedTests?: unknown }).nestedTests).toBeUndefined();
  });

  it('the readable summary prints it', () => {
    expect(formatSummary(result)).toMatch(/Model with neighbours’ columns \(least squares\): the neighbours’ averages of the explanatory columns added/);
  });
});

describe('the registry on arrays in memory: no files, a neighbour list and columns (Columbus, numpy/scipy reference)', async () => {
  const golden = readGolden();
  const { y, x } = await columbusData();
  const ids = Array.from({ length: y.length }, (_, i) => String(i + 1));
  // the reference's own queen neighbour list (test/golden/columbus.json), as the origin,neighbour rows a sheet would hold
  const text = (golden.weights.neighbours as number[][]).flatMap((row, i) => row.map((j) => `${ids[i]},${ids[j]}`)).join('\n');
  const w = readEdgeList(text, ids, { source: 'neighbours in memory' });
  const base = baseFit(y, [{ name: 'INC', values: x.columns[1] }, { name: 'HOVAL', values: x.columns[2] }]);
  const found = fitUnderWeights(base, w, ['ols', 'lag', 'error'], { seed: 20261201, impactDraws: 50 });
  const sig6 = (a: number, b: number) => expect(Math.abs(a - b) / Math.abs(b), `${a} vs ${b}`).toBeLessThan(5e-6);

  it('fits the registry\'s models with the reference\'s figures', () => {
    expect(w.colIdx.length).toBe(golden.weights.links);
    sig6(found.fits.lag!.parameter, golden.lag.rho);
    sig6(found.fits.lag!.logLik, golden.lag.logLik);
    sig6(found.fits.error!.parameter, golden.error.lambda);
    sig6(found.fits.error!.parameterSe, golden.error.lambdaSe);
    found.fits.ols!.coefficients.forEach((c, j) => sig6(c.estimate, golden.ols.coefficients[j].estimate));
    expect(found.fits.lag!.impacts!.impacts.map((i) => i.name)).toEqual(['INC', 'HOVAL']);
  });

  it('refuses a key that names no model, listing the registry\'s keys', () => {
    expect(() => fitUnderWeights(base, w, ['lag', 'hexagon'], { seed: 1, impactDraws: 10 })).toThrow(`Unknown model "hexagon": choose from ${MODEL_KEYS.join(', ')}.`);
  });

  it('gives the same figures as a run from the files', async () => {
    const run = await runAnalysis({
      boundary, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
      models: ['lag', 'error'], permutations: 0, impactDraws: 50,
    });
    expect(found.fits.lag!.parameter).toBe(run.fits.lag!.parameter);
    expect(found.fits.error!.logLik).toBe(run.fits.error!.logLik);
    expect(found.fits.lag!.impacts!.impacts).toEqual(run.fits.lag!.impacts!.impacts);
    expect(found.lm).toEqual(run.ols.lm);
  });
});
