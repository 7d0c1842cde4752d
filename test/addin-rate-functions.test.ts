// The rate cell functions (RATEGLOBAL, RATELOCAL, RATEMORAN) on the North Carolina counties
// (test/fixtures/sids, Debian's r-cran-spdata, CC0: events SID74, population BIR74) against the
// independent numpy reference test/golden/rates.json (scripts/reference/rates.py, queen contiguity).
// The neighbour range is the queen list as the sidebar's "Neighbours" sheet would hold it.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { globalRateRows, localRateRows, rateMoranRow } from '../addin/functions/rate-logic.js';
import type { Grid } from '../addin/functions/logic.js';
import { readBoundary } from '../src/geo/index.js';
import { buildWeights } from '../src/weights/index.js';
import { InputError } from '../src/errors.js';

const golden = JSON.parse(readFileSync(new URL('./golden/rates.json', import.meta.url), 'utf8'));
const fixture = (p: string) => ({ name: p, bytes: new Uint8Array(readFileSync(new URL(`./fixtures/sids/${p}`, import.meta.url))) });

async function ranges() {
  const layer = await readBoundary([fixture('sids.shp'), fixture('sids.dbf'), fixture('sids.shx')], {});
  const prop = (i: number, k: string) => (layer.areas[i].properties as Record<string, unknown>)[k];
  const idList = layer.areas.map((_, i) => String(prop(i, 'FIPS')));
  const w = buildWeights({ ids: idList, geometries: layer.areas.map((a) => a.geometry!), coordinates: layer.coordinates }, { method: 'queen' }, { transform: 'binary' });
  const links: Grid = [['origin', 'neighbour', 'weight']];
  for (let i = 0; i < w.n; i++) for (let k = w.rowPtr[i]; k < w.rowPtr[i + 1]; k++) links.push([idList[i], idList[w.colIdx[k]], 1]);
  return {
    ids: [['FIPS'], ...idList.map((id) => [id])] as Grid,
    events: [['SID74'], ...idList.map((_, i) => [Number(prop(i, 'SID74'))])] as Grid,
    population: [['BIR74'], ...idList.map((_, i) => [Number(prop(i, 'BIR74'))])] as Grid,
    links,
  };
}

const rel = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-10 * Math.abs(b));

describe('rate cell functions on the North Carolina counties', async () => {
  const r = await ranges();
  it('the ranges follow the reference’s county order', () => {
    expect(r.ids.slice(1).map((c) => c[0])).toEqual(golden.ids);
  });

  it('RATEGLOBAL spills the global empirical-Bayes rate per area (per 1,000 by default) to 1e-10 relative', () => {
    const rows = globalRateRows(r.events, r.population);
    expect(rows).toHaveLength(100);
    rows.forEach((row, i) => rel(row[0] as number, golden.ebGlobal[i] * 1000));
    const detail = globalRateRows(r.events, r.population, { per: 100000, detail: true });
    const sum = (g: Grid) => g.slice(1).reduce((a, c) => a + (c[0] as number), 0);
    const overall = (100000 * sum(r.events)) / sum(r.population);
    detail.forEach((row, i) => {
      rel(row[1] as number, golden.ebGlobal[i] * 100000);
      rel(row[2] as number, golden.ebGlobalWeight[i]);
      // identity (Marshall 1991): smoothed = overall + weight × (raw − overall), overall = Σ events / Σ population
      const [raw, smoothed, weight] = row as number[];
      expect(Math.abs(smoothed - (overall + weight * (raw - overall)))).toBeLessThan(1e-9 * overall);
      expect(row[3]).toBe((r.events[i + 1][0] as number) < 20 ? 'few events' : '');
    });
  });

  it('RATELOCAL spills the local empirical-Bayes rate per area to 1e-10 relative', () => {
    const rows = localRateRows(r.events, r.population, r.ids, r.links, { per: 1 });
    rows.forEach((row, i) => rel(row[0] as number, golden.ebLocal[i]));
  });

  it('RATEMORAN gives the rate-adjusted Moran’s I of the reference (row-standardised) and a permutation p with detail', () => {
    rel(rateMoranRow(r.events, r.population, r.ids, r.links, false, 999, 1, { rowStandardise: true })[0][0] as number, golden.ebMoranI);
    const [row] = rateMoranRow(r.events, r.population, r.ids, r.links, true, 99, 3, { rowStandardise: true });
    rel(row[0] as number, golden.ebMoranI);
    expect(row[3] as number).toBeGreaterThan(0);
    expect(row[3] as number).toBeLessThanOrEqual(1);
    // the same seed gives the same p
    expect(rateMoranRow(r.events, r.population, r.ids, r.links, true, 99, 3, { rowStandardise: true })[0][3]).toBe(row[3]);
  });

  it('refuses bad counts naming the cell, and a multiplier it does not offer', () => {
    const bad = r.events.map((c) => [...c]);
    bad[4][0] = 2.5;
    expect(() => globalRateRows(bad, r.population)).toThrow(InputError);
    expect(() => globalRateRows(bad, r.population)).toThrow(/^Cell 5 of the ranges: the events count "events" is 2.5, not a whole number/);
    const over = r.events.map((c) => [...c]);
    over[3][0] = 1e7;
    expect(() => localRateRows(over, r.population, r.ids, r.links)).toThrow(/^Cell 4 of the ranges: 10000000 events/);
    // every bad cell is named, not only the first
    const two = r.events.map((c) => [...c]);
    two[1][0] = -1;
    two[6][0] = 0.5;
    expect(() => globalRateRows(two, r.population)).toThrow(/^2 cells of the ranges cannot give a rate from "events" and "population": cell 2 \(events -1, below 0\), cell 7 \(events 0.5, not whole\)\./);
    expect(() => globalRateRows(r.events, r.population, { per: 10 })).toThrow(/per 1, 100, 1000 or 100000/);
  });
});
