// Local statistics: local Moran's I_i, Getis–Ord G_i and G_i*, conditional permutation inference and
// multiple-testing control. Sources beside each check:
// - test/golden/local.json from scripts/reference/local.py (numpy, hand-written readers; moments
//   also verified there by enumerating every permutation of a 7-area example), on Columbus and on the
//   North Carolina counties file (both from Debian's r-cran-spdata, CC0);
// - identities: Σ I_i / S₀ = global I (Anselin 1995); checkerboard categories; exact moments over all
//   n! permutations;
// - the Benjamini–Hochberg step-up rule applied directly (Benjamini & Hochberg 1995).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readBoundary } from '../src/geo/index.js';
import { buildWeights } from '../src/weights/index.js';
import {
  controlMultipleTests, getisOrd, localMoranCategories, localMoranTest, moranColumn,
} from '../src/stats/index.js';
import { csrFromNeighbours, rookNeighbours } from './helpers/grid.js';

const golden = JSON.parse(readFileSync(new URL('./golden/local.json', import.meta.url), 'utf8'));
const fixture = (p: string) => ({ name: p.split('/').pop()!, bytes: new Uint8Array(readFileSync(new URL(`./fixtures/${p}`, import.meta.url))) });

async function queenOf(dir: string, name: string) {
  const layer = await readBoundary([fixture(`${dir}/${name}.shp`), fixture(`${dir}/${name}.dbf`), fixture(`${dir}/${name}.shx`)], {});
  const ids = layer.areas.map((_, i) => String(i));
  const w = buildWeights({ ids, geometries: layer.areas.map((a) => a.geometry!), coordinates: layer.coordinates }, { method: 'queen' }, { transform: 'row' });
  return { layer, w };
}

function close(actual: ArrayLike<number>, expected: number[], relative: number): void {
  expect(actual.length).toBe(expected.length);
  for (let i = 0; i < expected.length; i++) {
    const scale = Math.max(Math.abs(expected[i]), 1e-12);
    expect(Math.abs(actual[i] - expected[i]) / scale, `area ${i + 1}: ${actual[i]} vs ${expected[i]}`).toBeLessThan(relative);
  }
}

/** The engine's pseudo p within Monte Carlo error of the reference's 200,000-draw estimate. */
function withinMonteCarlo(actual: ArrayLike<number>, expected: number[], draws: number, refDraws: number): void {
  for (let i = 0; i < expected.length; i++) {
    const p = expected[i];
    const se = Math.sqrt((p * (1 - p)) / draws + (p * (1 - p)) / refDraws) + 1 / draws;
    expect(Math.abs(actual[i] - p), `area ${i + 1}: ${actual[i]} vs ${p}`).toBeLessThan(4.5 * se);
  }
}

for (const [key, dir, name, variable] of [
  ['columbus', 'columbus', 'columbus', (r: any) => Number(r.CRIME)],
  ['sids', 'sids', 'sids', (r: any) => (1000 * Number(r.SID79)) / Number(r.BIR79)],
] as const) {
  describe(`local statistics on ${key} against the numpy reference`, () => {
    const g = golden[key];
    const setup = async () => {
      const { layer, w } = await queenOf(dir, name);
      const x = Float64Array.from(layer.areas, (f) => variable(f.properties));
      return { w, x };
    };

    it('has the reference neighbour links (queen, shared vertex)', async () => {
      const { w } = await setup();
      expect(w.rowPtr[w.n]).toBe(g.links);
    });

    it('local Moran I_i, E[I_i], Var[I_i] and z to 1e-8 relative; permutation p within Monte Carlo error', async () => {
      const { w, x } = await setup();
      const r = localMoranTest(x, w, { permutations: 9999, seed: 7 });
      close(r.value, g.moran.value, 1e-8);
      close(r.expected, g.moran.expected, 1e-8);
      close(r.variance, g.moran.variance, 1e-8);
      close(r.z, g.moran.z, 1e-8);
      withinMonteCarlo(r.pPermutation!, g.moran.pPermutation, 9999, golden.draws);
    });

    it('G_i and G_i* with moments to 1e-8 relative; permutation p within Monte Carlo error', async () => {
      const { w, x } = await setup();
      const gi = getisOrd(x, w, { permutations: 9999, seed: 7 });
      close(gi.value, g.gi.value, 1e-8);
      close(gi.expected, g.gi.expected, 1e-8);
      close(gi.variance, g.gi.variance, 1e-8);
      close(gi.z, g.gi.z, 1e-8);
      withinMonteCarlo(gi.pPermutation!, g.gi.pPermutation, 9999, golden.draws);
      const star = getisOrd(x, w, { star: true, permutations: 9999, seed: 7 });
      close(star.value, g.gistar.value, 1e-8);
      close(star.variance, g.gistar.variance, 1e-8);
      close(star.z, g.gistar.z, 1e-8);
      withinMonteCarlo(star.pPermutation!, g.gistar.pPermutation, 9999, golden.draws);
    });

    it('identity: Σ I_i / S₀ equals the global Moran I (Anselin 1995)', async () => {
      const { w, x } = await setup();
      const r = localMoranTest(x, w);
      const s0 = w.values.reduce((a, b) => a + b, 0);
      expect(r.value.reduce((a, b) => a + b, 0) / s0).toBeCloseTo(moranColumn(x, w).I, 12);
    });
  });
}

describe('local statistics, identities and rules', () => {
  it('on a ±1 checkerboard every area is high among low or low among high', () => {
    const rows = 6;
    const cols = 6;
    const v = Float64Array.from({ length: rows * cols }, (_, i) => ((Math.floor(i / cols) + (i % cols)) % 2 ? 1 : -1));
    const w = csrFromNeighbours(rookNeighbours(rows, cols), 'row');
    const cats = localMoranCategories(v, w, new Array(rows * cols).fill(true));
    cats.forEach((c, i) => expect(c).toBe(v[i] > 0 ? 'high-low' : 'low-high'));
  });

  it('permutation p is the same for the same seed, lies in [1/(R+1), 1], and reacts to the seed', () => {
    const w = csrFromNeighbours(rookNeighbours(5, 5), 'row');
    const v = Float64Array.from({ length: 25 }, (_, i) => Math.sin(i * 1.7) + (i % 5) / 3);
    const a = localMoranTest(v, w, { permutations: 199, seed: 3 }).pPermutation!;
    const b = localMoranTest(v, w, { permutations: 199, seed: 3 }).pPermutation!;
    const c = localMoranTest(v, w, { permutations: 199, seed: 4 }).pPermutation!;
    expect(Array.from(a)).toEqual(Array.from(b));
    expect(Array.from(a)).not.toEqual(Array.from(c));
    for (const p of a) expect(p >= 1 / 200 && p <= 1).toBe(true);
  });

  it('Benjamini–Hochberg decisions equal a direct application of the step-up rule', () => {
    // the published rule (Benjamini & Hochberg 1995): reject the k smallest, k = max{i : p(i) ≤ i q/m}
    const p = [0.001, 0.008, 0.039, 0.041, 0.042, 0.06, 0.074, 0.205, 0.212, 0.216, NaN, 0.5, 0.9];
    const { significant, tests } = controlMultipleTests(p, { method: 'fdr', level: 0.05 });
    const finite = p.map((x, i) => [x, i] as const).filter(([x]) => Number.isFinite(x)).sort((a, b) => a[0] - b[0]);
    const m = finite.length;
    let k = 0;
    finite.forEach(([x], r) => { if (x <= ((r + 1) * 0.05) / m) k = r + 1; });
    const expected = new Array(p.length).fill(false);
    finite.slice(0, k).forEach(([, i]) => { expected[i] = true; });
    expect(tests).toBe(12);
    expect(significant).toEqual(expected);
    expect(controlMultipleTests(p, { method: 'bonferroni', level: 0.05 }).significant.filter(Boolean).length).toBe(1);
    expect(controlMultipleTests(p, { method: 'none', level: 0.05 }).significant.filter(Boolean).length).toBe(5);
  });

  it('the bivariate form with the same column on both sides equals the univariate statistic (identity)', () => {
    const w = csrFromNeighbours(rookNeighbours(4, 5), 'row');
    const v = Float64Array.from({ length: 20 }, (_, i) => Math.cos(i) * 3 + i / 4);
    const one = localMoranTest(v, w);
    const two = localMoranTest(v, w, { neighbourValues: Float64Array.from(v) });
    one.value.forEach((x, i) => expect(two.value[i]).toBeCloseTo(x, 12));
  });

  it('an area without neighbours gets no statistic and no category', () => {
    const nb = [[1], [0, 2], [1], []];
    const w = csrFromNeighbours(nb, 'row');
    const r = localMoranTest(Float64Array.from([1, 2, 5, 3]), w, { permutations: 99 });
    expect(Number.isNaN(r.z[3])).toBe(true);
    expect(Number.isNaN(r.pPermutation![3])).toBe(true);
    expect(localMoranCategories(Float64Array.from([1, 2, 5, 3]), w, [true, true, true, false])[3]).toBe('no-neighbours');
  });

  it('Getis–Ord refuses negative values, naming the area', () => {
    const w = csrFromNeighbours(rookNeighbours(2, 2), 'row');
    expect(() => getisOrd(Float64Array.from([1, -2, 3, 4]), w)).toThrow(/area 2/);
  });
});
