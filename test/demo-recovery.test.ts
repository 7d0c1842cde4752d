import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runAnalysis } from '../src/pipeline/index.js';
import { ROOT } from './helpers/cli.js';

// The demo's samples are simulated from stated processes (sample-workbooks/*-truth.json, written by
// scripts/generate-samples.ts); the fitted spatial parameter must lie within 3 standard errors of the
// simulated one (3 SE: common practice for a single seeded draw).
const file = (name: string) => ({ name, bytes: new Uint8Array(readFileSync(join(ROOT, 'sample-workbooks', name))) });

describe('the demo recovers the simulated spatial parameters', () => {
  it('districts: spatial lag ρ within 3 SE of the simulated value', async () => {
    const truth = JSON.parse(readFileSync(join(ROOT, 'sample-workbooks/vell-basin-truth.json'), 'utf8'));
    const r = await runAnalysis({
      boundary: [file('vell-basin-districts.geojson')], data: file('vell-basin.xlsx'), sheet: 'Districts',
      id: 'district_id', y: 'long_commute_pct', x: ['broadband_pct', 'rail_km', 'rent_index'],
      weights: { method: 'queen' }, transform: 'row', models: ['ols', 'lag'],
    });
    expect(Math.abs(r.fits.lag!.parameter - truth.rho)).toBeLessThan(3 * r.fits.lag!.parameterSe);
  });

  it('villages: spatial error λ within 3 SE of the simulated value (5 nearest neighbours)', async () => {
    const truth = JSON.parse(readFileSync(join(ROOT, 'sample-workbooks/vell-basin-villages-truth.json'), 'utf8'));
    const r = await runAnalysis({
      boundary: [file('vell-basin-villages.geojson')], data: file('vell-basin-villages.xlsx'), sheet: 'Villages',
      id: 'village_id', y: 'new_business_per_1000', x: ['broadband_pct', 'town_km'],
      weights: { method: 'knn', k: 5 }, transform: 'row', models: ['ols', 'error'],
    });
    expect(Math.abs(r.fits.error!.parameter - truth.lambda)).toBeLessThan(3 * r.fits.error!.parameterSe);
  });
});
