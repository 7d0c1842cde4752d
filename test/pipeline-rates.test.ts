// The rates module of the pipeline: recipe parsing, units of `per`, the modelled column and the JSON
// shape of issue #14. Smoothers themselves are checked against numpy in stats-rates-reference.test.ts.
import { describe, expect, it } from 'vitest';
import { computeRate, parseRateRecipe, rateToJson } from '../src/pipeline/rates.js';
import { gridGeoJson } from '../bench/grid-geojson.js';
import { InputError } from '../src/errors.js';
import { csrFromNeighbours, rookNeighbours } from './helpers/grid.js';

describe('rates in the pipeline', () => {
  it('parses NAME=EVENTS/POPULATION and checks --per', () => {
    expect(parseRateRecipe('r = cases / births', 100000)).toEqual({ name: 'r', events: 'cases', population: 'births', per: 100000 });
    expect(() => parseRateRecipe('cases/births')).toThrow(InputError);
    expect(() => parseRateRecipe('r=a/b', 10)).toThrow(/--per 10/);
  });
  it('writes every smoothed rate in the units of per and models the chosen one', () => {
    const w = csrFromNeighbours(rookNeighbours(3, 3), 'row');
    const d = [1, 4, 30, 2, 8, 15, 0, 6, 40];
    const n = [100, 400, 900, 150, 500, 800, 80, 300, 1200];
    const ids = d.map((_, i) => `A${i}`);
    const rows = d.map((_, i) => i + 2);
    const r = computeRate(parseRateRecipe('r=d/n', 1000), d, n, w, { ids, rows }, { smoothing: 'local', permutations: 99, seed: 4 });
    expect(r.areas[0].rate).toBeCloseTo(10, 12);
    expect(Array.from(r.modelled)).toEqual(r.areas.map((a) => a.ebLocal));
    const json = rateToJson(r) as { areas: { id: string }[]; ebMoran: Record<string, unknown> };
    expect(Object.keys(json)).toEqual(['events', 'population', 'per', 'flagRule', 'smoothing', 'ebMoran', 'areas', 'moranOfRawRate', 'withholdFlagged', 'withheldInWorkbook']);
    expect(json.areas.map((a) => a.id)).toEqual(ids);
    // issue #14 §4: I, z, the p-values (normal and permutation apart), permutations, seed
    expect(Object.keys(json.ebMoran)).toEqual(['I', 'z', 'p', 'permutationP', 'permutations', 'seed']);
    expect(json.ebMoran).toMatchObject({ I: r.ebMoran.I, z: r.ebMoran.z, p: r.ebMoran.p, permutationP: r.ebMoran.permutationP, permutations: 99, seed: 4 });
  });
  it('names the row of a bad count', () => {
    const w = csrFromNeighbours(rookNeighbours(1, 3), 'row');
    expect(() => computeRate(parseRateRecipe('r=d/n'), [1, 5, 2], [10, 4, 10], w, { ids: ['a', 'b', 'c'], rows: [2, 3, 4] }, { smoothing: 'global', permutations: 0, seed: 1 }))
      .toThrow(/Row 3: 5 events in "d" exceed/);
  });
});

describe('a run with a rate (North Carolina counties, test/fixtures/sids, r-cran-spdata CC0)', async () => {
  const { readFileSync } = await import('node:fs');
  const { runAnalysis } = await import('../src/pipeline/index.js');
  const { buildReport } = await import('../src/report/index.js');
  const boundary = ['sids.shp', 'sids.dbf', 'sids.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(new URL(`./fixtures/sids/${name}`, import.meta.url))) }));
  const result = await runAnalysis({
    boundary, id: 'FIPS', y: 'sids', x: ['NWBIR74'], weights: { method: 'queen' }, transform: 'row', models: ['ols'], permutations: 0,
    rates: { recipes: [parseRateRecipe('sids=SID74/BIR74', 1000)], smoothing: 'neighbourhood' },
  });
  it('models the chosen smoothed rate and keeps the recipe in the run record', () => {
    const r = result.rates![0];
    expect(Array.from(r.modelled)).toEqual(r.areas.map((a) => a.neighbourhood));
    expect(result.request.rates).toEqual({ recipes: [{ name: 'sids', events: 'SID74', population: 'BIR74', per: 1000 }], smoothing: 'neighbourhood', withholdFlagged: false });
    const record = JSON.stringify(buildReport(result).sheets.find((s) => s.role === 'record'));
    expect(record).toContain('SID74 / BIR74 per 1000; modelled as the neighbourhood smoothed rate');
  });
});

describe('above 10,000 areas the rate-adjusted Moran\'s I draws no permutations unless asked (a 101 × 100 grid)', () => {
  it('gives the normal p only, and says why on the sheet, in the JSON and in the warnings', async () => {
    const { runAnalysis, resultToJson } = await import('../src/pipeline/index.js');
    const { buildReport } = await import('../src/report/index.js');
    const geo = JSON.parse(gridGeoJson(101, 100)) as { features: { properties: Record<string, unknown> }[] };
    // invented counts: events 0 to 49 over populations of 1,000 to 1,006
    geo.features.forEach((f, i) => { f.properties.ev = (i * 7) % 50; f.properties.pop = 1000 + (i % 7); });
    const bytes = new TextEncoder().encode(JSON.stringify(geo));
    const run = (permutations?: number) => runAnalysis({
      boundary: [{ name: 'grid.geojson', bytes }], id: 'id', y: 'y', x: ['r'], weights: { method: 'rook' }, transform: 'row', models: ['ols'],
      ...(permutations === undefined ? {} : { permutations }), rates: { recipes: [parseRateRecipe('r=ev/pop', 1000)] },
    });
    const result = await run();
    const r = result.rates![0];
    expect(r.ebMoran.permutations).toBe(0);
    expect(r.ebMoran.permutationP).toBeUndefined();
    expect(r.permutationNote).toMatch(/No permutations were drawn: with 10,100 areas \(above 10,000\)/);
    const json = (resultToJson(result).rates as Record<string, { ebMoran: Record<string, unknown> }>).r;
    expect(json.ebMoran).toMatchObject({ permutations: 0, permutationP: null, note: r.permutationNote });
    expect(result.warnings.join(' ')).toMatch(/permutation test of Moran's I \(and of each rate's Moran's I\) was not run by default/);
    const sheet = JSON.stringify(buildReport(result).sheets.find((s) => s.name === 'Rates'));
    expect(sheet).toContain('No permutations were drawn: with 10,100 areas');
    // asked for, they are drawn
    const asked = await run(9);
    expect(asked.rates![0].ebMoran.permutationP).toBeGreaterThan(0);
    expect(asked.rates![0].permutationNote).toBeUndefined();
  }, 120_000);
});
