// The sidebar's done message, on the Columbus data (Anselin 1988, test/fixtures/columbus) under queen
// contiguity: Moran's I of the plain regression's residuals and its p-value checked against the
// independent numpy reference (test/golden/columbus.json, scripts/reference/columbus.py); the
// suggested model and what was fitted checked against the run's own recommendation and models.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runAnalysis } from '../src/pipeline/index.js';
import type { AnalysisRequest } from '../src/pipeline/types.js';
import { modelWords, pText, summaryLines, type RunSummary } from '../addin/shared/run-summary.js';
import { runSummary } from '../addin/shared/run-summary-build.js';
import { MODELS } from '../src/models/index.js';
import { readGolden } from './helpers/columbus.js';
import { ROOT } from './helpers/cli.js';

const dir = join(ROOT, 'test/fixtures/columbus');
const boundary = ['columbus.shp', 'columbus.dbf', 'columbus.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(dir, name))) }));
const request = (models: AnalysisRequest['models']): AnalysisRequest => ({
  boundary, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row', models, permutations: 0, impactDraws: 50,
});
const golden = readGolden();

describe('the done message (Columbus, queen contiguity)', () => {
  it('gives the residuals’ Moran’s I and p-value as the reference computes them', async () => {
    const s = runSummary(await runAnalysis(request(['ols'])));
    expect(s.n).toBe(49);
    expect(s.residualMoran.I).toBeCloseTo(golden.ols.moran.I, 8);
    expect(s.residualMoran.p).toBeCloseTo(golden.ols.moran.p, 8);
    expect(summaryLines(s)[0]).toBe(`49 areas. Moran's I of the plain regression's residuals: ${golden.ols.moran.I.toFixed(3)} (p = 0.0045).`);
  });

  it('names the suggested model and says it was not fitted when only the plain regression ran', async () => {
    const result = await runAnalysis(request(['ols']));
    const s = runSummary(result);
    const rec = result.ols.recommendation;
    // the reference's Lagrange-multiplier tests are both significant at 5 %: a spatial model is suggested
    expect(golden.ols.lm.lag.p).toBeLessThan(0.05);
    const named = rec.models.filter((k) => k !== 'ols');
    expect(named.length).toBeGreaterThan(0);
    // the recommendation's own models and not-fitted list, named by the registry's labels
    const label = (k: string) => MODELS.find((m) => m.key === k)!.label;
    expect(s.suggestion.models).toEqual(named.map((key) => ({ key, label: label(key) })));
    expect(s.suggestion.notFitted).toEqual(rec.notFitted.map((key) => ({ key, label: label(key) })));
    expect(s.suggestion.notFitted.map((m) => m.key)).toEqual(named);
    expect(s.suggestion.borderline).toBe(rec.borderline);
    expect(s.fitted).toEqual([]);
    expect(summaryLines(s)[1]).toMatch(/^Suggested by the Lagrange-multiplier tests: .*; not fitted in this run\.$/);
  });

  it('says it was fitted when the run fitted every suggested model, with the fitted parameters', async () => {
    const result = await runAnalysis(request(['ols', 'lag', 'error']));
    const s = runSummary(result);
    expect(s.suggestion.notFitted).toEqual([]);
    expect(summaryLines(s)[1]).toMatch(/fitted in this run\.$/);
    expect(s.fitted.map((f) => [f.key, f.label])).toEqual([['lag', 'Spatial lag model'], ['error', 'Spatial error model']]);
    expect(s.fitted[0].parameters.map((q) => q.symbol)).toEqual(['ρ']);
    expect(s.fitted[0].parameters[0].estimate).toBeCloseTo(golden.lag.rho, 5);
    expect(s.fitted[1].parameters[0].estimate).toBeCloseTo(golden.error.lambda, 5);
    expect(summaryLines(s)).toContain(`Spatial lag model: ρ = ${golden.lag.rho.toFixed(3)}.`);
    expect(summaryLines(s)).toContain(`Spatial error model: λ = ${golden.error.lambda.toFixed(3)}.`);
  });

  it('writes p-values plainly', () => {
    expect(pText(0.0004)).toBe('p < 0.001');
    expect(pText(0.00452)).toBe('p = 0.0045');
    expect(pText(0.0532)).toBe('p = 0.053');
    expect(pText(0.41)).toBe('p = 0.41');
  });

  it('words the suggestion from the models it names: none, one, two that the tests do not separate, a borderline call, some fitted', () => {
    const lag = { key: 'lag', label: 'Spatial lag model' }, error = { key: 'error', label: 'Spatial error model' };
    const base: RunSummary = { n: 10, outcome: 'y', residualMoran: { I: 0.1, p: 0.2 }, suggestion: { choice: 'ols', text: '', models: [], notFitted: [], borderline: false }, fitted: [] };
    const line = (sg: Partial<RunSummary['suggestion']>) => summaryLines({ ...base, suggestion: { ...base.suggestion, ...sg } })[1];
    expect(line({})).toMatch(/^Suggested model: the plain regression/);
    expect(line({ choice: 'lag', models: [lag], notFitted: [lag] })).toBe('Suggested by the Lagrange-multiplier tests: the spatial lag model; not fitted in this run.');
    expect(line({ choice: 'either', models: [lag, error], notFitted: [error] }))
      .toBe('Suggested by the Lagrange-multiplier tests: the spatial lag model and the spatial error model (the tests do not separate them); the spatial error model was not fitted in this run.');
    expect(line({ choice: 'lag', models: [lag], borderline: true })).toBe('Suggested by the Lagrange-multiplier tests: the spatial lag model (a borderline call); fitted in this run.');
    expect(modelWords([lag, error])).toBe('spatial lag model and the spatial error model');
    // a fitted model without a spatial parameter is named as fitted
    expect(summaryLines({ ...base, fitted: [{ key: 'x', label: 'Model with neighbours’ columns', parameters: [] }] })[2]).toBe('Model with neighbours’ columns: fitted.');
  });
});
