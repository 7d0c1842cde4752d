// The invented Vell Basin districts carry two planted clusters in clinic_wait_days (a centre
// district and its queen neighbours shifted up or down; sample-workbooks/vell-basin-truth.json).
// Local Moran under the false discovery rate should find them, and not much else: the truth file is
// the external reference (the generator's stated process), not the engine.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runAnalysis } from '../src/pipeline/index.js';
import { ROOT } from './helpers/cli.js';

const samples = join(ROOT, 'sample-workbooks');
const file = (name: string) => ({ name, bytes: new Uint8Array(readFileSync(join(samples, name))) });
const truth = JSON.parse(readFileSync(join(samples, 'vell-basin-truth.json'), 'utf8')).planted_clusters;

describe('planted clusters in the invented districts', () => {
  it('local Moran (FDR 0.05) finds the long-wait and short-wait clusters and little else', async () => {
    const r = await runAnalysis({
      boundary: [file('vell-basin-districts.geojson')], data: file('vell-basin.xlsx'), sheet: 'Districts', id: 'district_id',
      y: 'long_commute_pct', x: ['broadband_pct', 'rail_km', 'rent_index'], weights: { method: 'queen' }, transform: 'row', models: ['ols'],
      local: { statistics: ['moran', 'gistar'], of: 'clinic_wait_days' }, seed: 1,
    });
    const moran = r.local!.results.moran!;
    const group = new Map(r.ids.map((id, i) => [id, moran.categories![i]]));
    const highFound = truth.long_waits.filter((id: string) => group.get(id) === 'high-high').length;
    const lowFound = truth.short_waits.filter((id: string) => group.get(id) === 'low-low').length;
    expect(highFound).toBeGreaterThanOrEqual(5);
    expect(lowFound).toBeGreaterThanOrEqual(5);
    const planted = new Set([...truth.long_waits, ...truth.short_waits]);
    const elsewhere = r.ids.filter((id, i) => moran.significant[i] && !planted.has(id)).length;
    // a neighbour of a planted cluster can lean on it; more than a handful elsewhere would be a fault
    expect(elsewhere).toBeLessThanOrEqual(4);
    const star = r.local!.results.gistar!;
    const hot = truth.long_waits.filter((id: string) => { const i = r.ids.indexOf(id); return star.significant[i] && star.z[i] > 0; }).length;
    expect(hot).toBeGreaterThanOrEqual(5);
  });
});
