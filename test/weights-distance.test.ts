import { describe, expect, it } from 'vitest';
import { InputError } from '../src/errors.js';
import { buildWeights, summarizeWeights } from '../src/weights/index.js';
import { assertWellFormed, haversineKm, lcg, row } from './fixtures/weights/shapes.js';

// All checks here compare with brute force: every pair's distance computed directly
// (Euclidean, or the haversine formula on a 6371.0088 km sphere), then sorted or filtered.

const ids = (n: number) => Array.from({ length: n }, (_, i) => `Z${String(i + 1).padStart(3, '0')}`);

function randomPoints(n: number, seed: number, scaleX = 100, scaleY = 100, offX = 0, offY = 0) {
  const u = lcg(seed);
  const x = new Float64Array(n), y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = offX + u() * scaleX;
    y[i] = offY + u() * scaleY;
  }
  return { x, y };
}

function input(points: { x: Float64Array; y: Float64Array }, coordinates: 'geographic' | 'projected') {
  const n = points.x.length;
  return { ids: ids(n), geometries: Array.from({ length: n }, (_, i) => ({ kind: 'point' as const, point: [points.x[i], points.y[i]] as [number, number] })), coordinates, points };
}

function bruteNearest(d: (i: number, j: number) => number, n: number, i: number, k: number): number[] {
  const others = Array.from({ length: n }, (_, j) => j).filter((j) => j !== i);
  others.sort((a, b) => d(i, a) - d(i, b) || a - b);
  return others.slice(0, k).sort((a, b) => a - b);
}

const euclid = (p: { x: Float64Array; y: Float64Array }) => (i: number, j: number) => Math.hypot(p.x[i] - p.x[j], p.y[i] - p.y[j]);
const haversine = (p: { x: Float64Array; y: Float64Array }) => (i: number, j: number) => haversineKm(p.x[i], p.y[i], p.x[j], p.y[j]);

describe('k nearest neighbours', () => {
  const pts = randomPoints(400, 7);
  for (const k of [1, 4, 9]) {
    it(`planar k = ${k} matches brute force`, () => {
      const w = buildWeights(input(pts, 'projected'), { method: 'knn', k }, { transform: 'binary' });
      assertWellFormed(w);
      for (let i = 0; i < 400; i++) expect(row(w, i)).toEqual(bruteNearest(euclid(pts), 400, i, k));
      expect(w.symmetricBase).toBeNull();
      expect(w.greatCircle).toBe(false);
    });
  }

  it('ties go to the lower index (points on a lattice)', () => {
    // 10 × 10 lattice: the 4 side neighbours are at distance 1; with k = 2 the two lowest-indexed win
    const x = new Float64Array(100), y = new Float64Array(100);
    for (let i = 0; i < 100; i++) {
      x[i] = i % 10;
      y[i] = Math.floor(i / 10);
    }
    const w = buildWeights(input({ x, y }, 'projected'), { method: 'knn', k: 2 }, { transform: 'binary' });
    for (let i = 0; i < 100; i++) expect(row(w, i)).toEqual(bruteNearest(euclid({ x, y }), 100, i, 2));
    expect(row(w, 55)).toEqual([45, 54]);
  });

  it('great-circle k = 6 on lon/lat (wide area, across the 180° meridian) matches haversine brute force', () => {
    const p = randomPoints(300, 11, 60, 50, 150, 10); // longitudes 150°…210°, wrapped below
    for (let i = 0; i < 300; i++) if (p.x[i] > 180) p.x[i] -= 360;
    const w = buildWeights(input(p, 'geographic'), { method: 'knn', k: 6 }, { transform: 'binary' });
    expect(w.greatCircle).toBe(true);
    for (let i = 0; i < 300; i++) expect(row(w, i)).toEqual(bruteNearest(haversine(p), 300, i, 6));
  });

  it('great-circle k = 5 near the pole and with longitudes written 0°…360° matches haversine brute force', () => {
    const p = randomPoints(300, 17, 360, 12, 0, 78); // all longitudes, latitudes 78°…90°
    const w = buildWeights(input(p, 'geographic'), { method: 'knn', k: 5 }, { transform: 'binary' });
    for (let i = 0; i < 300; i++) expect(row(w, i)).toEqual(bruteNearest(haversine(p), 300, i, 5));
    const band = buildWeights(input(p, 'geographic'), { method: 'band', distance: 150 }, { transform: 'binary' });
    const d = haversine(p);
    for (let i = 0; i < 300; i++) expect(row(band, i)).toEqual(Array.from({ length: 300 }, (_, j) => j).filter((j) => j !== i && d(i, j) <= 150));
  });

  it('row standardised: each row holds k weights of 1/k', () => {
    const w = buildWeights(input(pts, 'projected'), { method: 'knn', k: 4 });
    for (const v of w.values) expect(v).toBe(0.25);
    expect(summarizeWeights(w).symmetric).toBe(false);
  });

  it('k of n or more is refused, saying how many areas there are', () => {
    const p = randomPoints(5, 3);
    expect(() => buildWeights(input(p, 'projected'), { method: 'knn', k: 5 })).toThrow(InputError);
    expect(() => buildWeights(input(p, 'projected'), { method: 'knn', k: 5 })).toThrow(/there are 5/);
    expect(() => buildWeights(input(p, 'projected'), { method: 'knn', k: 0 })).toThrow(/whole number/);
  });

  it('without points given, the areas\' own representative points serve; a missing location names the area', () => {
    const p = randomPoints(5, 3);
    const own = buildWeights({ ...input(p, 'projected'), points: undefined }, { method: 'knn', k: 2 });
    expect(Array.from(own.colIdx)).toEqual(Array.from(buildWeights(input(p, 'projected'), { method: 'knn', k: 2 }).colIdx));
    p.x[2] = NaN;
    expect(() => buildWeights(input(p, 'projected'), { method: 'knn', k: 2 })).toThrow(/Z003/);
  });
});

describe('distance band', () => {
  it('planar: all pairs within the distance, symmetric, vs brute force', () => {
    const p = randomPoints(300, 5);
    const w = buildWeights(input(p, 'projected'), { method: 'band', distance: 9 }, { transform: 'binary' });
    const d = euclid(p);
    for (let i = 0; i < 300; i++) {
      expect(row(w, i)).toEqual(Array.from({ length: 300 }, (_, j) => j).filter((j) => j !== i && d(i, j) <= 9));
    }
    expect(summarizeWeights(w).symmetric).toBe(true);
    // the distance that gives everyone a neighbour is the largest nearest-neighbour distance
    let largest = 0;
    for (let i = 0; i < 300; i++) {
      let nearest = Infinity;
      for (let j = 0; j < 300; j++) if (j !== i) nearest = Math.min(nearest, d(i, j));
      largest = Math.max(largest, nearest);
    }
    expect(w.allLinkedDistance).toBeCloseTo(largest, 12);
  });

  it('great circle: distance in km vs haversine brute force', () => {
    const p = randomPoints(250, 9, 8, 6, -4, 50);
    const w = buildWeights(input(p, 'geographic'), { method: 'band', distance: 40 }, { transform: 'binary' });
    const d = haversine(p);
    for (let i = 0; i < 250; i++) {
      const want = Array.from({ length: 250 }, (_, j) => j).filter((j) => j !== i && d(i, j) <= 40);
      // pairs within 1e-9 km of the band edge could fall either way by rounding; none occur here
      expect(row(w, i)).toEqual(want);
    }
    expect(w.description).toContain('km');
  });

  it('rows sum to 1, withoutNeighbours stay 0 and are listed', () => {
    const x = new Float64Array([0, 1, 2, 50]), y = new Float64Array([0, 0, 0, 0]);
    const w = buildWeights(input({ x, y }, 'projected'), { method: 'band', distance: 1.5 });
    const sums = [0, 1, 2, 3].map((i) => w.values.subarray(w.rowPtr[i], w.rowPtr[i + 1]).reduce((a, b) => a + b, 0));
    expect(sums[0]).toBeCloseTo(1, 15);
    expect(sums[1]).toBeCloseTo(1, 15);
    expect(sums[2]).toBeCloseTo(1, 15);
    expect(sums[3]).toBe(0);
    expect(summarizeWeights(w).withoutNeighbours).toEqual(['Z004']);
    expect(w.allLinkedDistance).toBe(48);
  });

  it('a band that links nothing says the smallest and the all-linking distances', () => {
    const x = new Float64Array([0, 3, 10]), y = new Float64Array([0, 0, 0]);
    const call = () => buildWeights(input({ x, y }, 'projected'), { method: 'band', distance: 2 });
    expect(call).toThrow(InputError);
    expect(call).toThrow(/closest pair is 3 coordinate units apart; at 7 coordinate units every area/);
  });

  it('withoutNeighbours linked on request', () => {
    const x = new Float64Array([0, 1, 2, 50]), y = new Float64Array([0, 0, 0, 0]);
    const w = buildWeights(input({ x, y }, 'projected'), { method: 'band', distance: 1.5 }, { linkUnneighboured: true });
    expect(row(w, 3)).toEqual([2]);
    expect(row(w, 2)).toEqual([1, 3]);
    expect(w.linkedUnneighboured).toEqual(['Z004']);
  });
});

describe('inverse distance', () => {
  it('weights d^(−power) between all pairs vs brute force', () => {
    const p = randomPoints(60, 21);
    const w = buildWeights(input(p, 'projected'), { method: 'idw', power: 1.5 }, { transform: 'row' });
    const raw = w.symmetricBase!;
    const d = euclid(p);
    for (let i = 0; i < 60; i++) {
      expect(row(raw, i)).toEqual(Array.from({ length: 60 }, (_, j) => j).filter((j) => j !== i));
      for (let q = raw.rowPtr[i]; q < raw.rowPtr[i + 1]; q++) expect(raw.values[q]).toBeCloseTo(d(i, raw.colIdx[q]) ** -1.5, 12);
      let sum = 0;
      for (let q = w.rowPtr[i]; q < w.rowPtr[i + 1]; q++) sum += w.values[q];
      expect(sum).toBeCloseTo(1, 14);
    }
  });

  it('with a cutoff on lon/lat: pairs within the cutoff, weights from haversine km', () => {
    const p = randomPoints(200, 4, 6, 4, 10, 45);
    const w = buildWeights(input(p, 'geographic'), { method: 'idw', power: 2, cutoff: 60 }, { transform: 'row' });
    const raw = w.symmetricBase!;
    const d = haversine(p);
    for (let i = 0; i < 200; i++) {
      expect(row(raw, i)).toEqual(Array.from({ length: 200 }, (_, j) => j).filter((j) => j !== i && d(i, j) <= 60));
      for (let q = raw.rowPtr[i]; q < raw.rowPtr[i + 1]; q++) expect(raw.values[q] / d(i, raw.colIdx[q]) ** -2).toBeCloseTo(1, 9);
    }
  });

  it("binary means the cutoff's pattern", () => {
    const p = randomPoints(100, 8);
    const idw = buildWeights(input(p, 'projected'), { method: 'idw', power: 2, cutoff: 15 }, { transform: 'binary' });
    const band = buildWeights(input(p, 'projected'), { method: 'band', distance: 15 }, { transform: 'binary' });
    expect(Array.from(idw.colIdx)).toEqual(Array.from(band.colIdx));
    expect(Array.from(idw.values).every((v) => v === 1)).toBe(true);
  });

  it('two areas at the same place: the error names both IDs', () => {
    const x = new Float64Array([0, 1, 1, 4]), y = new Float64Array([0, 2, 2, 0]);
    const call = () => buildWeights(input({ x, y }, 'projected'), { method: 'idw', power: 1 });
    expect(call).toThrow(InputError);
    expect(call).toThrow(/Z002 and Z003/);
    expect(() => buildWeights(input({ x, y }, 'projected'), { method: 'idw', power: 1, cutoff: 3 })).toThrow(/Z002 and Z003/);
  });

  it('more than 5,000 areas without a cutoff: asks for one and suggests its size', () => {
    const p = randomPoints(5001, 2);
    expect(() => buildWeights(input(p, 'projected'), { method: 'idw', power: 2 })).toThrow(/Give a cutoff distance; [0-9.]+ coordinate units is the smallest/);
  });

  it('power must be above 0', () => {
    const p = randomPoints(10, 2);
    expect(() => buildWeights(input(p, 'projected'), { method: 'idw', power: 0 })).toThrow(/power/);
  });
});

describe('input checks shared by all rules', () => {
  it('repeated and blank IDs are refused by name', () => {
    const p = randomPoints(3, 1);
    const base = input(p, 'projected');
    expect(() => buildWeights({ ...base, ids: ['a', 'b', 'a'] }, { method: 'knn', k: 1 })).toThrow(/The ID a is used by areas 1 and 3/);
    expect(() => buildWeights({ ...base, ids: ['a', '', 'c'] }, { method: 'knn', k: 1 })).toThrow(/Area 2 has a blank ID/);
  });

  it('longitude/latitude out of range is questioned', () => {
    const x = new Float64Array([500000, 500100]), y = new Float64Array([4000000, 4000100]);
    expect(() => buildWeights(input({ x, y }, 'geographic'), { method: 'knn', k: 1 })).toThrow(/not a longitude\/latitude/);
  });
});
