// The cell functions. Sources: Moran's I (Moran 1950) and Geary's C (Geary 1954) worked by hand on a
// four-area path; the Columbus data (Anselin 1988) with queen links from the independent numpy
// reference in test/golden; brute-force double sums over the definitions; local Moran (Anselin 1995).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../src/errors.js';
import { readBoundary } from '../src/geo/index.js';
import { moranColumn } from '../src/stats/index.js';
import { buildWeights } from '../src/weights/index.js';
import {
  gearyOfRange, lagOfRange, localMoranOfRange, moranOfRange, moranPermutationP, readColumns, weightsFromRange, type Grid,
} from '../addin/functions/logic.js';
import * as cellFunctions from '../addin/functions/functions.js';

const ROOT = join(import.meta.dirname, '..');
const column = (xs: (string | number | null)[]): Grid => xs.map((x) => [x]);

/** A path of four areas A–B–C–D, every link weight 1, both directions. */
const PATH_IDS = column(['A', 'B', 'C', 'D']);
const PATH_LINKS: Grid = [
  ['origin', 'neighbour', 'weight'],
  ['A', 'B', 1], ['B', 'A', 1], ['B', 'C', 1], ['C', 'B', 1], ['C', 'D', 1], ['D', 'C', 1],
];
const PATH_VALUES = column([1, 2, 3, 4]);

describe('cell functions on a hand-worked four-area path', () => {
  // Worked by hand from the definitions. z = (−1.5, −0.5, 0.5, 1.5), Σz² = 5, S₀ = 6,
  // Σ w_ij z_i z_j = 2(0.75 − 0.25 + 0.75) = 2.5.
  it("Moran's I = (n/S₀)·2.5/5 = 1/3 (Moran 1950 definition) with E[I] = −1/(n − 1)", () => {
    expect(moranOfRange(PATH_VALUES, PATH_IDS, PATH_LINKS)[0][0]).toBeCloseTo(1 / 3, 12);
    const [row] = moranOfRange(PATH_VALUES, PATH_IDS, PATH_LINKS, true);
    expect(row).toHaveLength(4);
    expect(row[1]).toBeCloseTo(-1 / 3, 12);
  });

  it("Geary's C = (n − 1)Σw(x_i − x_j)²/(2S₀Σz²) = 3·6/60 = 0.3 (Geary 1954 definition)", () => {
    expect(gearyOfRange(PATH_VALUES, PATH_IDS, PATH_LINKS)[0][0]).toBeCloseTo(0.3, 12);
  });

  it('spatial lag with rows rescaled to sum to 1 is the neighbours’ mean: 2, 2, 3, 3 (definition of Wy)', () => {
    expect(lagOfRange(PATH_VALUES, PATH_IDS, PATH_LINKS, { rowStandardise: true })).toEqual([[2], [2], [3], [3]]);
    // weights as listed (binary): the neighbours' sum
    expect(lagOfRange(PATH_VALUES, PATH_IDS, PATH_LINKS)).toEqual([[2], [4], [6], [3]]);
  });

  it('reads a header row in the value and ID ranges and IDs given as numbers', () => {
    const values = column(['score', 1, 2, 3, 4]);
    const ids = column(['code', 11, 12, 13, 14]);
    const links: Grid = [[11, 12, 1], [12, 11, 1], [12, 13, 1], [13, 12, 1], [13, 14, 1], [14, 13, 1]];
    expect(moranOfRange(values, ids, links)[0][0]).toBeCloseTo(1 / 3, 12);
    expect(readColumns(values, ids).ids).toEqual(['11', '12', '13', '14']);
  });

  it('names the cell at fault', () => {
    const bad = column([1, 2, null, 4]);
    expect(() => moranOfRange(bad, PATH_IDS, PATH_LINKS)).toThrow(InputError);
    expect(() => moranOfRange(bad, PATH_IDS, PATH_LINKS)).toThrow(/Cell 3 of the values range is empty/);
    expect(() => moranOfRange(PATH_VALUES, column(['A', 'B', 'B', 'D']), PATH_LINKS)).toThrow(/ID B appears twice.*cells 2 and 3/);
    expect(() => moranOfRange(PATH_VALUES, PATH_IDS, [...PATH_LINKS, ['A', 'Z', 1]])).toThrow(/line 8.*Z is not one of the areas/);
    expect(() => moranOfRange(column([1, 2, 3]), PATH_IDS, PATH_LINKS)).toThrow(/3 cells but the ID range has 4/);
  });

  it('the exported wrappers give the same numbers and throw plain errors outside Excel', () => {
    expect(cellFunctions.moran(PATH_VALUES, PATH_IDS, PATH_LINKS)[0][0]).toBeCloseTo(1 / 3, 12);
    expect(cellFunctions.geary(PATH_VALUES, PATH_IDS, PATH_LINKS)[0][0]).toBeCloseTo(0.3, 12);
    expect(() => cellFunctions.lag(column([1, 2]), PATH_IDS, PATH_LINKS)).toThrow(/2 cells/);
  });
});

describe('cell functions on the Columbus neighbourhoods (Anselin 1988, 49 areas)', async () => {
  const dir = join(ROOT, 'test/fixtures/columbus');
  const files = ['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(dir, name))) }));
  const layer = await readBoundary(files);
  const ids = layer.areas.map((a) => String(a.properties.POLYID));
  const crime = Float64Array.from(layer.areas.map((a) => Number(a.properties.CRIME)));
  // Queen neighbours from the independent numpy reference (scripts/reference/columbus.py → test/golden).
  const golden = JSON.parse(readFileSync(join(ROOT, 'test/golden/columbus.json'), 'utf8')) as { weights: { neighbours: number[][] } };
  const links: Grid = [['origin', 'neighbour', 'weight']];
  golden.weights.neighbours.forEach((nb, i) => nb.forEach((j) => links.push([ids[i], ids[j], 1 / nb.length])));
  const idRange = column(['POLYID', ...ids]);
  const valueRange = column(['CRIME', ...Array.from(crime)]);

  it("Moran's I of CRIME from the cell ranges equals the engine's moranColumn on weights built from the shapes", () => {
    const w = buildWeights({ ids, geometries: layer.areas.map((a) => a.geometry!), coordinates: layer.coordinates }, { method: 'queen' }, { transform: 'row' });
    const engine = moranColumn(crime, w);
    const [row] = moranOfRange(valueRange, idRange, links, true);
    expect(row[0]).toBeCloseTo(engine.I, 12);
    expect(row[2]).toBeCloseTo(engine.z, 10);
    expect(row[3]).toBeCloseTo(engine.p, 10);
    // Widely published Moran's I of CRIME, queen, row-standardised: 0.500188 (recalled from memory).
    expect(row[0]).toBeCloseTo(0.500188, 5);
  });

  it("Moran's I equals a brute-force double sum over the definition", () => {
    const n = crime.length;
    const mean = crime.reduce((s, x) => s + x, 0) / n;
    let num = 0, den = 0, s0 = 0;
    golden.weights.neighbours.forEach((nb, i) => nb.forEach((j) => { num += (crime[i] - mean) * (crime[j] - mean) / nb.length; s0 += 1 / nb.length; }));
    for (const x of crime) den += (x - mean) ** 2;
    expect(moranOfRange(valueRange, idRange, links)[0][0]).toBeCloseTo((n / s0) * (num / den), 12);
  });

  it('the mean of the local Moran values equals global I with row-standardised weights (Anselin 1995, eq. 7 and after)', () => {
    const local = localMoranOfRange(valueRange, idRange, links).map((r) => r[0]);
    expect(local).toHaveLength(49);
    const mean = local.reduce((s, x) => s + x, 0) / local.length;
    expect(mean).toBeCloseTo(moranOfRange(valueRange, idRange, links)[0][0], 12);
  });

  it('the permutation p-value is repeatable with a seed, lies in (0, 1], and is small for this clustered outcome', () => {
    const a = moranPermutationP(valueRange, idRange, links, 199, 7);
    const b = moranPermutationP(valueRange, idRange, links, 199, 7);
    expect(a).toBe(b);
    expect(a).toBeGreaterThan(0);
    // z ≈ 5.6 under randomisation, so hardly any of 199 reshufflings reach it: p = (1 + #)/(1 + R) stays near its floor.
    expect(a).toBeLessThan(0.02);
    expect(() => moranPermutationP(valueRange, idRange, links, 0)).toThrow(/between 1 and 100000/);
  });

  it('the neighbour range reader keeps the listed weights (they already sum to 1 per area)', () => {
    const w = weightsFromRange(ids, links);
    expect(w.n).toBe(49);
    expect(w.colIdx.length).toBe(236); // 236 queen links (test/golden, numpy reference)
  });
});
