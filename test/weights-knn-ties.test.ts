// Ties among nearest neighbours on a regular lattice. Source: the lattice's exact geometry — with
// cells numbered row by row at integer (column, row) positions, squared distances are whole numbers,
// so the ties of the stated rule (equal distance, then the lower row) are counted exactly in integers
// here. The points themselves are placed at 0.1-unit spacing far from the origin, where the tied
// floating-point distances differ in their last digits.
import { describe, expect, it } from 'vitest';
import { buildWeights, tieWarning } from '../src/weights/index.js';
import { TIE_TOLERANCE } from '../src/weights/nearest.js';
import { parseFitArgs } from '../src/cli/args.js';
import { row } from './fixtures/weights/shapes.js';

const R = 12, C = 15, N = R * C;
const col = (i: number) => i % C, rw = (i: number) => Math.floor(i / C);
const x = Float64Array.from({ length: N }, (_, i) => 4100.3 + 0.1 * col(i));
const y = Float64Array.from({ length: N }, (_, i) => 77.7 + 0.1 * rw(i));
const input = {
  ids: Array.from({ length: N }, (_, i) => `P${i + 1}`),
  geometries: Array.from({ length: N }, (_, i) => ({ kind: 'point' as const, point: [x[i], y[i]] as [number, number] })),
  coordinates: 'projected' as const,
  points: { x, y },
};
const exact2 = (i: number, j: number) => (col(i) - col(j)) ** 2 + (rw(i) - rw(j)) ** 2;

/** The rule in exact integers: sorted by (distance, row); lower-row keeps k, include keeps all at the k-th distance. */
function expected(i: number, k: number, ties: 'lower-row' | 'include') {
  const others = Array.from({ length: N }, (_, j) => j).filter((j) => j !== i).sort((a, b) => exact2(i, a) - exact2(i, b) || a - b);
  const dk = exact2(i, others[k - 1]);
  const atMost = others.filter((j) => exact2(i, j) <= dk);
  const chosen = ties === 'include' ? atMost : others.slice(0, k);
  return { row: chosen.sort((a, b) => a - b), decided: atMost.length > k };
}

describe('k-nearest ties on a lattice', () => {
  it('the floating-point distances of tied cells really differ (so the rule, not luck, decides)', () => {
    let noisy = 0;
    for (let i = 0; i < N; i++) {
      const d = (j: number) => Math.hypot(x[i] - x[j], y[i] - y[j]);
      if (col(i) > 0 && col(i) < C - 1 && d(i - 1) !== d(i + 1)) noisy++;
    }
    expect(noisy).toBeGreaterThan(0);
    expect(TIE_TOLERANCE).toBeLessThan(1e-6);
  });

  for (const k of [2, 3, 4, 6, 7]) {
    for (const ties of ['lower-row', 'include'] as const) {
      it(`knn:${k}, ties ${ties}: every row as the exact rule says, and the tie count`, () => {
        const w = buildWeights(input, ties === 'include' ? { method: 'knn', k, ties } : { method: 'knn', k }, { transform: 'binary' });
        let decided = 0;
        for (let i = 0; i < N; i++) {
          const e = expected(i, k, ties);
          expect(row(w, i)).toEqual(e.row);
          if (e.decided) decided++;
        }
        expect(w.tiesDecided).toBe(decided);
        expect(decided).toBeGreaterThan(0);
        expect(w.description).toMatch(ties === 'include' ? /every area tied at the k-th distance included/ : /ties at the k-th distance go to the lower row/);
      });
    }
  }

  it('no ties on the interior with k = 4 (side neighbours), ties at the edges and corners', () => {
    const w = buildWeights(input, { method: 'knn', k: 4 });
    const centre = 5 * C + 7;
    expect(row(w, centre)).toEqual([centre - C, centre - 1, centre + 1, centre + C].sort((a, b) => a - b));
    // corner 0: sides 1 and C at 1, diagonal C+1 at √2, then 2 and 2C tied at 2: the lower row (2) wins
    expect(row(w, 0)).toEqual([1, 2, C, C + 1]);
  });

  it('great-circle distances: east and west neighbours on one parallel tie, the lower row wins', () => {
    const lon = new Float64Array([10, 9.5, 10.5, 10]), lat = new Float64Array([45, 45, 45, 46]);
    const pts = { ids: ['a', 'b', 'c', 'd'], geometries: [0, 1, 2, 3].map((i) => ({ kind: 'point' as const, point: [lon[i], lat[i]] as [number, number] })), coordinates: 'geographic' as const, points: { x: lon, y: lat } };
    const lower = buildWeights(pts, { method: 'knn', k: 1 }, { transform: 'binary' });
    expect(row(lower, 0)).toEqual([1]);
    expect(lower.tiesDecided).toBe(1);
    const all = buildWeights(pts, { method: 'knn', k: 1, ties: 'include' }, { transform: 'binary' });
    expect(row(all, 0)).toEqual([1, 2]);
  });

  it('the warning counts the areas and names the tie-inclusive choice', () => {
    expect(tieWarning(19, { method: 'knn', k: 4 })).toMatch(/^19 area\(s\) had more areas tied .*--ties include/);
    expect(tieWarning(3, { method: 'knn', k: 4, ties: 'include' })).toMatch(/more than k neighbours/);
  });

  it('--ties include on the command line', () => {
    const base = ['--boundary', 'b.geojson', '--id', 'ID', '--y', 'Y', '--x', 'X'];
    expect(parseFitArgs([...base, '--weights', 'knn:6', '--ties', 'include']).weights).toEqual({ method: 'knn', k: 6, ties: 'include' });
    expect(parseFitArgs([...base, '--weights', 'knn:6']).weights).toEqual({ method: 'knn', k: 6 });
    expect(() => parseFitArgs([...base, '--weights', 'knn:6', '--ties', 'all'])).toThrow(/--ties must be lower-row or include/);
    expect(() => parseFitArgs([...base, '--weights', 'queen', '--ties', 'include'])).toThrow(/applies to k-nearest/);
    expect(parseFitArgs([...base, '--compare', 'knn:4,rook', '--ties', 'include']).compare).toEqual([{ method: 'knn', k: 4, ties: 'include' }, { method: 'rook' }]);
  });
});
