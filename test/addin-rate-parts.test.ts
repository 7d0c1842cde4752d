// The sidebar's warning when an explanatory column is one of the counts the outcome is made from.
// Checked on the North Carolina counties (test/fixtures/sids, r-cran-spdata, CC0): a sudden-infant-death
// rate per 1000 births built from the file's own counts, SID74 / BIR74, rounded as a published table
// would round it. The arithmetic of the rate is the definition of a rate (events / population × K).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readBoundary } from '../src/geo/index.js';
import { nameWords, rateParts } from '../addin/shared/rate-parts.js';
import type { TableSnapshot } from '../addin/shared/types.js';
import { parseRateRecipe, runAnalysis } from '../src/pipeline/index.js';

async function counties(decimalsOfRate: number): Promise<TableSnapshot> {
  const files = ['sids.shp', 'sids.dbf', 'sids.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(new URL(`./fixtures/sids/${name}`, import.meta.url))) }));
  const layer = await readBoundary(files);
  const headers = ['FIPS', 'NAME', 'BIR74', 'SID74', 'NWBIR74', 'sids_per_1000', 'east'];
  const rows = layer.areas.map((a) => {
    const p = a.properties as Record<string, number | string>;
    const rate = Number(((1000 * Number(p.SID74)) / Number(p.BIR74)).toFixed(decimalsOfRate));
    return [p.FIPS, p.NAME, Number(p.BIR74), Number(p.SID74), Number(p.NWBIR74), rate, Number(p.east)];
  });
  return { sheet: 'Counties', headerRow: 1, firstColumn: 1, headers, rows, rowNumbers: rows.map((_, i) => i + 2) };
}

const NUMERIC = ['BIR74', 'SID74', 'NWBIR74', 'sids_per_1000', 'east'];

describe('explanatory columns that make up the outcome', () => {
  it('finds the numerator and the denominator of a rate per 1000 by their values (rate rounded to 2 decimals)', async () => {
    const t = await counties(2);
    const found = rateParts(t, 'sids_per_1000', ['BIR74', 'SID74', 'NWBIR74', 'east'], NUMERIC);
    expect(found.map((f) => [f.column, f.role])).toEqual([['BIR74', 'denominator'], ['SID74', 'numerator']]);
    expect(found[0].evidence).toMatch(/^sids_per_1000 = 1000 × SID74 \/ BIR74 in \d+ of 100 rows$/);
  });

  it('still finds them when the rate is rounded to one decimal', async () => {
    const t = await counties(1);
    expect(rateParts(t, 'sids_per_1000', ['BIR74', 'SID74'], NUMERIC).map((f) => f.role)).toEqual(['denominator', 'numerator']);
  });

  it('says nothing of columns unrelated to the rate (non-white births, an easting)', async () => {
    const t = await counties(2);
    expect(rateParts(t, 'sids_per_1000', ['NWBIR74', 'east'], NUMERIC)).toEqual([]);
  });

  it('falls back to the names when the other count is not in the table', () => {
    const t: TableSnapshot = {
      sheet: 'S', headerRow: 1, firstColumn: 1, headers: ['code', 'lbw_pct', 'lbw_births', 'clinics', 'median_income'],
      rows: [['a', 6.1, 40, 3, 41000], ['b', 7.3, 55, 1, 38000], ['c', 5.2, 31, 2, 45500], ['d', 8.8, 72, 0, 36100], ['e', 6.6, 48, 4, 39900], ['f', 7.0, 50, 2, 40200]],
      rowNumbers: [2, 3, 4, 5, 6, 7],
    };
    const found = rateParts(t, 'lbw_pct', ['lbw_births', 'clinics', 'median_income'], ['lbw_pct', 'lbw_births', 'clinics', 'median_income']);
    expect(found).toEqual([{ column: 'lbw_births', role: 'either', evidence: 'lbw_pct is named as a rate and lbw_births is a count of the same thing ("lbw")' }]);
  });

  it('splits names into words (snake case, camel case, trailing digits)', () => {
    expect(nameWords('birthRate_1000')).toEqual(['birth', 'rate', '1000']);
    expect(nameWords('SID74')).toEqual(['sid', '74']);
  });
});

// The check lives in the engine (src/pipeline/rate-parts.ts): every run, whatever its front end,
// carries the finding in its warnings, and the command line prints it.
describe('every run warns, not only the sidebar', () => {
  async function csv(): Promise<{ name: string; bytes: Uint8Array }> {
    const t = await counties(2);
    const lines = [t.headers.join(','), ...t.rows.map((r) => r.map((c) => (typeof c === 'string' && c.includes(',') ? `"${c}"` : String(c))).join(','))];
    return { name: 'counties.csv', bytes: new TextEncoder().encode(lines.join('\n')) };
  }
  const boundary = ['sids.shp', 'sids.dbf', 'sids.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(new URL(`./fixtures/sids/${name}`, import.meta.url))) }));

  it('a rate column explained by its own denominator: the run names the column and the formula found in the values', async () => {
    const r = await runAnalysis({
      boundary, data: await csv(), id: 'FIPS', y: 'sids_per_1000', x: ['BIR74', 'east'],
      weights: { method: 'queen' }, transform: 'row', models: ['ols'], permutations: 0,
    });
    const found = r.warnings.filter((w) => /looks like the/.test(w));
    expect(found).toHaveLength(1);
    expect(found[0]).toMatch(/^BIR74 looks like the denominator of the rate sids_per_1000 \(sids_per_1000 = 1000 × SID74 \/ BIR74 in \d+ of 100 rows\)/);
  });

  it('a rate built by the request (--rate) explained by its own events column: known, not guessed', async () => {
    const r = await runAnalysis({
      boundary, id: 'FIPS', y: 'sids', x: ['SID74', 'east'], rates: { recipes: [parseRateRecipe('sids=SID74/BIR74')] },
      weights: { method: 'queen' }, transform: 'row', models: ['ols'], permutations: 0,
    });
    expect(r.warnings.filter((w) => /looks like the/.test(w))).toEqual([expect.stringMatching(/^SID74 looks like the numerator of the rate sids \(sids is built as SID74 per 1,000 BIR74\)/)]);
  });

  it('says nothing when no explanatory column is one of the rate’s counts', async () => {
    const r = await runAnalysis({
      boundary, data: await csv(), id: 'FIPS', y: 'sids_per_1000', x: ['NWBIR74', 'east'],
      weights: { method: 'queen' }, transform: 'row', models: ['ols'], permutations: 0,
    });
    expect(r.warnings.some((w) => /looks like the/.test(w))).toBe(false);
  });
});
