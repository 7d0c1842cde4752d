import KDBush from 'kdbush';
import type { CsrMatrix } from '../linalg/index.js';
import { EARTH_RADIUS_KM, greatCircleKm } from '../geo/index.js';
import { TreeSearch } from './tree-search.js';

/** The engine's one Earth radius (the IUGG mean radius, src/geo/points.ts), for search reaches in km. */
export { EARTH_RADIUS_KM };

export interface PointSet {
  x: Float64Array;
  y: Float64Array;
  /** x = longitude, y = latitude in degrees; distances in km along the great circle */
  greatCircle: boolean;
}

/** Straight-line distance (coordinate units) or great-circle distance in km (haversine on the mean Earth radius). */
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
 * Two distances count as equal when they differ by at most this fraction of the k-th distance. Exact
 * ties (a regular lattice) come out of floating-point centroids a few units in the 15th digit apart;
 * 1e-7 also absorbs the rounding of projected coordinates in the millions, while real differences
 * that small (0.1 mm in a kilometre) mean nothing for neighbours.
 */
export const TIE_TOLERANCE = 1e-7;

/** How areas tied at the k-th distance are treated: the lowest rows fill the k places, or all are kept. */
export type TieRule = 'lower-row' | 'include';

export interface NearestResult {
  pattern: CsrMatrix;
  /** distance to the farthest neighbour of each point */
  kthDistance: Float64Array;
  /** points whose neighbours were decided by a tie: more areas at the k-th distance than places left */
  tiesDecided: number;
}

/**
 * The k nearest other points of every point: row i lists them (sorted by column, values 1) and
 * kthDistance[i] is the distance to the farthest of them. The exact rule: let d be the k-th smallest
 * distance from i; the areas closer than d·(1 − TIE_TOLERANCE) are neighbours, and those within
 * d·TIE_TOLERANCE of d are tied. With ties 'lower-row' the tied areas of lowest row fill the places
 * left up to k; with 'include' every tied area is a neighbour (so a row may have more than k).
 */
export function nearestNeighbours(pts: PointSet, k: number, index = pointIndex(pts), ties: TieRule = 'lower-row'): NearestResult {
  const n = pts.x.length;
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const kthDistance = new Float64Array(n);
  const search = new TreeSearch(index, pts.greatCircle);
  let tiesDecided = 0;
  const byDistance = new Int32Array(k + 1);
  const dist = new Float64Array(k + 1);
  for (let i = 0; i < n; i++) {
    // one more than k: when the (k+1)-th is not tied with the k-th, the first k are the answer
    const found = search.nearest(pts.x[i], pts.y[i], i, k + 1);
    const m = found.length;
    // insertion sort of the few found by (distance, row)
    for (let a = 0; a < m; a++) {
      const j = found[a];
      const d = pointDistance(pts, i, j);
      let b = a;
      while (b > 0 && (dist[b - 1] > d || (dist[b - 1] === d && byDistance[b - 1] > j))) {
        dist[b] = dist[b - 1];
        byDistance[b] = byDistance[b - 1];
        b--;
      }
      dist[b] = d;
      byDistance[b] = j;
    }
    const dk = dist[Math.min(k, m) - 1];
    const slack = TIE_TOLERANCE * dk;
    let chosen: number[];
    let far = dk;
    if (m <= k || dist[k] > dk + slack) {
      chosen = Array.from(byDistance.subarray(0, Math.min(k, m)));
    } else {
      // a tie reaches past the k-th place: gather every area within reach of it
      const reach = search.radiusKey((dk + slack) * (1 + 1e-5), EARTH_RADIUS_KM);
      const near = search.within(pts.x[i], pts.y[i], i, reach);
      const closer: number[] = [];
      const tied: number[] = [];
      for (const j of near) {
        const d = pointDistance(pts, i, j);
        if (d < dk - slack) closer.push(j);
        else if (d <= dk + slack) tied.push(j);
      }
      tied.sort((a, b) => a - b);
      const places = k - closer.length;
      if (tied.length > places) tiesDecided++;
      chosen = closer.concat(ties === 'include' ? tied : tied.slice(0, places));
      far = 0;
      for (const j of chosen) far = Math.max(far, pointDistance(pts, i, j));
    }
    kthDistance[i] = far;
    chosen.sort((a, b) => a - b);
    for (const j of chosen) cols.push(j);
    rowPtr[i + 1] = cols.length;
  }
  const colIdx = Int32Array.from(cols);
  return { pattern: { n, rowPtr, colIdx, values: new Float64Array(colIdx.length).fill(1) }, kthDistance, tiesDecided };
}

/** Nearest other point of every point (ties to the lower index) and its distance. */
export function nearestOther(pts: PointSet, index = pointIndex(pts)): { nearest: Int32Array; distance: Float64Array } {
  const { pattern, kthDistance } = nearestNeighbours(pts, 1, index);
  return { nearest: pattern.colIdx, distance: kthDistance };
}
