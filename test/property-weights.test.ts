// Property tests of the neighbour rules (fast-check, fixed seeds). Each property is a definition
// or identity, not a recorded number:
// - contiguity is a symmetric relation without self-links (if A touches B, B touches A);
// - row standardisation divides each row by its sum, so rows sum to 1 and withoutNeighbours stay 0;
// - k-nearest gives every area exactly k neighbours, none of them itself;
// - a distance band is symmetric (distance is).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { buildWeights, type SpatialWeights } from '../src/weights/index.js';
import { representativePoints } from '../src/geo/index.js';
import { InputError } from '../src/errors.js';
import type { AreaGeometry } from '../src/geo/types.js';

export const RUNS = { weights: 60, knn: 40 };

/** Cells of an r × c grid of unit squares kept by `mask`; cells with `split` describe their sides with extra vertices. */
function cells(r: number, c: number, mask: boolean[], split: boolean[]): { ids: string[]; geometries: AreaGeometry[] } {
  const ids: string[] = [];
  const geometries: AreaGeometry[] = [];
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < c; j++) {
      const k = i * c + j;
      if (!mask[k]) continue;
      const ring = split[k]
        ? [[j, i], [j + 0.5, i], [j + 1, i], [j + 1, i + 0.25], [j + 1, i + 1], [j + 0.3, i + 1], [j, i + 1], [j, i + 0.7], [j, i]]
        : [[j, i], [j + 1, i], [j + 1, i + 1], [j, i + 1], [j, i]];
      ids.push(`c${k}`);
      geometries.push({ kind: 'polygon', polygons: [[ring]] });
    }
  }
  return { ids, geometries };
}

const gridArb = fc.record({ r: fc.integer({ min: 2, max: 6 }), c: fc.integer({ min: 2, max: 6 }) }).chain(({ r, c }) =>
  fc.record({
    r: fc.constant(r),
    c: fc.constant(c),
    mask: fc.array(fc.boolean(), { minLength: r * c, maxLength: r * c }),
    split: fc.array(fc.boolean(), { minLength: r * c, maxLength: r * c }),
    rule: fc.constantFrom('queen' as const, 'rook' as const),
  }),
);

function entries(w: SpatialWeights): Map<string, number> {
  const m = new Map<string, number>();
  for (let i = 0; i < w.n; i++) for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) m.set(`${i},${w.colIdx[p]}`, w.values[p]);
  return m;
}

function rowSums(w: SpatialWeights): number[] {
  const out: number[] = [];
  for (let i = 0; i < w.n; i++) {
    let s = 0;
    for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) s += w.values[p];
    out.push(s);
  }
  return out;
}

/** Builds, or returns null when the rule legitimately refuses (fewer than two areas, or no links at all). */
function tryBuild(f: () => SpatialWeights): SpatialWeights | null {
  try {
    return f();
  } catch (e) {
    if (e instanceof InputError) return null;
    throw e;
  }
}

describe('property: contiguity weights', () => {
  it('are symmetric before standardisation and have no self-links; standardised rows sum to 1 (withoutNeighbours 0)', () => {
    fc.assert(
      fc.property(gridArb, ({ r, c, mask, split, rule }) => {
        const { ids, geometries } = cells(r, c, mask, split);
        const input = { ids, geometries, coordinates: 'projected' as const };
        const binary = tryBuild(() => buildWeights(input, { method: rule }, { transform: 'binary' }));
        if (!binary) return;
        const e = entries(binary);
        for (const [key, v] of e) {
          const [i, j] = key.split(',').map(Number);
          expect(i).not.toBe(j);
          expect(e.get(`${j},${i}`)).toBe(v);
        }
        // grid identity: rook neighbours share a side (|Δrow| + |Δcol| = 1), queen adds corners
        for (const key of e.keys()) {
          const [a, b] = key.split(',').map((t) => Number(ids[Number(t)].slice(1)));
          const dr = Math.abs(Math.floor(a / c) - Math.floor(b / c)), dc = Math.abs((a % c) - (b % c));
          expect(rule === 'rook' ? dr + dc === 1 : Math.max(dr, dc) === 1).toBe(true);
        }
        const row = buildWeights(input, { method: rule }, { transform: 'row' });
        rowSums(row).forEach((s, i) => {
          if (row.rowPtr[i + 1] === row.rowPtr[i]) expect(s).toBe(0);
          else expect(Math.abs(s - 1)).toBeLessThan(1e-14);
        });
      }),
      { seed: 20261201, numRuns: RUNS.weights },
    );
  });
});

describe('property: k-nearest and band weights', () => {
  const pointsArb = fc.record({
    xy: fc.uniqueArray(fc.tuple(fc.integer({ min: 0, max: 400 }), fc.integer({ min: 0, max: 400 })), { minLength: 5, maxLength: 40, selector: ([x, y]) => `${x},${y}` }),
    k: fc.integer({ min: 1, max: 4 }),
    band: fc.integer({ min: 20, max: 300 }),
  });
  it('k-nearest: k neighbours each, never itself, rows sum to 1; band: symmetric', () => {
    fc.assert(
      fc.property(pointsArb, ({ xy, k, band }) => {
        const geometries: AreaGeometry[] = xy.map(([x, y]) => ({ kind: 'point', point: [x, y] }));
        const ids = xy.map((_, i) => `p${i}`);
        const pts = representativePoints(geometries);
        const input = { ids, geometries, coordinates: 'projected' as const, points: pts };
        const knn = buildWeights(input, { method: 'knn', k }, { transform: 'row' });
        for (let i = 0; i < knn.n; i++) {
          expect(knn.rowPtr[i + 1] - knn.rowPtr[i]).toBe(k);
          for (let p = knn.rowPtr[i]; p < knn.rowPtr[i + 1]; p++) expect(knn.colIdx[p]).not.toBe(i);
        }
        rowSums(knn).forEach((s) => expect(Math.abs(s - 1)).toBeLessThan(1e-14));
        const b = tryBuild(() => buildWeights(input, { method: 'band', distance: band }, { transform: 'binary' }));
        if (!b) return;
        const e = entries(b);
        for (const key of e.keys()) {
          const [i, j] = key.split(',').map(Number);
          expect(e.has(`${j},${i}`)).toBe(true);
          expect(Math.hypot(xy[i][0] - xy[j][0], xy[i][1] - xy[j][1])).toBeLessThanOrEqual(band * (1 + 1e-12));
        }
      }),
      { seed: 424242, numRuns: RUNS.knn },
    );
  });
});
