// Rings of shapefile records grouped into polygons by containment. Sources: hand-made shapefiles
// written byte by byte (test/fixtures/geo/make-polygon-shapefile.ts, after the 1998 shapefile
// technical description) whose centroids follow from the composite-area identity
// C = (A₁C₁ − A₂C₂) / (A₁ − A₂) for a figure with a hole; and the Auckland census area units
// (test/fixtures/auckland, CC0, see its LICENCE.md), whose record 163 holds a counter-clockwise
// hole, checked against scripts/reference/ring_centroids.py (numpy shoelace, shares no code).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import * as shapefile from 'shapefile';
import { readBoundary, representativePoints } from '../src/geo/index.js';
import { nestRings } from '../src/geo/ring-nesting.js';
import { polygonShp, type Ring } from './fixtures/geo/make-polygon-shapefile.js';
import { dbf } from './fixtures/geo/make-shapefile.js';

const reversed = (r: Ring): Ring => [...r].reverse();
const table = (n: number) => dbf([{ name: 'CODE', type: 'C', length: 4 }], Array.from({ length: n }, (_, i) => [`A${i + 1}`]));
const read = (records: Ring[][]) =>
  readBoundary([{ name: 'h.shp', bytes: polygonShp(records) }, { name: 'h.dbf', bytes: table(records.length) }], { coordinates: 'projected' });

// A "house": the square 0..12 × 0..6 under the roof (0,6)–(6,12)–(12,6), written clockwise as the
// format asks. Area 72 + 36 = 108, centroid (6, (72·3 + 36·8)/108).
const house: Ring = [[0, 0], [0, 6], [6, 12], [12, 6], [12, 0], [0, 0]];
// A triangular hole, counter-clockwise. Each of its vertices lies on a line through an end of one of
// the house's edges, perpendicular to that edge (x + y = 6 or x − y = 6), where the shapefile
// package's point-on-segment test answers "on the boundary" for every vertex. Area 3, centroid (16/3, 8/3).
const hole: Ring = [[3, 3], [4, 2], [9, 3], [3, 3]];
const withHole = { x: (108 * 6 - 3 * (16 / 3)) / 105, y: (504 - 3 * (8 / 3)) / 105 };

describe('shapefile rings: holes by containment', () => {
  it('shows the package alone reading the counter-clockwise hole as a second part', async () => {
    const source = await shapefile.open(polygonShp([[house, hole]]).buffer as ArrayBuffer);
    const first = await source.read();
    expect(first.value.geometry.type).toBe('MultiPolygon');
    expect((first.value.geometry as { coordinates: unknown[] }).coordinates).toHaveLength(2);
  });

  for (const [way, ring] of [['counter-clockwise (as the format says)', hole], ['clockwise (against the format)', reversed(hole)]] as const) {
    it(`reads a hole written ${way} as a hole and subtracts its area from the centroid`, async () => {
      const layer = await read([[house, ring]]);
      const g = layer.areas[0].geometry!;
      if (g.kind !== 'polygon') throw new Error('polygon expected');
      expect(g.polygons).toHaveLength(1);
      expect(g.polygons[0]).toHaveLength(2);
      const c = representativePoints([g]);
      expect(c.x[0]).toBeCloseTo(withHole.x, 12);
      expect(c.y[0]).toBeCloseTo(withHole.y, 12);
      const warned = layer.warnings.some((w) => /wound against the shapefile rule.*feature 1/.test(w));
      expect(warned).toBe(ring !== hole);
    });
  }

  it('keeps an island inside a lake as an outer ring, and the hole order of the record does not matter', () => {
    const sq = (a: number, b: number): Ring => [[a, a], [a, b], [b, b], [b, a], [a, a]]; // clockwise
    const [A, H1, B, H2] = [sq(0, 10), reversed(sq(2, 8)), sq(3, 7), reversed(sq(4, 6))];
    // depth 0: A; 1: H1 (hole of A); 2: B (an island in A's hole); 3: H2 (hole of B)
    expect(nestRings([H2, A, B, H1])).toEqual({ polygons: [[A, H1], [B, H2]], againstOrientation: 0 });
    expect(nestRings([sq(0, 1)])).toEqual({ polygons: [[sq(0, 1)]], againstOrientation: 0 });
    // two separate parts stay two polygons
    expect(nestRings([sq(0, 1), sq(5, 6)]).polygons).toHaveLength(2);
  });

  it('reads Auckland record 163 with its hole: centroid as numpy computes it', async () => {
    const dir = new URL('./fixtures/auckland/', import.meta.url);
    const bytes = (name: string) => new Uint8Array(readFileSync(new URL(name, dir)));
    const layer = await readBoundary([{ name: 'auckland.shp', bytes: bytes('auckland.shp') }, { name: 'auckland.dbf', bytes: bytes('auckland.dbf') }]);
    expect(layer.areas).toHaveLength(167);
    const g = layer.areas[162].geometry!;
    if (g.kind !== 'polygon') throw new Error('polygon expected');
    expect(g.polygons.map((p) => p.length)).toEqual([2]);
    const c = representativePoints([g]);
    // python3 scripts/reference/ring_centroids.py test/fixtures/auckland/auckland.shp 163
    // (with the hole read as a second part it gives 82.059416367127, 15.272107458895)
    expect(c.x[0]).toBeCloseTo(82.048863948827, 9);
    expect(c.y[0]).toBeCloseTo(15.257432090189, 9);
  });
});
