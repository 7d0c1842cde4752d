/** Representative points and distances. */
import type { AreaGeometry } from './types.js';

/**
 * Area-weighted centroid of all parts of each polygon (holes subtract), the point itself for points.
 * Per ring: Cx = Σ (xi + xi+1)(xi·yi+1 − xi+1·yi) / (6A) (the shoelace centroid), accumulated with
 * outer rings counted positive and holes negative whatever their orientation. Coordinates are taken
 * relative to the area's first vertex for precision. Polygons whose parts straddle the ±180° meridian
 * (longitudes spanning more than 180°) are averaged with western longitudes shifted by 360°.
 */
export function representativePoints(geometries: AreaGeometry[]): { x: Float64Array; y: Float64Array } {
  const n = geometries.length;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const g = geometries[i];
    if (g.kind === 'point') {
      x[i] = g.point[0];
      y[i] = g.point[1];
    } else {
      const c = polygonCentroid(g.polygons);
      x[i] = c[0];
      y[i] = c[1];
    }
  }
  return { x, y };
}

function polygonCentroid(polygons: number[][][][]): [number, number] {
  let minX = Infinity, maxX = -Infinity;
  for (const p of polygons) for (const q of p[0]) {
    if (q[0] < minX) minX = q[0];
    if (q[0] > maxX) maxX = q[0];
  }
  const wraps = maxX - minX > 180 && minX >= -180 && maxX <= 180;
  const shift = (v: number) => (wraps && v < 0 ? v + 360 : v);
  const x0 = shift(polygons[0][0][0][0]);
  const y0 = polygons[0][0][0][1];
  let area = 0, sx = 0, sy = 0;
  for (const polygon of polygons) {
    for (let r = 0; r < polygon.length; r++) {
      const ring = polygon[r];
      let a = 0, cx = 0, cy = 0;
      for (let k = 0; k < ring.length - 1; k++) {
        const xa = shift(ring[k][0]) - x0, ya = ring[k][1] - y0;
        const xb = shift(ring[k + 1][0]) - x0, yb = ring[k + 1][1] - y0;
        const cross = xa * yb - xb * ya;
        a += cross;
        cx += (xa + xb) * cross;
        cy += (ya + yb) * cross;
      }
      // a is twice the signed area; force outer rings positive and holes negative.
      const sign = (r === 0) === (a >= 0) ? 1 : -1;
      area += sign * a;
      sx += sign * cx;
      sy += sign * cy;
    }
  }
  if (area === 0) return vertexMean(polygons); // zero-area features kept from quantized TopoJSON
  let cx = x0 + sx / (3 * area);
  const cy = y0 + sy / (3 * area);
  if (wraps && cx > 180) cx -= 360;
  return [cx, cy];
}

function vertexMean(polygons: number[][][][]): [number, number] {
  let sx = 0, sy = 0, n = 0;
  for (const p of polygons) {
    const ring = p[0];
    for (let k = 0; k < ring.length - 1; k++) {
      sx += ring[k][0];
      sy += ring[k][1];
      n++;
    }
  }
  return [sx / n, sy / n];
}

/** Mean Earth radius R1 = 6371.0088 km (IUGG; Moritz 2000, Geodetic Reference System 1980). */
export const EARTH_RADIUS_KM = 6371.0088;

/** Haversine great-circle distance in km between two longitude/latitude points given in degrees. */
export function greatCircleKm(lon1: number, lat1: number, lon2: number, lat2: number): number {
  const rad = Math.PI / 180;
  const dLat = (lat2 - lat1) * rad;
  const dLon = (lon2 - lon1) * rad;
  const h = Math.sin(dLat / 2) ** 2 + Math.cos(lat1 * rad) * Math.cos(lat2 * rad) * Math.sin(dLon / 2) ** 2;
  return 2 * EARTH_RADIUS_KM * Math.asin(Math.min(1, Math.sqrt(h)));
}

/** Straight-line distance in the layer's own planar units. */
export function planarDistance(x1: number, y1: number, x2: number, y2: number): number {
  return Math.hypot(x2 - x1, y2 - y1);
}
