/**
 * The wider family through a whole run on the Columbus shapefile (queen, as read and built by the
 * engine): the JSON keys and their fields, the figures against the independent numpy/scipy reference
 * (scripts/reference/family.py), the report's sheets, the Summary's tests between models and their
 * reading, the comparison of neighbour definitions, and the command line's --models spellings.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { baseFit, fitUnderWeights, runAnalysis, resultToJson } from '../src/pipeline/index.js';
import { readEdgeList } from '../src/weights/index.js';
import { modelEntry } from '../src/models/index.js';
import { columbusData, readGolden } from './helpers/columbus.js';
import { buildReport } from '../src/report/index.js';
import { formatSummary } from '../src/cli/summary.js';
import { MODELS } from '../src/models/index.js';
import { runCli, ROOT, STACK_LINE } from './helpers/cli.js';

const family = JSON.parse(readFileSync(join(ROOT, 'test/golden/family.json'), 'utf8'));
const dir = join(ROOT, 'test/fixtures/columbus');
const boundary = ['columbus.shp', 'columbus.dbf', 'columbus.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(dir, name))) }));
const FAMILY_KEYS = ['slx', 'durbin', 'durbinError', 'lagError', 'lagIV', 'errorGM'];

function rel(actual: number, expected: number, tolerance: number, what = ''): void {
  expect(Math.abs(actual - expected) / Math.max(Math.abs(expected), 1e-300), `${what}: ${actual} vs ${expected}`).toBeLessThan(tolerance);
}

describe('a run with every model on Columbus (queen)', async () => {
  const result = await runAnalysis({
    boundary, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
    models: MODELS.map((m) => m.key), permutations: 0, impactDraws: 200, compareWeights: [{ method: 'rook' }],
  });
  const json = resultToJson(result, { perArea: true }) as Record<string, any>;

  it('the JSON has each model at the top level under its key, in registry order; the lag and error objects keep their shape', () => {
    const keys = Object.keys(json).filter((k) => MODELS.some((m) => m.key === k));
    expect(keys).toEqual(MODELS.map((m) => m.key));
    expect(json.lag.lrTests).toBeUndefined();
    expect(json.error.lrTests).toBeUndefined();
    expect(json.lag.coefficients.some((c: object) => 'lagged' in c)).toBe(false);
    expect(json.impacts).toHaveLength(2); // the lag model's, at the top as before
  });

  it('coefficients in the order constant, X, WX; WX terms named in plain words and marked lagged', () => {
    const withLagged = ["constant", 'INC', 'HOVAL', "neighbours' average of INC", "neighbours' average of HOVAL"];
    for (const k of ['slx', 'durbin', 'durbinError']) {
      expect(json[k].coefficients.map((c: { name: string }) => c.name)).toEqual(withLagged);
      expect(json[k].coefficients.map((c: { lagged?: boolean }) => c.lagged ?? false)).toEqual([false, false, false, true, true]);
    }
    for (const k of ['lagError', 'lagIV', 'errorGM']) expect(json[k].coefficients.map((c: { name: string }) => c.name)).toEqual(['constant', 'INC', 'HOVAL']);
  });

  it('the spatial parameters that apply, logLik/aic/bic where defined, lr tests, impacts where defined', () => {
    const has = (k: string, fields: string[]) => fields.forEach((f) => expect(json[k], `${k}.${f}`).toHaveProperty(f));
    const lacks = (k: string, fields: string[]) => fields.forEach((f) => expect(json[k], `${k}.${f}`).not.toHaveProperty(f));
    has('slx', ['logLik', 'aic', 'bic', 'lr', 'lrTests', 'impacts']);
    lacks('slx', ['rho', 'lambda']);
    has('durbin', ['rho', 'rhoSe', 'logLik', 'aic', 'bic', 'lr', 'lrTests', 'impacts', 'impactsMethod']);
    lacks('durbin', ['lambda']);
    has('durbinError', ['lambda', 'lambdaSe', 'logLik', 'aic', 'bic', 'lr', 'lrTests', 'impacts']);
    lacks('durbinError', ['rho']);
    has('lagError', ['rho', 'rhoSe', 'lambda', 'lambdaSe', 'logLik', 'aic', 'bic', 'lr', 'lrTests', 'evaluations', 'convergence', 'impacts']);
    has('lagIV', ['rho', 'rhoSe', 'wald', 'instruments', 'firstStage', 'impacts']);
    lacks('lagIV', ['logLik', 'aic', 'bic', 'lambda']);
    has('errorGM', ['lambda', 'lambdaSe', 'wald']);
    lacks('errorGM', ['logLik', 'aic', 'bic', 'rho', 'impacts']);
    expect(json.durbin.impacts[0]).toEqual(expect.objectContaining({ name: 'INC', direct: expect.any(Number), indirect: expect.any(Number), total: expect.any(Number), directSe: expect.any(Number), indirectSe: expect.any(Number), totalSe: expect.any(Number) }));
    expect(json.durbin.lrTests.map((t: { against: string }) => t.against)).toEqual(['lag', 'error', 'slx']);
    expect(json.durbin.lrTests[1].restriction).toContain('θ = −ρβ');
    for (const k of FAMILY_KEYS) {
      expect(json.areas[0]).toHaveProperty(`${k}Fitted`);
      expect(json.areas[0]).toHaveProperty(`${k}Residual`);
    }
  });

  it('a run from the files gives the reference’s figures (the engine’s own queen neighbours; numpy/scipy reference)', () => {
    const pairs: [number, number, string][] = [];
    for (const k of ['slx', 'durbin', 'durbinError', 'lagError']) {
      json[k].coefficients.forEach((c: { estimate: number; se: number; name: string }, i: number) => {
        pairs.push([c.estimate, family[k].coefficients[i].estimate, `${k} ${c.name}`], [c.se, family[k].coefficients[i].se, `${k} ${c.name} se`]);
      });
      pairs.push([json[k].logLik, family[k].logLik, `${k} logLik`], [json[k].aic, family[k].aic, `${k} aic`], [json[k].lr.stat, family[k].lr.stat, `${k} lr`]);
      for (const t of json[k].lrTests) pairs.push([t.stat, family[k].lrTests[t.against].stat, `${k} against ${t.against}`]);
    }
    pairs.push([json.durbin.rho, family.durbin.rho, 'durbin ρ'], [json.durbinError.lambda, family.durbinError.lambda, 'durbinError λ'],
      [json.lagError.rho, family.lagError.rho, 'lagError ρ'], [json.lagError.lambda, family.lagError.lambda, 'lagError λ'],
      [json.lagIV.rho, family.lagIV.rho, 'lagIV ρ'], [json.errorGM.lambda, family.errorGM.lambda, 'errorGM λ'], [json.errorGM.lambdaSe, family.errorGM.lambdaSe, 'errorGM λ se']);
    json.durbin.impacts.forEach((m: { direct: number; indirect: number; total: number }, i: number) => {
      for (const f of ['direct', 'indirect', 'total'] as const) pairs.push([m[f], family.durbin.impacts[i][f], `durbin ${f}`]);
    });
    for (const [a, e, what] of pairs) rel(a, e, 1e-6, what);
  });

  it('the report gives each model its sheet, and the Summary the tests between them with a reading in the published order', () => {
    const report = buildReport(result);
    expect(report.sheets.filter((s) => s.role === 'model').map((s) => s.name)).toEqual(MODELS.map((m) => m.label));
    const summary = report.sheets.find((s) => s.role === 'overview')!;
    const tests = summary.blocks.find((b) => b.kind === 'table' && b.title === 'Tests between the models') as { rows: unknown[][] };
    expect(tests.rows.length).toBe(json.slx.lrTests.length + json.durbin.lrTests.length + json.durbinError.lrTests.length + json.lagError.lrTests.length + 2);
    expect(tests.rows.some((r) => r[2] === 'θ = −ρβ (common factor)' && r[3] === 'likelihood ratio')).toBe(true);
    expect(tests.rows.filter((r) => r[3] === 'Wald')).toHaveLength(2);
    const reading = summary.blocks.find((b) => b.kind === 'paragraph' && b.text.startsWith('How to choose among the models')) as { text: string };
    expect(reading.text).toContain('Elhorst (2010)');
    // on Columbus neither restriction is rejected (θ = 0: p = 0.355; θ = −ρβ: p = 0.121, the reference's
    // figures) and the Lagrange-multiplier tests do not separate the lag from the error model (robust
    // lag p = 0.053, robust error p = 0.834)
    expect(result.ols.recommendation.choice).toBe('either');
    expect(reading.text).toContain('the Lagrange-multiplier tests do not separate the lag model from the error model');
    expect(reading.text).toContain('report both beside it');
    const models = summary.blocks.find((b) => b.kind === 'table' && b.title === 'How the models compare') as { rows: unknown[][] };
    expect(models.rows.map((r) => r[0])).toContain('Lag-and-error model: λ');
    const spill = report.sheets.find((s) => s.role === 'impacts')!;
    const titles = spill.blocks.filter((b) => b.kind === 'title').map((b) => (b as { text: string }).text);
    expect(titles).toEqual(['Spillover effects in the spatial lag model', 'Spillover effects in the neighbours’ columns model', 'Spillover effects in the spatial Durbin model',
      'Spillover effects in the spatial Durbin error model', 'Spillover effects in the lag-and-error model', 'Spillover effects in the lag model by instruments']);
    const durbinSheet = report.sheets.find((s) => s.name === 'Spatial Durbin model')!;
    expect(durbinSheet.blocks.some((b) => b.kind === 'table' && b.title.startsWith('Tests of the spatial Durbin model'))).toBe(true);
    const ivSheet = report.sheets.find((s) => s.name === 'Lag model by instruments')!;
    const fit = ivSheet.blocks.find((b) => b.kind === 'keyValues' && b.title === 'How the estimate was found') as { rows: unknown[][] };
    expect(fit.rows.map((r) => r[0])).toContain('Instruments');
  });

  it('the By area sheet says which fitted value is shown exactly for the models whose fitted plus residual is not the observed value', () => {
    // the identity y = fitted + residual (checked on the figures themselves) holds for the models without ρ;
    // for those with ρ the fitted value is (I − ρW)⁻¹Xβ and the residual y − ρWy − Xβ (Anselin 1988)
    const sheet = buildReport(result).sheets.find((s) => s.role === 'areas')!;
    const table = sheet.blocks.find((b) => b.kind === 'table') as { note: string };
    const addsUp = (key: string) => {
      const f = (result.fits as Record<string, { fitted: Float64Array; residuals: Float64Array }>)[key];
      return Array.from(result.y).every((v, i) => Math.abs(v - f.fitted[i] - f.residuals[i]) < 1e-9 * Math.max(1, Math.abs(v)));
    };
    const named = MODELS.filter((m) => table.note.includes(`the ${m.label.charAt(0).toLowerCase()}${m.label.slice(1)}`));
    const notAddingUp = MODELS.filter((m) => !addsUp(m.key));
    expect(notAddingUp.map((m) => m.key)).toEqual(['lag', 'durbin', 'lagError', 'lagIV']);
    expect(named.map((m) => m.key)).toEqual(notAddingUp.map((m) => m.key));
    expect(table.note).toContain('(I − ρW)⁻¹Xβ');
    expect(table.note).toContain('fitted plus residual is not the observed value');
  });

  it('the comparison of neighbour definitions refits the family under rook contiguity', () => {
    for (const k of ['durbin', 'lagError', 'lagIV', 'errorGM']) expect(json.comparison[1][k], k).toBeTruthy();
    expect(json.comparison[1].lagError.rho).toBeTypeOf('number');
    expect(json.comparison[1].lagError.lambda).toBeTypeOf('number');
    expect(json.comparison[1].errorGM.aic).toBeUndefined();
    const compared = buildReport(result).sheets.find((s) => s.role === 'comparison')!;
    const table = compared.blocks.find((b) => b.kind === 'table' && b.title === 'The spatial models under each definition') as { columns: { header: string }[] };
    expect(table.columns.length).toBeGreaterThan(20);
  });

  it('the readable summary prints every model with its tests', () => {
    const text = formatSummary(result);
    for (const m of MODELS) if (!m.baseline) expect(text).toContain(`${m.label} (${m.method})`);
    expect(text).toContain('Likelihood-ratio test of θ = −ρβ (common factor) (the spatial error model)');
    expect(text).toContain('Wald test of λ = 0 (the plain regression)');
    // the neighbours' columns model's θ = 0 is its test against the plain regression: printed once
    const slx = text.slice(text.indexOf('Neighbours’ columns model (least squares)'));
    expect(slx.slice(0, slx.indexOf('\n\n'))).not.toContain('test of θ = 0 (the plain regression)');
    // no label says the method twice ("by two-stage least squares (two-stage least squares)")
    for (const m of MODELS) if (!m.baseline) expect(m.about, m.key).not.toContain(m.method);
    // the comparison's columns say whose spatial parameter each is
    // the family's reading (#15 §1: specific to general, then general to specific), as on the Summary sheet
    const reading = text.slice(text.indexOf('Which model: guidance from the tests between them'));
    const paragraph = reading.slice(0, reading.indexOf('\n\n')).replace(/\s+/g, ' ');
    expect(paragraph).toContain('following Elhorst (2010): from specific to general');
    expect(paragraph).toContain('guidance from the tests at the 5% level');
    expect(reading.slice(0, reading.indexOf('\n\n')).split('\n').every((l) => l.length <= 102)).toBe(true);
    // which standard errors each estimator by instruments or moments shows
    expect(text).toContain('Standard errors shown: classical (equal variance assumed; --robust gives ones robust to unequal variance)');
    expect(text).toContain('Standard errors shown: robust to unequal variance (Kelejian & Prucha 2010)');
    expect(text).toMatch(/definition +Moran's I p +suggested +ρ lag +λ error +ρ durbin +λ durbin-error +ρ lag-error +λ lag-error +ρ lag-iv +λ error-gm/);
  });
});

describe('the family on arrays in memory (what a cell function holds: columns and a neighbour list, no files)', async () => {
  const golden = readGolden();
  const { y, x } = await columbusData();
  const ids = Array.from({ length: y.length }, (_, i) => String(i + 1));
  const text = (golden.weights.neighbours as number[][]).flatMap((row, i) => row.map((j) => `${ids[i]},${ids[j]}`)).join('\n');
  const w = readEdgeList(text, ids, { source: 'neighbours in memory' });
  const base = baseFit(y, [{ name: 'INC', values: x.columns[1] }, { name: 'HOVAL', values: x.columns[2] }]);
  const keys = MODELS.map((m) => m.key);
  const found = fitUnderWeights(base, w, keys, { seed: 1, impactDraws: 50 });

  it('every registry key fits; its headline has its spatial parameters, and a likelihood exactly when it is estimated by one', () => {
    for (const key of keys) {
      const entry = modelEntry(key)!;
      const fit = (found.fits as Record<string, Parameters<typeof entry.headline>[0]>)[key];
      const h = entry.headline(fit);
      expect(h.parameters.map((q) => q.key), key).toEqual(entry.parameters.map((q) => q.key));
      expect(h.logLik === undefined, key).toBe(key === 'lagIV' || key === 'errorGM');
      h.parameters.forEach((q) => { expect(Number.isFinite(q.estimate)).toBe(true); expect(q.se).toBeGreaterThan(0); });
    }
  });

  it('with the reference’s figures', () => {
    const f = found.fits as Record<string, any>;
    rel(f.durbin.parameter, family.durbin.rho, 1e-6, 'durbin ρ');
    rel(f.lagError.lambda, family.lagError.lambda, 1e-6, 'lag-and-error λ');
    rel(f.lagIV.rho, family.lagIV.rho, 1e-10, 'instruments ρ');
    rel(f.errorGM.lambda, family.errorGM.lambda, 1e-7, 'moments λ');
    f.slx.coefficients.forEach((c: { estimate: number }, j: number) => rel(c.estimate, family.slx.coefficients[j].estimate, 1e-9, 'slx'));
  });
});

describe('the command line offers the family by its spellings', () => {
  const COLUMBUS = join(ROOT, 'test/fixtures/columbus/columbus.shp');
  it('--models takes ols,lag,error,slx,durbin,durbin-error,lag-error,lag-iv,error-gm and all; the help lists exactly those', () => {
    expect(MODELS.map((m) => m.cli)).toEqual(['ols', 'lag', 'error', 'slx', 'durbin', 'durbin-error', 'lag-error', 'lag-iv', 'error-gm']);
    const run = runCli(['fit', '--boundary', COLUMBUS, '--id', 'POLYID', '--y', 'CRIME', '--x', 'INC,HOVAL', '--coordinates', 'projected', '--models', 'durbin-error,lag-iv', '--json']);
    expect(run.code).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(Object.keys(out).filter((k) => MODELS.some((m) => m.key === k))).toEqual(['ols', 'durbinError', 'lagIV']);
    const bad = runCli(['fit', '--boundary', COLUMBUS, '--id', 'POLYID', '--y', 'CRIME', '--x', 'INC,HOVAL', '--models', 'durbin,sarar']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toContain('unknown model "sarar"; choose from ols, lag, error, slx, durbin, durbin-error, lag-error, lag-iv, error-gm, or all.');
    expect(bad.stderr).not.toMatch(STACK_LINE);
  }, 120_000);
});

describe('bad input for the models with neighbours’ columns', () => {
  it('a column whose neighbours’ average is itself (a region indicator under neighbours within regions) is refused by name', async () => {
    const { InputError } = await import('../src/errors.js');
    const { fitModel, fitOls } = await import('../src/models/index.js');
    const { denseAlgebra } = await import('../src/linalg/dense-algebra.js');
    const { csrFromNeighbours, rookNeighbours } = await import('./helpers/grid.js');
    // two 5 × 5 grids side by side with no link between them; REGION is 1 on the second
    const one = rookNeighbours(5, 5);
    const nb = [...one, ...one.map((row) => row.map((j) => j + 25))];
    const w = csrFromNeighbours(nb, 'row');
    const n = 50;
    const region = Float64Array.from({ length: n }, (_, i) => (i >= 25 ? 1 : 0));
    const x1 = Float64Array.from({ length: n }, (_, i) => Math.sin(i * 1.3) + 0.1 * i);
    const y = Float64Array.from({ length: n }, (_, i) => 1 + 2 * x1[i] + region[i] + Math.cos(i * 2.1));
    const design = { names: ['constant', 'x1', 'REGION'], columns: [new Float64Array(n).fill(1), x1, region], intercept: 0 };
    const p = { y, design, w, algebra: denseAlgebra(w, csrFromNeighbours(nb, 'binary')), ols: fitOls(y, design) };
    for (const key of ['slx', 'durbin', 'durbinError']) {
      expect(() => fitModel(key, p, { seed: 1, impactDraws: 10 }), key).toThrow(InputError);
      expect(() => fitModel(key, p, { seed: 1, impactDraws: 10 }), key).toThrow('The neighbours\' average of "REGION" is a combination of the explanatory columns');
    }
    expect(() => fitModel('lag', p, { seed: 1, impactDraws: 10 })).not.toThrow();
  });

  it('the models with neighbours’ columns ask for more areas: one more coefficient per explanatory column', async () => {
    const { areasNeeded, modelEntry } = await import('../src/models/index.js');
    expect(areasNeeded(modelEntry('lag')!, 3)).toBe(6);
    expect(areasNeeded(modelEntry('durbin')!, 3)).toBe(8);
    expect(areasNeeded(modelEntry('slx')!, 3)).toBe(7);
    expect(areasNeeded(modelEntry('lagError')!, 3)).toBe(7);
  });
});

describe('the reading says what is missing when only part of the family is fitted', () => {
  it('the Durbin model alone: the second step cannot be completed', async () => {
    const result = await runAnalysis({
      boundary, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
      models: ['durbin'], permutations: 0, impactDraws: 20,
    });
    const summary = buildReport(result).sheets.find((s) => s.role === 'overview')!;
    const reading = summary.blocks.find((b) => b.kind === 'paragraph' && b.text.startsWith('How to choose among the models')) as { text: string };
    expect(reading.text).toContain('The lag and error models were not both fitted beside the spatial Durbin model');
    const tests = summary.blocks.find((b) => b.kind === 'table' && b.title === 'Tests between the models');
    expect(tests).toBeUndefined(); // nothing it nests was fitted
  });
});

describe('robust standard errors through a whole run (the lag model by instruments)', () => {
  it('the effects are drawn from the robust covariance, with the reference’s robust ρ standard error, and no internal error', async () => {
    const result = await runAnalysis({
      boundary, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
      models: ['ols', 'lagIV'], robust: true, permutations: 0, impactDraws: 200,
    });
    const json = resultToJson(result) as Record<string, any>;
    expect(json.lagIV.standardErrors).toMatch(/robust/);
    // scripts/reference/family.py: the direct numpy 2SLS with White's covariance
    rel(json.lagIV.rhoSe, family.lagIV.rhoSeRobust, 1e-10, 'robust ρ se');
    expect(json.lagIV.impacts).toHaveLength(2);
    for (const e of json.lagIV.impacts) for (const v of [e.directSe, e.indirectSe, e.totalSe]) expect(Number.isFinite(v) && v > 0).toBe(true);
    // the readable summary says the table carries the robust ones, and shows the reference's robust SEs
    const text = formatSummary(result);
    const iv = text.slice(text.indexOf('Lag model by instruments (two-stage least squares)'));
    expect(iv).toContain('Standard errors shown: robust to unequal variance (White 1980, HC0)');
    expect(iv).toContain(`SE ${Number(family.lagIV.rhoSeRobust.toPrecision(4))}`);
  });

  it('the plain regression and the neighbours’ columns model print the robust table beside the classical one, with the JSON’s figures', async () => {
    const result = await runAnalysis({
      boundary, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
      models: ['ols', 'slx'], robust: true, permutations: 0, impactDraws: 50,
    });
    const json = resultToJson(result) as Record<string, any>;
    expect(json.ols.robustCoefficients).toHaveLength(3);
    expect(json.slx.robustCoefficients).toHaveLength(5);
    const text = formatSummary(result);
    const heading = 'The same with standard errors robust to unequal variance (White 1980, HC0; --robust):';
    expect(text.split(heading)).toHaveLength(3); // once under each model
    const slx = text.slice(text.indexOf('Neighbours’ columns model (least squares)'));
    const robustPart = slx.slice(slx.indexOf(heading));
    const se = (robustPart.split('\n').find((l) => l.trim().startsWith("neighbours' average of INC")) ?? '').trim().split(/\s{2,}/)[2];
    expect(Number(se)).toBeCloseTo(json.slx.robustCoefficients[3].se, 3);
  });

  it('White’s covariance is exactly symmetric (the Cholesky factor of the draws refuses anything else)', async () => {
    const { whiteCovariance } = await import('../src/models/ols.js');
    const { householderQr } = await import('../src/linalg/index.js');
    const { y, x } = await columbusData();
    const qr = householderQr(x.columns);
    const e = new Float64Array(y.length).map((_, i) => y[i] - 40 + x.columns[1][i]); // any residuals will do
    const k = x.columns.length;
    const v = whiteCovariance(qr, e);
    for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) expect(v[a * k + b]).toBe(v[b * k + a]);
  });
});
