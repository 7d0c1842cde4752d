// Representative points and distances, checked against closed-form geometry (centroids of composite
// figures by decomposition) and spherical identities (arc length = R·angle on a sphere of radius R).
import { describe, expect, it } from 'vitest';
import { greatCircleKm, planarDistance, representativePoints, EARTH_RADIUS_KM } from '../src/geo/index.js';
import type { AreaGeometry } from '../src/geo/index.js';

const ring = (...pts: [number, number][]) => [...pts, pts[0]];

describe('representativePoints', () => {
  it('gives the centre of a square and the point itself for points', () => {
    const g: AreaGeometry[] = [
      { kind: 'polygon', polygons: [[ring([0, 0], [2, 0], [2, 2], [0, 2])]] },
      { kind: 'point', point: [7, -3] },
    ];
    const { x, y } = representativePoints(g);
    expect([x[0], y[0], x[1], y[1]]).toEqual([1, 1, 7, -3]);
  });

  it('weights parts by area and subtracts holes, whatever the ring orientation', () => {
    // L-shape = square [0,2]² (area 4, centre (1,1)) + square [2,3]×[0,1] (area 1, centre (2.5,0.5))
    // as two parts: centroid ((4·1 + 1·2.5)/5, (4·1 + 1·0.5)/5) = (1.3, 0.9).
    const parts: AreaGeometry = {
      kind: 'polygon',
      polygons: [[ring([0, 0], [2, 0], [2, 2], [0, 2])], [ring([2, 0], [2, 1], [3, 1], [3, 0])]], // second part clockwise
    };
    // Square [0,4]² (area 16, centre (2,2)) minus hole [0,2]² (area 4, centre (1,1)):
    // centroid ((16·2 − 4·1)/12, same) = (7/3, 7/3).
    const holed: AreaGeometry = {
      kind: 'polygon',
      polygons: [[ring([0, 0], [4, 0], [4, 4], [0, 4]), ring([0, 0], [2, 0], [2, 2], [0, 2])]], // hole counter-clockwise too
    };
    const { x, y } = representativePoints([parts, holed]);
    expect(x[0]).toBeCloseTo(1.3, 12);
    expect(y[0]).toBeCloseTo(0.9, 12);
    expect(x[1]).toBeCloseTo(7 / 3, 12);
    expect(y[1]).toBeCloseTo(7 / 3, 12);
  });

  it('keeps precision for large projected coordinates', () => {
    const o = 4_000_000;
    const { x, y } = representativePoints([{ kind: 'polygon', polygons: [[ring([o, o], [o + 3, o], [o + 3, o + 1], [o, o + 1])]] }]);
    expect(x[0]).toBe(o + 1.5);
    expect(y[0]).toBe(o + 0.5);
  });

  it('averages parts on both sides of the ±180° meridian across it, not across Greenwich', () => {
    // two 1°×1° squares at 179..180 and -180..-179: the combined centre is on the meridian at 180°
    const g: AreaGeometry = {
      kind: 'polygon',
      polygons: [[ring([179, 50], [180, 50], [180, 51], [179, 51])], [ring([-180, 50], [-179, 50], [-179, 51], [-180, 51])]],
    };
    const { x, y } = representativePoints([g]);
    expect(Math.abs(x[0])).toBeCloseTo(180, 9);
    expect(y[0]).toBeCloseTo(50.5, 12);
  });
});

describe('distances', () => {
  it('matches arc length R·θ for meridians and the equator', () => {
    // one degree of latitude along a meridian, and a quarter of the equator
    expect(greatCircleKm(10, 0, 10, 1)).toBeCloseTo((EARTH_RADIUS_KM * Math.PI) / 180, 9);
    expect(greatCircleKm(0, 0, 90, 0)).toBeCloseTo((EARTH_RADIUS_KM * Math.PI) / 2, 9);
    expect(greatCircleKm(0, 0, 180, 0)).toBeCloseTo(EARTH_RADIUS_KM * Math.PI, 9); // antipodes
    expect(greatCircleKm(0, 90, 123, 90)).toBeCloseTo(0, 9); // the pole is one point (cos 90° is 6e-17 in doubles)
  });

  it('uses the mean Earth radius 6371.0088 km (IUGG R1; recalled from memory)', () => {
    expect(EARTH_RADIUS_KM).toBe(6371.0088);
  });

  it('follows the spherical law of cosines away from the axes', () => {
    // cos c = sin φ1 sin φ2 + cos φ1 cos φ2 cos Δλ (an independent formula for the same angle)
    const r = Math.PI / 180;
    const [l1, p1, l2, p2] = [-3.7, 40.4, 2.35, 48.86];
    const c = Math.acos(Math.sin(p1 * r) * Math.sin(p2 * r) + Math.cos(p1 * r) * Math.cos(p2 * r) * Math.cos((l2 - l1) * r));
    expect(greatCircleKm(l1, p1, l2, p2)).toBeCloseTo(EARTH_RADIUS_KM * c, 6);
  });

  it('planar distance is Euclidean (3-4-5 triangle)', () => {
    expect(planarDistance(1, 1, 4, 5)).toBe(5);
  });
});
