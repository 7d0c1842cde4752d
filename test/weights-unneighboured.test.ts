// The nearest area of an area without neighbours, on longitude/latitude areas straddling ±180°.
// Sources: hand-drawn rectangles whose area-weighted centroids follow from the composite-area
// identity (parts weighted by their areas), and great-circle distances by the haversine formula
// written out here (Sinnott 1984, "Virtues of the haversine", Sky & Telescope 68, 159; recalled from memory).
import { describe, expect, it } from 'vitest';
import type { AreaGeometry } from '../src/geo/types.js';
import { representativePoints } from '../src/geo/index.js';
import { buildWeights } from '../src/weights/index.js';
import { row } from './fixtures/weights/shapes.js';

const rect = (x0: number, y0: number, x1: number, y1: number): number[][] => [[x0, y0], [x0, y1], [x1, y1], [x1, y0], [x0, y0]];
const poly = (...parts: number[][][]): AreaGeometry => ({ kind: 'polygon', polygons: parts.map((p) => [p]) });

// An island group cut by the antimeridian (177°E..180° and 180°..179°W), an island 10° to its west,
// and two touching areas far away in the south Atlantic / southern Africa. The straddling area's
// bounding box runs −180..180, so its box centre sits at longitude 0, next to the far pair.
const ids = ['EAST', 'WEST', 'STRADDLE', 'NEAR'];
const geometries: AreaGeometry[] = [
  poly(rect(14, -24, 20, -18)),
  poly(rect(14, -18, 20, -12)),
  poly(rect(177, -18, 180, -16), rect(-180, -18, -179, -16)),
  poly(rect(167, -16, 169, -14)),
];

function haversineKm(lon1: number, lat1: number, lon2: number, lat2: number): number {
  const r = Math.PI / 180;
  const h = Math.sin(((lat2 - lat1) * r) / 2) ** 2 + Math.cos(lat1 * r) * Math.cos(lat2 * r) * Math.sin(((lon2 - lon1) * r) / 2) ** 2;
  return 2 * 6371.0088 * Math.asin(Math.sqrt(h));
}

describe('linking areas without neighbours across ±180°', () => {
  it('uses area-weighted centroids: the straddling area sits at 179°E', () => {
    const c = representativePoints(geometries);
    // parts 177..180 (area 6, centre 178.5) and 180..181 (area 2, centre 180.5): (6·178.5 + 2·180.5)/8 = 179
    expect(c.x[2]).toBeCloseTo(179, 12);
    expect(c.y[2]).toBeCloseTo(-17, 12);
  });

  for (const rule of ['queen', 'rook'] as const) {
    it(`${rule}: links the straddling area to its neighbour 10° west, not to the far pair`, () => {
      const w = buildWeights({ ids, geometries, coordinates: 'geographic' }, { method: rule }, { linkUnneighboured: true });
      expect(w.linkedUnneighboured).toEqual(['STRADDLE', 'NEAR']);
      expect(row(w, 2)).toEqual([3]);
      expect(row(w, 3)).toEqual([2]);
      expect(row(w, 0)).toEqual([1]);
      expect(w.description).not.toMatch(/bounding-box/);
      // brute force over the centroids (haversine): the straddling area's nearest is NEAR
      const c = representativePoints(geometries);
      const d = [0, 1, 3].map((j) => haversineKm(c.x[2], c.y[2], c.x[j], c.y[j]));
      expect(d.indexOf(Math.min(...d))).toBe(2);
    });
  }
});
