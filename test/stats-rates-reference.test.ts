// Rate smoothers and the rate-adjusted Moran's I against test/golden/rates.json, written by
// scripts/reference/rates.py (numpy, hand-written readers) on the North Carolina counties file
// test/fixtures/sids (Debian's r-cran-spdata, CC0): events SID74, population BIR74, queen contiguity.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readBoundary } from '../src/geo/index.js';
import { buildWeights } from '../src/weights/index.js';
import { ebGlobal, ebLocal, ebMoran, neighbourhoodRate } from '../src/stats/index.js';

const golden = JSON.parse(readFileSync(new URL('./golden/rates.json', import.meta.url), 'utf8'));
const fixture = (p: string) => ({ name: p.split('/').pop()!, bytes: new Uint8Array(readFileSync(new URL(`./fixtures/${p}`, import.meta.url))) });

function close(actual: ArrayLike<number>, expected: number[]): void {
  expect(actual.length).toBe(expected.length);
  for (let i = 0; i < expected.length; i++) {
    expect(Math.abs(actual[i] - expected[i])).toBeLessThanOrEqual(1e-10 * Math.max(Math.abs(expected[i]), 1e-300));
  }
}

describe('rates on the North Carolina counties (numpy reference)', async () => {
  const layer = await readBoundary([fixture('sids/sids.shp'), fixture('sids/sids.dbf'), fixture('sids/sids.shx')], {});
  const ids = layer.areas.map((_, i) => String(i));
  const w = buildWeights({ ids, geometries: layer.areas.map((a) => a.geometry!), coordinates: layer.coordinates }, { method: 'queen' }, { transform: 'row' });
  const d = layer.areas.map((a) => Number((a.properties as Record<string, unknown>).SID74));
  const n = layer.areas.map((a) => Number((a.properties as Record<string, unknown>).BIR74));
  it('global empirical Bayes rates and shrinkage weights to 1e-10 relative', () => {
    const g = ebGlobal(d, n);
    close(g.rate, golden.ebGlobal);
    close(g.weight, golden.ebGlobalWeight);
  });
  it('local empirical Bayes rates to 1e-10 relative', () => {
    close(ebLocal(d, n, w).rate, golden.ebLocal);
  });
  it('neighbourhood rates to 1e-10 relative', () => {
    close(neighbourhoodRate(d, n, w), golden.neighbourhood);
  });
  it('standardised rates and the rate-adjusted Moran\'s I to 1e-10 relative', () => {
    const t = ebMoran(d, n, w, { permutations: 99, seed: 3 });
    close(t.standardised, golden.standardised);
    close([t.I], [golden.ebMoranI]);
  });
});
