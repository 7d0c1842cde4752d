import KDBush from 'kdbush';
import { around, distance as greatCircleKm } from 'geokdbush';
import type { CsrMatrix } from '../linalg/csr.js';

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
 * values 1) and kthDistance[i] is the distance to the farthest of them. Ties at equal distance go to the lower
 * index. Planar search: depth-first on the kdbush tree with a bounded heap on (distance, index);
 * great-circle search: geokdbush, then the tie zone at the k-th distance is re-read and ordered.
 */
export function nearestNeighbours(pts: PointSet, k: number, index = pointIndex(pts)): { pattern: CsrMatrix; kthDistance: Float64Array } {
  const n = pts.x.length;
  const rowPtr = new Int32Array(n + 1);
  const colIdx = new Int32Array(n * k);
  const kthDistance = new Float64Array(n);
  const search = pts.greatCircle ? null : new PlanarSearch(index, k);
  for (let i = 0; i < n; i++) {
    const found = search ? search.run(pts.x[i], pts.y[i], i) : greatCircleNearest(index, pts, i, k);
    let far = 0;
    for (const j of found) far = Math.max(far, pointDistance(pts, i, j));
    kthDistance[i] = far;
    const row = Int32Array.from(found).sort();
    colIdx.set(row, i * k);
    rowPtr[i + 1] = (i + 1) * k;
  }
  return { pattern: { n, rowPtr, colIdx, values: new Float64Array(n * k).fill(1) }, kthDistance };
}

/** Nearest other point of every point (ties to the lower index) and its distance. */
export function nearestOther(pts: PointSet, index = pointIndex(pts)): { nearest: Int32Array; distance: Float64Array } {
  const { pattern, kthDistance } = nearestNeighbours(pts, 1, index);
  return { nearest: pattern.colIdx, distance: kthDistance };
}

function greatCircleNearest(index: KDBush, pts: PointSet, i: number, k: number): number[] {
  const notSelf = (j: number) => j !== i;
  const lng = pts.x[i], lat = pts.y[i];
  const first = around(index, lng, lat, k, Infinity, notSelf);
  const reach = greatCircleKm(lng, lat, pts.x[first[k - 1]], pts.y[first[k - 1]]);
  // everything up to (just past) the k-th distance, so that ties are all seen
  const zone = around(index, lng, lat, Infinity, reach * (1 + 1e-9) + 1e-9, notSelf);
  const d = new Float64Array(pts.x.length);
  for (const j of zone) d[j] = greatCircleKm(lng, lat, pts.x[j], pts.y[j]);
  zone.sort((a, b) => d[a] - d[b] || a - b);
  // distances equal but for rounding count as ties: order each such run by index
  for (let g = 0; g < zone.length; ) {
    let e = g + 1;
    while (e < zone.length && d[zone[e]] - d[zone[g]] <= 1e-12 * d[zone[g]]) e++;
    if (e - g > 1) {
      const run = zone.slice(g, e).sort((a, b) => a - b);
      for (let t = g; t < e; t++) zone[t] = run[t - g];
    }
    g = e;
  }
  return zone.slice(0, k);
}

/** k-nearest search on the kdbush tree layout (median splits, alternating axes). */
class PlanarSearch {
  private readonly ids: ArrayLike<number>;
  private readonly coords: ArrayLike<number>;
  private readonly nodeSize: number;
  private readonly heapD: Float64Array;
  private readonly heapI: Int32Array;
  private size = 0;
  private qx = 0;
  private qy = 0;
  private self = -1;

  constructor(index: KDBush, private readonly k: number) {
    this.ids = index.ids;
    this.coords = index.coords;
    this.nodeSize = index.nodeSize;
    this.heapD = new Float64Array(k);
    this.heapI = new Int32Array(k);
  }

  run(qx: number, qy: number, self: number): number[] {
    this.qx = qx;
    this.qy = qy;
    this.self = self;
    this.size = 0;
    this.visit(0, this.ids.length - 1, 0, -Infinity, -Infinity, Infinity, Infinity);
    return Array.from(this.heapI.subarray(0, this.size));
  }

  private visit(left: number, right: number, axis: number, minX: number, minY: number, maxX: number, maxY: number): void {
    if (left > right) return;
    const dx = this.qx < minX ? minX - this.qx : this.qx > maxX ? this.qx - maxX : 0;
    const dy = this.qy < minY ? minY - this.qy : this.qy > maxY ? this.qy - maxY : 0;
    // a box at exactly the k-th distance may still hold a tie with a lower index: keep it
    if (this.size === this.k && dx * dx + dy * dy > this.heapD[0]) return;
    if (right - left <= this.nodeSize) {
      for (let p = left; p <= right; p++) this.offer(p);
      return;
    }
    const m = (left + right) >> 1;
    this.offer(m);
    const split = this.coords[2 * m + axis];
    const q = axis === 0 ? this.qx : this.qy;
    const lowFirst = q <= split;
    for (let side = 0; side < 2; side++) {
      const low = side === 0 ? lowFirst : !lowFirst;
      if (low) this.visit(left, m - 1, 1 - axis, minX, minY, axis === 0 ? split : maxX, axis === 1 ? split : maxY);
      else this.visit(m + 1, right, 1 - axis, axis === 0 ? split : minX, axis === 1 ? split : minY, maxX, maxY);
    }
  }

  private offer(p: number): void {
    const id = this.ids[p];
    if (id === this.self) return;
    const ex = this.coords[2 * p] - this.qx;
    const ey = this.coords[2 * p + 1] - this.qy;
    const d = ex * ex + ey * ey;
    const { heapD, heapI } = this;
    if (this.size < this.k) {
      // sift up in a max-heap ordered by (distance, index)
      let c = this.size++;
      while (c > 0) {
        const parent = (c - 1) >> 1;
        if (!worse(d, id, heapD[parent], heapI[parent])) break;
        heapD[c] = heapD[parent];
        heapI[c] = heapI[parent];
        c = parent;
      }
      heapD[c] = d;
      heapI[c] = id;
      return;
    }
    if (!worse(heapD[0], heapI[0], d, id)) return;
    // replace the worst and sift down
    let c = 0;
    for (;;) {
      const l = 2 * c + 1;
      if (l >= this.k) break;
      const r = l + 1;
      const big = r < this.k && worse(heapD[r], heapI[r], heapD[l], heapI[l]) ? r : l;
      if (!worse(heapD[big], heapI[big], d, id)) break;
      heapD[c] = heapD[big];
      heapI[c] = heapI[big];
      c = big;
    }
    heapD[c] = d;
    heapI[c] = id;
  }
}

function worse(d1: number, i1: number, d2: number, i2: number): boolean {
  return d1 > d2 || (d1 === d2 && i1 > i2);
}
