// Neighbour ranges built in cells (issue 16): from coordinate columns, and by shared borders from the
// boundary file kept in the workbook. Sources: the Columbus queen and 4-nearest neighbours of the
// independent numpy reference (test/golden/columbus.json, scripts/reference/columbus.py), and brute-force
// distances over all pairs for the distance band and inverse distance.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readBoundary, representativePoints } from '../src/geo/index.js';
import { contiguityRows, neighbourRowsFromPoints } from '../addin/functions/neighbour-logic.js';
import { moranOfRange, type Grid } from '../addin/functions/logic.js';
import { readGolden } from './helpers/columbus.js';

const ROOT = join(import.meta.dirname, '..');
const golden = readGolden();
const files = ['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(ROOT, 'test/fixtures/columbus', name))) }));

async function columbus() {
  const layer = await readBoundary(files);
  const ids = layer.areas.map((a) => String(a.properties.POLYID));
  const pts = representativePoints(layer.areas.map((a) => a.geometry!));
  const column = (head: string, xs: ArrayLike<number | string>): Grid => [[head], ...Array.from(xs, (v) => [v])];
  return { layer, ids, idRange: column('POLYID', ids), x: column('x', pts.x), y: column('y', pts.y), crime: column('CRIME', layer.areas.map((a) => Number(a.properties.CRIME))), pts };
}

/** Neighbour sets per area (as positions) from spilled rows. */
function sets(rows: (string | number)[][], ids: string[]): number[][] {
  const at = new Map(ids.map((id, i) => [id, i]));
  const out: number[][] = ids.map(() => []);
  for (const [o, d] of rows.slice(1)) out[at.get(String(o))!].push(at.get(String(d))!);
  return out.map((s) => s.sort((a, b) => a - b));
}

describe('SPILL.NEIGHBOURS: neighbours from coordinate columns', () => {
  it('4 nearest by the area-weighted centroids equal the numpy reference, weights summing to 1 per area', async () => {
    const c = await columbus();
    const rows = neighbourRowsFromPoints(c.idRange, c.x, c.y, 'nearest', 4);
    expect(rows[0]).toEqual(['origin', 'neighbour', 'weight']);
    expect(rows).toHaveLength(1 + 196);
    expect(sets(rows, c.ids)).toEqual(golden.knn4.weights.neighbours);
    for (const r of rows.slice(1)) expect(r[2]).toBeCloseTo(0.25, 15);
  });

  it('its output feeds MORAN, which gives the same figure as on the reference’s 4-nearest list', async () => {
    const c = await columbus();
    const rows = neighbourRowsFromPoints(c.idRange, c.x, c.y, 'nearest', 4);
    const direct: Grid = [['origin', 'neighbour', 'weight']];
    (golden.knn4.weights.neighbours as number[][]).forEach((nb, i) => nb.forEach((j) => direct.push([c.ids[i], c.ids[j], 0.25])));
    expect(moranOfRange(c.crime, c.idRange, rows)[0][0]).toBeCloseTo(moranOfRange(c.crime, c.idRange, direct)[0][0], 14);
  });

  it('a distance band links exactly the pairs within the distance (brute force over all pairs); "binary" weighs each link 1', async () => {
    const c = await columbus();
    const rows = neighbourRowsFromPoints(c.idRange, c.x, c.y, 'within', 1.2, 'binary');
    const expected = c.ids.map((_, i) => c.ids.map((__, j) => j).filter((j) => j !== i && Math.hypot(c.pts.x[i] - c.pts.x[j], c.pts.y[i] - c.pts.y[j]) <= 1.2));
    expect(sets(rows, c.ids)).toEqual(expected);
    for (const r of rows.slice(1)) expect(r[2]).toBe(1);
  });

  it('inverse distance with a cutoff gives weights proportional to 1/d², each area’s summing to 1 (brute force)', async () => {
    const c = await columbus();
    const rows = neighbourRowsFromPoints(c.idRange, c.x, c.y, 'inverse', 2, 'cutoff=1.5');
    const at = new Map(c.ids.map((id, i) => [id, i]));
    const raw = (i: number, j: number) => Math.hypot(c.pts.x[i] - c.pts.x[j], c.pts.y[i] - c.pts.y[j]) ** -2;
    const sums = c.ids.map((_, i) => c.ids.reduce((s, __, j) => (j !== i && raw(i, j) ** -0.5 <= 1.5 ? s + raw(i, j) : s), 0));
    for (const [o, d, w] of rows.slice(1)) {
      const i = at.get(String(o))!, j = at.get(String(d))!;
      expect(w as number).toBeCloseTo(raw(i, j) / sums[i], 12);
    }
  });

  it('longitude/latitude with "degrees": distances in great-circle km (four towns a degree apart on the equator)', () => {
    const ids: Grid = [['E0'], ['E1'], ['E2'], ['E3']];
    const lon: Grid = [[0], [1], [2], [3]];
    const lat: Grid = [[0], [0], [0], [0]];
    // one degree of the equator is 111.19 km on a sphere of radius 6371.0088 km (2π·6371.0088/360)
    expect(neighbourRowsFromPoints(ids, lon, lat, 'within', 111.3, 'degrees').length - 1).toBe(6);
    expect(() => neighbourRowsFromPoints(ids, lon, lat, 'within', 111.1, 'degrees')).toThrow(/closest pair is 111\.195 km apart/);
  });

  it('"link unneighboured" links an area with no neighbour within the band to its nearest area (a town 8 degrees from the rest)', () => {
    const ids: Grid = [['E0'], ['E1'], ['E2'], ['E10']];
    const lon: Grid = [[0], [1], [2], [10]];
    const lat: Grid = [[0], [0], [0], [0]];
    const rows = neighbourRowsFromPoints(ids, lon, lat, 'within', 111.3, 'degrees, binary, link unneighboured');
    // E0–E1 and E1–E2 both ways, and E10 joined to its nearest town E2 (both ways, so the links stay symmetric)
    expect(rows.slice(1).map((r) => `${r[0]}-${r[1]}`).sort()).toEqual(['E0-E1', 'E1-E0', 'E1-E2', 'E10-E2', 'E2-E1', 'E2-E10']);
    expect(() => neighbourRowsFromPoints(ids, lon, lat, 'within', 111.3, 'degrees, link islands')).toThrow(/it knows .*link unneighboured/);
  });

  it('refuses bad input in words that name the cell or the option', async () => {
    const c = await columbus();
    const holed = c.x.map((r) => [...r]);
    holed[5][0] = 'n/a';
    expect(() => neighbourRowsFromPoints(c.idRange, holed, c.y, 'nearest', 4)).toThrow(/Cell 6 of the x range holds "n\/a"/);
    expect(() => neighbourRowsFromPoints(c.idRange, c.x, c.y, 'closest', 4)).toThrow(/rule "closest" is not known/);
    expect(() => neighbourRowsFromPoints(c.idRange, c.x, c.y, 'nearest', 4, 'degres')).toThrow(/option "degres" is not one this function knows/);
    expect(() => neighbourRowsFromPoints(c.idRange, c.x, c.y, 'within')).toThrow(/needs its distance/);
  });
});

describe('SPILL.TOUCHING: neighbours by shared borders from the kept boundary file', () => {
  it('queen neighbours of the Columbus areas equal the numpy reference (236 links)', async () => {
    const c = await columbus();
    const rows = await contiguityRows(files, c.idRange, undefined, 'POLYID');
    expect(rows).toHaveLength(1 + 236);
    expect(sets(rows, c.ids)).toEqual(golden.weights.neighbours);
  });

  it('links only the areas of the ID range, in its order; rook gives 200 links (reference note)', async () => {
    const c = await columbus();
    const rook = await contiguityRows(files, c.idRange, 'rook', 'POLYID', 'binary');
    expect(rook).toHaveLength(1 + 200);
    const some: Grid = [['POLYID'], ...c.ids.slice(0, 10).reverse().map((id) => [id])];
    const rows = await contiguityRows(files, some, 'queen', undefined, undefined, 'POLYID');
    const kept = new Set(c.ids.slice(0, 10));
    for (const [o, d] of rows.slice(1)) { expect(kept.has(String(o))).toBe(true); expect(kept.has(String(d))).toBe(true); }
    expect(rows[1][0]).toBe(c.ids[9]);
  });

  it('"order=2" links the areas exactly two steps away, "order=2, cumulative" those one or two steps away (breadth-first search over the reference neighbours)', async () => {
    const c = await columbus();
    const first: number[][] = golden.weights.neighbours;
    // areas exactly two steps away: a neighbour's neighbour, not the area itself nor one of its own neighbours
    const two = first.map((ns, i) => [...new Set(ns.flatMap((j) => first[j]))].filter((j) => j !== i && !ns.includes(j)).sort((a, b) => a - b));
    const exact = await contiguityRows(files, c.idRange, 'queen', 'POLYID', 'order=2, binary');
    expect(sets(exact, c.ids)).toEqual(two);
    const upTo = await contiguityRows(files, c.idRange, 'queen', 'POLYID', 'order=2, cumulative');
    expect(sets(upTo, c.ids)).toEqual(first.map((ns, i) => [...ns, ...two[i]].sort((a, b) => a - b)));
    await expect(contiguityRows(files, c.idRange, 'queen', 'POLYID', 'cumulative')).rejects.toThrow(/"cumulative" goes with "order=K"/);
    await expect(contiguityRows(files, c.idRange, 'queen', 'POLYID', 'link islands')).rejects.toThrow(/not one this function knows; it knows .*link unneighboured/);
  });

  it('says what to do when the workbook keeps no boundary file, an ID is not in it, or several properties hold the IDs', async () => {
    const c = await columbus();
    // POLYID, NEIG and the shapefile's own record numbers all run 1 to 49 (in different orders)
    await expect(contiguityRows(files, c.idRange)).rejects.toThrow(/Several properties .* hold these IDs \(.*POLYID.*\); name the one/);
    await expect(contiguityRows(null, c.idRange)).rejects.toThrow(/keeps no boundary file yet/);
    const wrong = c.idRange.map((r) => [...r]);
    wrong[3][0] = '999';
    await expect(contiguityRows(files, wrong, 'queen', 'POLYID')).rejects.toThrow(/Cell 4 of the ID range holds 999, which no area of the kept boundary file/);
  });
});
