// Rates from counts and their smoothing. Sources beside each check:
// - identities: with equal populations the global empirical-Bayes rate (Marshall 1991) is the linear
//   shrinkage b + C(r − b) with one C for every area; an area with a very large population keeps its
//   raw rate to within its reliability (C → 1); the neighbourhood smoother of an area without
//   neighbours is its raw rate; Assunção & Reis (1999) with equal populations is Moran's I of the
//   raw rate (the standardisation is then one affine map);
// - the small-denominator rule (fewer than 20 events) is common practice; the relative standard error it
//   quotes is the Poisson identity RSE = 1/√d.
import { describe, expect, it } from 'vitest';
import { InputError } from '../src/errors.js';
import {
  ebGlobal, ebLocal, ebMoments, ebMoran, moranColumn, neighbourhoodRate, rateFlags, rateFromCounts, RATE_FLAG_RULE,
} from '../src/stats/index.js';
import { csrFromNeighbours, rookNeighbours } from './helpers/grid.js';

describe('rates from counts', () => {
  it('builds d/n and accepts zero events', () => {
    const r = rateFromCounts([0, 3, 10], [100, 300, 1000]);
    expect(Array.from(r.rate)).toEqual([0, 0.01, 0.01]);
  });
  it.each([
    [[null, 1], [10, 10], /Row 2: .*missing/],
    [[1, -1], [10, 10], /Row 3: .*negative/],
    [[1.5, 1], [10, 10], /Row 2: .*not a whole number/],
    [[11, 1], [10, 10], /Row 2: 11 events .*exceed/],
    [[1, 1], [10, 0], /Row 3: the population .* is 0/],
    [[1, 1], [-5, 10], /Row 2: the population .* is -5/],
  ])('rejects %j over %j', (d, n, message) => {
    expect(() => rateFromCounts(d as (number | null)[], n)).toThrow(InputError);
    expect(() => rateFromCounts(d as (number | null)[], n)).toThrow(message);
  });
  it('names the row the caller gives', () => {
    expect(() => rateFromCounts([1, -2], [5, 5], { rows: [7, 9], eventsName: 'cases' })).toThrow(/Row 9: the events count "cases"/);
  });
  it('names every bad row, not only the first, and counts the rest past ten', () => {
    const msg = (() => { try { rateFromCounts([1, -2, 3, 1.5, 9], [5, 5, 0, 5, 4], { eventsName: 'cases', populationName: 'people' }); } catch (e) { return (e as Error).message; } return ''; })();
    expect(msg).toMatch(/^4 rows cannot give a rate from "cases" and "people": row 3 \(events -2, below 0\), row 4 \(population 0\), row 5 \(events 1.5, not whole\), row 6 \(9 events above a population of 4\)\./);
    const many = Array.from({ length: 25 }, () => -1);
    const long = (() => { try { rateFromCounts(many, many.map(() => 10)); } catch (e) { return (e as Error).message; } return ''; })();
    expect(long).toMatch(/^25 rows .*row 11 \(events -1, below 0\), and 15 more \(rows 12, 13, .*, 26\)\./);
    expect(long).not.toMatch(/row 12 \(/);
  });
});

describe('small-denominator flag (common practice)', () => {
  it('flags fewer than 20 events and zero events', () => {
    expect(rateFlags([0, 5, 19, 20, 400])).toEqual([true, true, true, false, false]);
  });
  it('states the rule plainly, cites it as common practice, and its RSE figures hold (Poisson: RSE = 1/√d)', () => {
    expect(RATE_FLAG_RULE).toMatch(/^An area is flagged when its rate rests on fewer than 20 events/);
    expect(RATE_FLAG_RULE).toMatch(/common practice/);
    expect(1 / Math.sqrt(20)).toBeCloseTo(0.224, 3);
    // the 30 % line often quoted is crossed only below 12 events, inside the 20-event rule
    expect(1 / Math.sqrt(11)).toBeGreaterThan(0.3);
    expect(1 / Math.sqrt(12)).toBeLessThan(0.3);
  });
});

describe('global empirical Bayes (Marshall 1991)', () => {
  it('equal populations: one linear shrinkage towards the mean (identity)', () => {
    const d = [2, 5, 9, 14, 3, 7, 11, 20];
    const n = d.map(() => 200);
    const g = ebGlobal(d, n);
    const mean = d.reduce((s, x) => s + x, 0) / (200 * d.length);
    expect(g.b).toBeCloseTo(mean, 15);
    const c = g.weight[0];
    expect(c).toBeGreaterThan(0);
    expect(c).toBeLessThan(1);
    for (let i = 0; i < d.length; i++) {
      expect(g.weight[i]).toBe(c);
      expect(g.rate[i]).toBeCloseTo(mean + c * (d[i] / 200 - mean), 15);
    }
  });
  it('a very large population keeps its raw rate to within its reliability (identity)', () => {
    const d = [1, 4, 0, 6, 2, 150000];
    const n = [100, 120, 90, 110, 80, 1e7];
    const g = ebGlobal(d, n);
    const raw = d[5] / n[5];
    expect(g.weight[5]).toBeGreaterThan(0.9);
    expect(Math.abs(g.rate[5] - raw)).toBeCloseTo((1 - g.weight[5]) * Math.abs(raw - g.b), 15);
    // small areas move most
    for (let i = 0; i < 5; i++) expect(g.weight[i]).toBeLessThan(g.weight[5]);
  });
  it('sets a negative between-area variance to zero and says so', () => {
    const m = ebMoments([10, 10, 10, 10], [1000, 1000, 1000, 1000]);
    expect(m.clipped).toBe(true);
    expect(m.a).toBe(0);
    const g = ebGlobal([10, 10, 10, 10], [1000, 1000, 1000, 1000]);
    expect(Array.from(g.weight)).toEqual([0, 0, 0, 0]);
  });
});

describe('local empirical Bayes and the neighbourhood smoother', () => {
  const w = csrFromNeighbours(rookNeighbours(3, 3), 'row');
  const d = [1, 4, 30, 2, 8, 15, 0, 6, 40];
  const n = [100, 400, 900, 150, 500, 800, 80, 300, 1200];
  it('neighbourhood rate pools events and populations over the area and its neighbours', () => {
    const s = neighbourhoodRate(d, n, w);
    // area 0 (corner): itself, 1 and 3
    expect(s[0]).toBeCloseTo((1 + 4 + 2) / (100 + 400 + 150), 15);
    // area 4 (centre): itself and 1, 3, 5, 7
    expect(s[4]).toBeCloseTo((8 + 4 + 2 + 15 + 6) / (500 + 400 + 150 + 800 + 300), 15);
  });
  it('local EB of an area uses the moments of its own neighbourhood', () => {
    const l = ebLocal(d, n, w);
    const m = ebMoments(d, n, [4, 1, 3, 5, 7]);
    const c = m.a > 0 ? m.a / (m.a + m.b / n[4]) : 0;
    expect(l.rate[4]).toBeCloseTo(m.b + c * (d[4] / n[4] - m.b), 15);
  });
  it('an area without neighbours keeps its raw rate under the neighbourhood smoother', () => {
    const isolated = csrFromNeighbours(d.map(() => []), 'binary');
    expect(Array.from(neighbourhoodRate(d, n, isolated))).toEqual(d.map((x, i) => x / n[i]));
  });
});

describe('rate-adjusted Moran\'s I (Assunção & Reis 1999)', () => {
  const w = csrFromNeighbours(rookNeighbours(4, 4), 'row');
  const d = [3, 5, 8, 12, 4, 6, 9, 14, 5, 7, 11, 15, 6, 9, 13, 18];
  it('with equal populations equals Moran\'s I of the raw rate (identity)', () => {
    const n = d.map(() => 1000);
    const t = ebMoran(d, n, w, { permutations: 199, seed: 5 });
    const raw = moranColumn(Float64Array.from(d, (x) => x / 1000), w);
    expect(t.I).toBeCloseTo(raw.I, 12);
  });
  it('is seeded: the same seed gives the same permutation p', () => {
    const n = d.map((_, i) => 200 + 100 * i);
    const a = ebMoran(d, n, w, { permutations: 199, seed: 11 });
    const b = ebMoran(d, n, w, { permutations: 199, seed: 11 });
    expect(a.permutationP).toBe(b.permutationP);
    expect(a.permutationP!).toBeGreaterThan(0);
    expect(a.permutationP!).toBeLessThanOrEqual(1);
  });
});
