import { describe, expect, it } from 'vitest';
import { Matrix, solve } from 'ml-matrix';
import { recommendModel } from '../src/models/index.js';
import type { LmTests, Recommendation } from '../src/models/types.js';
import { runAnalysis, resultToJson, type AnalysisResult, type ModelKey } from '../src/pipeline/index.js';
import { buildReport, interpretation } from '../src/report/index.js';
import { formatSummary } from '../src/cli/summary.js';
import { normalSampler, seededRandom } from '../src/stats/random.js';
import { rookNeighbours } from './helpers/grid.js';

// The decision rule of Anselin (2005) and Anselin & Rey (2014), one case per branch, on crafted
// Lagrange-multiplier figures; then the same branches reached by runs on designs simulated from a
// stated process. Each check reads the wording back against the figures: which model it names, which
// tests it calls significant (with their p-values), what it says was not fitted.

const t = (p: number, stat = 1) => ({ stat, df: 1, p });
const lm = (e: number, l: number, re: number, rl: number, reStat = 1, rlStat = 1): LmTests => ({
  error: t(e), lag: t(l), robustError: t(re, reStat), robustLag: t(rl, rlStat), joint: { stat: 1, df: 2, p: 0.5 },
});
const sayP = (p: number) => (p < 0.001 ? 'p < 0.001' : `p = ${p.toFixed(3)}`);
const KEYS = { error: 'error', lag: 'lag', robustError: 'robust error', robustLag: 'robust lag' } as const;

/** Every "<test> p = x" the text prints matches the figure; the tests it names as significant are those below alpha. */
function checkClaims(r: Recommendation, tests: LmTests): void {
  for (const [key, words] of Object.entries(KEYS)) {
    const printed = [...r.text.matchAll(new RegExp(`(?<!robust )\\b${words} (p [=<] [0-9.]+)`, 'g'))].map((m) => m[1]);
    for (const p of printed) expect(p).toBe(sayP(tests[key as keyof typeof KEYS].p));
  }
  for (const [key, sig] of Object.entries(r.significant)) expect(sig).toBe(tests[key as keyof typeof KEYS].p < r.alpha);
  expect(r.text).not.toMatch(/weakly/);
}

describe('the suggestion says what the rule supports, branch by branch (crafted test figures)', () => {
  it('neither test significant: stay with the plain regression', () => {
    const tests = lm(0.41, 0.32, 0.5, 0.5);
    const r = recommendModel(tests);
    checkClaims(r, tests);
    expect(r).toMatchObject({ choice: 'ols', models: ['ols'], borderline: false, fitted: true });
    expect(r.text).toMatch(/^Neither Lagrange-multiplier test is significant at 5% \(error p = 0\.410, lag p = 0\.320\)/);
  });

  it('only the lag test: the lag model', () => {
    const tests = lm(0.5, 0.001, 0.5, 0.5);
    const r = recommendModel(tests);
    checkClaims(r, tests);
    expect(r).toMatchObject({ choice: 'lag', models: ['lag'], borderline: false });
    expect(r.text).toMatch(/Only the Lagrange-multiplier test for a spatial lag is significant .* the spatial lag model is the suggested model\./);
  });

  it('only the error test: the error model', () => {
    const tests = lm(0.002, 0.6, 0.5, 0.5);
    const r = recommendModel(tests);
    checkClaims(r, tests);
    expect(r).toMatchObject({ choice: 'error', models: ['error'] });
    expect(r.text).toMatch(/the spatial error model is the suggested model/);
  });

  it('both tests, only the robust lag test: the lag model', () => {
    const tests = lm(0.0001, 0.0001, 0.4, 0.0005);
    const r = recommendModel(tests);
    checkClaims(r, tests);
    expect(r).toMatchObject({ choice: 'lag', models: ['lag'], bothKinds: false });
    expect(r.text).toMatch(/only the one for a lag is \(robust lag p < 0\.001, robust error p = 0\.400\), so the spatial lag model is the suggested model/);
  });

  it('both tests, only the robust error test: the error model', () => {
    const tests = lm(0.0001, 0.0001, 0.003, 0.7);
    const r = recommendModel(tests);
    checkClaims(r, tests);
    expect(r).toMatchObject({ choice: 'error', models: ['error'] });
  });

  it('both robust tests: the larger statistic points the way, and a model with both terms is worth considering', () => {
    const tests = lm(0.0001, 0.0001, 0.004, 0.0005, 8.1, 12.2);
    const r = recommendModel(tests);
    checkClaims(r, tests);
    expect(r).toMatchObject({ choice: 'lag', bothKinds: true, borderline: false });
    expect(r.text).toMatch(/larger robust statistic \(12\.2 against 8\.10\) points to the spatial lag model/);
    expect(r.text).toMatch(/both a lag and an error term/);
  });

  it('neither robust test: the tests do not separate the models, with no leaning', () => {
    const tests = lm(0.0001, 0.0001, 0.41, 0.62, 0.7, 0.25);
    const r = recommendModel(tests);
    checkClaims(r, tests);
    expect(r).toMatchObject({ choice: 'either', models: ['lag', 'error'], borderline: false });
    expect(r.text).toMatch(/do not separate the spatial lag model from the spatial error model/);
    expect(r.text).not.toMatch(/points/);
  });

  it('robust tests at 0.046 and 0.053: borderline, report both models; "close" is halving or doubling the level', () => {
    const tests = lm(0.0001, 0.0001, 0.046, 0.053);
    const r = recommendModel(tests);
    checkClaims(r, tests);
    expect(r.choice).toBe('error');
    expect(r).toMatchObject({ borderline: true, models: ['lag', 'error'], close: { lower: 0.025, upper: 0.1 } });
    expect(r.text).toMatch(/borderline: it turns on p-values close to the 5% level \(robust error p = 0\.046, robust lag p = 0\.053; close means between 2\.5% and 10%/);
    expect(r.text).toMatch(/report both the spatial lag model and the spatial error model/);
    expect(r.rule).toMatch(/halved or doubled/);
  });

  it('a single lag test at p = 0.04: borderline between the plain regression and the lag model', () => {
    const tests = lm(0.5, 0.04, 0.5, 0.5);
    const r = recommendModel(tests);
    expect(r).toMatchObject({ choice: 'lag', borderline: true, models: ['ols', 'lag'] });
    expect(r.text).toMatch(/report both the plain regression and the spatial lag model/);
  });

  it('p-values far from the level are not borderline (0.02 is outside the band at 1%)', () => {
    expect(recommendModel(lm(0.5, 0.001, 0.5, 0.5)).borderline).toBe(false);
    const r = recommendModel(lm(0.5, 0.0001, 0.5, 0.5), 0.01);
    expect(r).toMatchObject({ alpha: 0.01, close: { lower: 0.005, upper: 0.02 }, borderline: false });
  });

  it('says when the suggested model was not fitted, and which', () => {
    const tests = lm(0.002, 0.6, 0.5, 0.5);
    const r = recommendModel(tests, { fitted: ['ols', 'lag'] });
    expect(r).toMatchObject({ choice: 'error', fitted: false, notFitted: ['error'] });
    expect(r.text).toMatch(/The spatial error model was not fitted in this run: add it to the models/);
    const both = recommendModel(lm(0.0001, 0.0001, 0.41, 0.62), { fitted: ['ols'] });
    expect(both).toMatchObject({ fitted: false, notFitted: ['lag', 'error'] });
    expect(both.text).toMatch(/Neither spatial model was fitted/);
    expect(recommendModel(lm(0.41, 0.32, 0.5, 0.5), { fitted: ['ols'] }).fitted).toBe(true);
  });
});

// ---- designs simulated from a stated process on a 15 × 15 grid of 1 km squares (rook neighbours)

const SIDE = 15;
function squares(values: Record<string, Float64Array>): Uint8Array {
  const features = [];
  for (let i = 0; i < SIDE * SIDE; i++) {
    const x = (i % SIDE) * 1000, y = Math.floor(i / SIDE) * 1000;
    const properties: Record<string, unknown> = { cell: `C${String(i + 1).padStart(3, '0')}` };
    for (const [k, v] of Object.entries(values)) properties[k] = v[i];
    features.push({ type: 'Feature', properties, geometry: { type: 'Polygon', coordinates: [[[x, y], [x + 1000, y], [x + 1000, y + 1000], [x, y + 1000], [x, y]]] } });
  }
  return new TextEncoder().encode(JSON.stringify({ type: 'FeatureCollection', features }));
}

/**
 * y from a lag process (I − ρW)y = Xβ + ε, or an error process y = Xβ + (I − λW)⁻¹ε, or neither;
 * with `lambda`, the lag process's ε is itself (I − λW)⁻¹ε (both spillovers at once).
 */
function simulate(kind: 'lag' | 'error' | 'none', parameter: number, seed: number, lambda = 0) {
  const n = SIDE * SIDE;
  const normal = normalSampler(seededRandom(seed));
  const nb = rookNeighbours(SIDE, SIDE);
  const a = Matrix.eye(n);
  if (kind !== 'none') nb.forEach((list, i) => list.forEach((j) => a.set(i, j, -parameter / list.length)));
  const x = Float64Array.from({ length: n }, () => normal());
  const drawn = Float64Array.from({ length: n }, () => normal());
  let eps = drawn;
  if (lambda) {
    const b = Matrix.eye(n);
    nb.forEach((list, i) => list.forEach((j) => b.set(i, j, -lambda / list.length)));
    eps = Float64Array.from(solve(b, Matrix.columnVector(Array.from(drawn))).getColumn(0));
  }
  const xb = Array.from(x, (v) => 1 + 2 * v);
  let y: number[];
  if (kind === 'lag') y = solve(a, Matrix.columnVector(xb.map((v, i) => v + eps[i]))).getColumn(0);
  else if (kind === 'error') {
    const u = solve(a, Matrix.columnVector(Array.from(eps))).getColumn(0);
    y = xb.map((v, i) => v + u[i]);
  } else y = xb.map((v, i) => v + eps[i]);
  return squares({ y: Float64Array.from(y), x });
}

async function fit(bytes: Uint8Array, models: ModelKey[]): Promise<AnalysisResult> {
  return runAnalysis({
    boundary: [{ name: 'grid.geojson', bytes }], id: 'cell', y: 'y', x: ['x'],
    weights: { method: 'rook' }, transform: 'row', models, permutations: 0, impactDraws: 50,
  });
}

/** The Summary's reading, the sheet's suggestion and the CLI's lines agree with the figures. */
function checkRun(r: AnalysisResult): void {
  const rec = r.ols.recommendation;
  checkClaims(rec, r.ols.lm);
  const reading = interpretation(r);
  expect(reading).toContain(rec.text);
  const suggestion = buildReport(r).sheets[0].blocks.find((b) => b.kind === 'keyValues' && b.title === 'Suggested model');
  // the Summary says the suggestion's reasons once, in its reading; the block's "Why" row points there
  expect(suggestion?.kind === 'keyValues' && suggestion.rows.find((row) => row[0] === 'Why')?.[1]).toMatch(/^the Lagrange-multiplier tests in the table above, read by the rule below/);
  expect(buildReport(r).sheets[0].blocks.some((b) => b.kind === 'paragraph' && b.text.includes(rec.text))).toBe(true);
  const json = resultToJson(r) as { ols: { recommendation: { choice: string; fitted: boolean; notFitted: string[] } } };
  expect(json.ols.recommendation).toMatchObject({ choice: rec.choice, fitted: rec.fitted, notFitted: rec.notFitted });
  const fittedNow = r.request.models;
  for (const m of rec.notFitted) expect(fittedNow).not.toContain(m);
  for (const m of rec.models) if (!rec.notFitted.includes(m as 'lag' | 'error')) expect(fittedNow).toContain(m);
}

describe('runs on simulated designs land in the branch of their process', () => {
  it('a lag process (ρ = 0.6): the lag model, fitted, described in the reading', async () => {
    const r = await fit(simulate('lag', 0.6, 11), ['ols', 'lag', 'error']);
    checkRun(r);
    expect(r.ols.recommendation).toMatchObject({ choice: 'lag', borderline: false, fitted: true });
    expect(interpretation(r)).toMatch(/In the spatial lag model, areas with higher x tend to have higher y/);
  });

  it('an error process (λ = 0.7) with only the lag model fitted: says the error model was not fitted and how to fit it', async () => {
    const r = await fit(simulate('error', 0.7, 12), ['ols', 'lag']);
    checkRun(r);
    const rec = r.ols.recommendation;
    expect(rec).toMatchObject({ choice: 'error', fitted: false, notFitted: ['error'] });
    expect(interpretation(r)).toMatch(/The spatial error model was not fitted in this run.*In the plain regression \(the suggested model was not fitted\)/);
    expect(formatSummary(r)).toMatch(/To fit it: run again with --models ols,lag,error/);
    expect(buildReport(r).sheets[0].blocks.some((b) => b.kind === 'keyValues' && b.rows.some((row) => row[0] === 'Fitted in this run' && /^no: spatial error model/.test(String(row[1]))))).toBe(true);
  });

  // The seeds of the next two were found by simulating seeds 1 to 40 of each process and keeping one
  // whose tests land in the branch; the checks below read the branch off the run's own figures.
  it('a weak error process (λ = 0.3, seed 39): both tests significant, neither robust one, so the tests do not separate the models and the reading leans to neither', async () => {
    const r = await fit(simulate('error', 0.3, 39), ['ols', 'lag', 'error']);
    checkRun(r);
    const { lm } = r.ols;
    const rec = r.ols.recommendation;
    // the figures put the run in this branch, away from the borderline band (2.5% to 10%)
    expect(lm.error.p).toBeLessThan(0.025);
    expect(lm.lag.p).toBeLessThan(0.025);
    expect(lm.robustError.p).toBeGreaterThanOrEqual(0.1);
    expect(lm.robustLag.p).toBeGreaterThanOrEqual(0.1);
    expect(rec).toMatchObject({ choice: 'either', models: ['lag', 'error'], borderline: false, fitted: true });
    expect(rec.text).toMatch(/but neither robust form is .*the tests do not separate the spatial lag model from the spatial error model\. Report both/);
    // no leaning either way, in the guidance or in the Summary's reading
    for (const text of [rec.text, interpretation(r), formatSummary(r)]) {
      expect(text).not.toMatch(/weakly|leans?|points? to the spatial (lag|error)|(lag|error) model is the suggested/);
    }
  });

  it('a lag process with an error term too (ρ = λ = 0.25, seed 7): a robust lag p between 2.5% and 10%, so borderline, report both; with only the lag model fitted, it says the error model was not and names the --models value', async () => {
    const r = await fit(simulate('lag', 0.25, 7, 0.25), ['ols', 'lag']);
    checkRun(r);
    const { lm } = r.ols;
    const rec = r.ols.recommendation;
    expect(lm.error.p).toBeLessThan(0.025);
    expect(lm.lag.p).toBeLessThan(0.025);
    expect(lm.robustLag.p).toBeGreaterThanOrEqual(0.025);
    expect(lm.robustLag.p).toBeLessThan(0.05);
    expect(lm.robustError.p).toBeGreaterThanOrEqual(0.1);
    expect(rec).toMatchObject({ choice: 'lag', models: ['lag', 'error'], borderline: true, fitted: false, notFitted: ['error'] });
    expect(rec.text).toMatch(new RegExp(`The call is borderline: it turns on a p-value close to the 5% level \\(robust lag p = ${lm.robustLag.p.toFixed(3)}; close means between 2\\.5% and 10%`));
    expect(rec.text).toMatch(/so report both the spatial lag model and the spatial error model\./);
    expect(rec.text).toMatch(/The spatial error model was not fitted in this run/);
    expect(formatSummary(r)).toMatch(/To fit it: run again with --models ols,lag,error/);
  });

  it('no spatial process: the plain regression, with no spatial model asked for', async () => {
    const r = await fit(simulate('none', 0, 13), ['ols']);
    checkRun(r);
    expect(r.ols.recommendation).toMatchObject({ choice: 'ols', fitted: true });
    expect(formatSummary(r)).not.toMatch(/To fit/);
  });
});

describe('the invented villages sample (simulated from a spatial error process)', () => {
  it('does not point to the lag model; the reading describes the error model, which has the lower AIC', async () => {
    const { readFileSync } = await import('node:fs');
    const { join } = await import('node:path');
    const { ROOT } = await import('./helpers/cli.js');
    const file = (name: string) => ({ name, bytes: new Uint8Array(readFileSync(join(ROOT, 'sample-workbooks', name))) });
    const r = await runAnalysis({
      boundary: [file('vell-basin-villages.geojson')], data: file('vell-basin-villages.xlsx'), sheet: 'Villages',
      id: 'village_id', y: 'new_business_per_1000', x: ['broadband_pct', 'town_km'],
      weights: { method: 'knn', k: 5 }, transform: 'row', models: ['ols', 'lag', 'error'], impactDraws: 50,
    });
    checkRun(r);
    const rec = r.ols.recommendation;
    expect(rec.choice).not.toBe('lag');
    expect(rec.models).toContain('error');
    expect(r.fits.error!.aic).toBeLessThan(r.fits.lag!.aic);
    const reading = interpretation(r);
    expect(reading).not.toMatch(/points[^.]*lag model|suggested model[^.]*lag|lag model is the suggested/);
    expect(reading).toMatch(/Of the models to report, the spatial error model has the lower AIC/);
  });
});
