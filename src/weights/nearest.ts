import KDBush from 'kdbush';
import { distance as greatCircleKm } from 'geokdbush';
import type { CsrMatrix } from '../linalg/csr.js';
import { TreeSearch } from './tree-search.js';

/** Earth radius used by geokdbush's distance (km). */
export const EARTH_RADIUS_KM = 6371;

export interface PointSet {
  x: Float64Array;
  y: Float64Array;
  /** x = longitude, y = latitude in degrees; distances in km along the great circle */
  greatCircle: boolean;
}

/** Straight-line distance (coordinate units) or great-circle distance in km (haversine, radius 6371 km). */
export function pointDistance(pts: PointSet, i: number, j: number): number {
  return pts.greatCircle
    ? greatCircleKm(pts.x[i], pts.y[i], pts.x[j], pts.y[j])
    : Math.hypot(pts.x[i] - pts.x[j], pts.y[i] - pts.y[j]);
}

export function pointIndex(pts: PointSet): KDBush {
  const n = pts.x.length;
  const index = new KDBush(n, 32);
  for (let i = 0; i < n; i++) index.add(pts.x[i], pts.y[i]);
  return index.finish();
}

/**
 * The k nearest other points of every point: row i of the result lists them (sorted by column,
 * values 1) and kthDistance[i] is the distance to the farthest of them. Ties at equal distance
 * go to the lower index.
 */
export function nearestNeighbours(pts: PointSet, k: number, index = pointIndex(pts)): { pattern: CsrMatrix; kthDistance: Float64Array } {
  const n = pts.x.length;
  const rowPtr = new Int32Array(n + 1);
  const colIdx = new Int32Array(n * k);
  const kthDistance = new Float64Array(n);
  const search = new TreeSearch(index, pts.greatCircle);
  for (let i = 0; i < n; i++) {
    const found = search.nearest(pts.x[i], pts.y[i], i, k);
    let far = 0;
    for (const j of found) far = Math.max(far, pointDistance(pts, i, j));
    kthDistance[i] = far;
    colIdx.set(found.sort(), i * k);
    rowPtr[i + 1] = (i + 1) * k;
  }
  return { pattern: { n, rowPtr, colIdx, values: new Float64Array(n * k).fill(1) }, kthDistance };
}

/** Nearest other point of every point (ties to the lower index) and its distance. */
export function nearestOther(pts: PointSet, index = pointIndex(pts)): { nearest: Int32Array; distance: Float64Array } {
  const { pattern, kthDistance } = nearestNeighbours(pts, 1, index);
  return { nearest: pattern.colIdx, distance: kthDistance };
}
