import { describe, expect, it } from 'vitest';
import { buildWeights, roundUpTwoFigures, suggestBandDistance, summarizeWeights } from '../src/weights/index.js';
import { haversineKm, lcg } from './fixtures/weights/shapes.js';

// The suggested distance band is checked against brute force: every pair's distance computed
// directly (Euclidean, or the haversine formula on a 6371.0088 km sphere), the nearest other area of each
// area taken by a plain scan, and the largest of those distances rounded up by hand.

function points(n: number, seed: number, scaleX: number, scaleY: number, offX = 0, offY = 0) {
  const u = lcg(seed);
  const x = new Float64Array(n), y = new Float64Array(n);
  for (let i = 0; i < n; i++) { x[i] = offX + u() * scaleX; y[i] = offY + u() * scaleY; }
  return { x, y };
}

function input(p: { x: Float64Array; y: Float64Array }, coordinates: 'geographic' | 'projected') {
  const n = p.x.length;
  return {
    ids: Array.from({ length: n }, (_, i) => `A${i + 1}`),
    geometries: Array.from({ length: n }, (_, i) => ({ kind: 'point' as const, point: [p.x[i], p.y[i]] as [number, number] })),
    coordinates, points: p,
  };
}

function bruteAllLinked(n: number, d: (i: number, j: number) => number): number {
  let worst = 0;
  for (let i = 0; i < n; i++) {
    let best = Infinity;
    for (let j = 0; j < n; j++) if (j !== i) best = Math.min(best, d(i, j));
    worst = Math.max(worst, best);
  }
  return worst;
}

describe('the suggested distance band', () => {
  it('rounds up to two significant figures (worked by hand)', () => {
    expect(roundUpTwoFigures(12.31)).toBe(13);
    expect(roundUpTwoFigures(4600)).toBe(4600);
    expect(roundUpTwoFigures(4600.001)).toBe(4700);
    expect(roundUpTwoFigures(0.0452)).toBe(0.046);
    expect(roundUpTwoFigures(0.046)).toBe(0.046);
    expect(roundUpTwoFigures(9.95)).toBe(10);
    expect(roundUpTwoFigures(99.1)).toBe(100);
    expect(roundUpTwoFigures(7)).toBe(7);
    expect(roundUpTwoFigures(123456)).toBe(130000);
  });

  it('never rounds below its argument (random values over twelve decades)', () => {
    const u = lcg(5);
    for (let t = 0; t < 2000; t++) {
      const x = Math.pow(10, -6 + 12 * u());
      const r = roundUpTwoFigures(x);
      expect(r).toBeGreaterThanOrEqual(x);
      // at most one step of the second figure above
      expect(r - x).toBeLessThanOrEqual(Math.pow(10, Math.floor(Math.log10(x)) - 1) * (1 + 1e-9));
      expect(Number(r.toPrecision(2))).toBe(r);
    }
  });

  it('planar points: the largest nearest-neighbour distance matches brute force, in coordinate units', () => {
    const p = points(350, 3, 250_000, 180_000, 400_000, 6_100_000); // metres of an invented projected grid
    const s = suggestBandDistance(input(p, 'projected'))!;
    const brute = bruteAllLinked(350, (i, j) => Math.hypot(p.x[i] - p.x[j], p.y[i] - p.y[j]));
    expect(s.allLinked).toBeCloseTo(brute, 6);
    expect(s.unit).toBe('coordinate units');
    expect(s.distance).toBe(roundUpTwoFigures(brute));
    // at the suggestion every area has a neighbour
    const w = buildWeights(input(p, 'projected'), { method: 'band', distance: s.distance }, { transform: 'binary' });
    expect(summarizeWeights(w).minNeighbours).toBeGreaterThanOrEqual(1);
  });

  it('longitude/latitude: great-circle kilometres match a haversine brute force', () => {
    const p = points(250, 9, 8, 5, -4, 51);
    const s = suggestBandDistance(input(p, 'geographic'))!;
    const brute = bruteAllLinked(250, (i, j) => haversineKm(p.x[i], p.y[i], p.x[j], p.y[j]));
    expect(s.unit).toBe('km');
    expect(s.allLinked).toBeCloseTo(brute, 6);
    expect(s.distance).toBe(roundUpTwoFigures(brute));
    const w = buildWeights(input(p, 'geographic'), { method: 'band', distance: s.distance }, { transform: 'binary' });
    expect(summarizeWeights(w).minNeighbours).toBeGreaterThanOrEqual(1);
  });

  it('an isolated area sets the band: a far point moves the suggestion to its distance', () => {
    const x = Float64Array.from([0, 1, 2, 3, 40]);
    const y = Float64Array.from([0, 0, 0, 0, 0]);
    const s = suggestBandDistance(input({ x, y }, 'projected'))!;
    expect(s.allLinked).toBe(37);
    expect(s.distance).toBe(37);
  });

  it('gives no suggestion when every area shares its place with another', () => {
    const x = Float64Array.from([1, 1, 5, 5]);
    const y = Float64Array.from([2, 2, 3, 3]);
    expect(suggestBandDistance(input({ x, y }, 'projected'))).toBeUndefined();
  });
});
