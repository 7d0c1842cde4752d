// The box index used by contiguity (flatbush behind a small adapter), checked directly against a brute-force scan of every box
// (a mathematical identity: a box query returns exactly the boxes that meet the query rectangle).
import { describe, expect, it } from 'vitest';
import { BoxIndex } from '../src/weights/box-index.js';
import { seededRandom } from '../src/linalg/random.js';

// the same seeded generator the engine's trace probes use, so the boxes are the same on every run
const generator = seededRandom;

function boxes(n: number, seed: number) {
  const r = generator(seed);
  const minX = new Float64Array(n), minY = new Float64Array(n), maxX = new Float64Array(n), maxY = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    minX[i] = r() * 100;
    minY[i] = r() * 100;
    maxX[i] = minX[i] + r() * 5;
    maxY[i] = minY[i] + (i % 7 === 0 ? 0 : r() * 5); // some degenerate (segment-like) boxes
  }
  return { minX, minY, maxX, maxY };
}

function query(index: BoxIndex, x0: number, y0: number, x1: number, y1: number): number[] {
  const found = index.search(x0, y0, x1, y1);
  return Array.from(index.results.subarray(0, found)).sort((a, b) => a - b);
}

describe('box index', () => {
  for (const n of [0, 1, 15, 16, 17, 300, 5000]) {
    it(`returns exactly the boxes that meet each query (${n} boxes)`, () => {
      const b = boxes(n, 7 + n);
      const index = new BoxIndex(b.minX, b.minY, b.maxX, b.maxY);
      const r = generator(99);
      for (let q = 0; q < 200; q++) {
        const x0 = r() * 110 - 5, y0 = r() * 110 - 5;
        const point = q % 2 === 0;
        const x1 = point ? x0 : x0 + r() * 20, y1 = point ? y0 : y0 + r() * 20;
        const expected: number[] = [];
        for (let i = 0; i < n; i++) if (b.minX[i] <= x1 && b.maxX[i] >= x0 && b.minY[i] <= y1 && b.maxY[i] >= y0) expected.push(i);
        expect(query(index, x0, y0, x1, y1)).toEqual(expected);
      }
    });
  }

  it('finds boxes that only touch the query at an edge or a corner', () => {
    const index = new BoxIndex(Float64Array.of(0, 2), Float64Array.of(0, 2), Float64Array.of(1, 3), Float64Array.of(1, 3));
    expect(query(index, 1, 1, 2, 2)).toEqual([0, 1]);
    expect(query(index, 1, 0.5, 1, 0.5)).toEqual([0]);
    expect(query(index, 1.5, 1.5, 1.6, 1.6)).toEqual([]);
  });
});
