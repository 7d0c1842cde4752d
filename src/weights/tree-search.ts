import type KDBush from 'kdbush';

/**
 * Depth-first searches on a kdbush tree (median splits, alternating axes) for the k nearest
 * points and for all points within a radius, on the plane or on the sphere.
 *
 * Written here because kdbush has no nearest-neighbour query, and geokdbush's best-first queue
 * allocates an object per visited point and node, many times slower than depth-first on the same
 * tree (bench/README.md, "Timings moved here from code comments").
 *
 * Planar keys are squared distances. Spherical keys are haversines of the central angle,
 * hav θ = chord² / 4 between unit vectors (monotone in great-circle distance, and free of trigonometry
 * per point once the unit vectors are stored); the lower bound for
 * a lon/lat box is the one geokdbush uses (closest point on the box edge along a meridian, or at
 * the latitude where the great circle through the query point is tangent to the box's side).
 */
const RAD = Math.PI / 180;

export class TreeSearch {
  private readonly ids: ArrayLike<number>;
  private readonly coords: ArrayLike<number>;
  private readonly nodeSize: number;
  private heapD = new Float64Array(1);
  private heapI = new Int32Array(1);
  private size = 0;
  private k = 1;
  private qx = 0;
  private qy = 0;
  private cosQy = 1;
  private self = -1;
  private limit = Infinity;
  private found: number[] = [];
  /** unit vectors of the points in tree order (sphere only), and of the query point */
  private readonly ux: Float64Array;
  private readonly uy: Float64Array;
  private readonly uz: Float64Array;
  private qux = 0;
  private quy = 0;
  private quz = 0;

  constructor(index: KDBush, private readonly sphere: boolean) {
    this.ids = index.ids;
    this.coords = index.coords;
    this.nodeSize = index.nodeSize;
    const n = sphere ? this.ids.length : 0;
    this.ux = new Float64Array(n);
    this.uy = new Float64Array(n);
    this.uz = new Float64Array(n);
    for (let p = 0; p < n; p++) {
      const lon = this.coords[2 * p] * RAD, lat = this.coords[2 * p + 1] * RAD;
      this.ux[p] = Math.cos(lat) * Math.cos(lon);
      this.uy[p] = Math.cos(lat) * Math.sin(lon);
      this.uz[p] = Math.sin(lat);
    }
  }

  /** Key of the distance between the query point and the point at tree position p. */
  private key(p: number): number {
    if (!this.sphere) {
      const dx = this.coords[2 * p] - this.qx, dy = this.coords[2 * p + 1] - this.qy;
      return dx * dx + dy * dy;
    }
    const dx = this.ux[p] - this.qux, dy = this.uy[p] - this.quy, dz = this.uz[p] - this.quz;
    return (dx * dx + dy * dy + dz * dz) / 4;
  }

  /** Distance key for a radius r (coordinate units, or km on a sphere of radius earthKm). */
  radiusKey(r: number, earthKm: number): number {
    return this.sphere ? (r >= Math.PI * earthKm ? 1 : hav(r / earthKm)) : r * r;
  }

  /** The k nearest points other than `self`, ordered by (distance, index) — ties to the lower index. */
  nearest(qx: number, qy: number, self: number, k: number): Int32Array {
    this.start(qx, qy, self);
    if (this.heapD.length < k) {
      this.heapD = new Float64Array(k);
      this.heapI = new Int32Array(k);
    }
    this.k = k;
    this.size = 0;
    this.limit = Infinity;
    this.visit(0, this.ids.length - 1, 0, -Infinity, -Infinity, Infinity, Infinity, true);
    return this.heapI.slice(0, this.size);
  }

  /** All points (any index, `self` excluded) whose distance key is at most maxKey. */
  within(qx: number, qy: number, self: number, maxKey: number): number[] {
    this.start(qx, qy, self);
    this.limit = maxKey;
    this.found = [];
    this.visit(0, this.ids.length - 1, 0, -Infinity, -Infinity, Infinity, Infinity, false);
    return this.found;
  }

  private start(qx: number, qy: number, self: number): void {
    this.qx = qx;
    this.qy = qy;
    this.cosQy = Math.cos(qy * RAD);
    this.self = self;
    if (this.sphere) {
      this.qux = this.cosQy * Math.cos(qx * RAD);
      this.quy = this.cosQy * Math.sin(qx * RAD);
      this.quz = Math.sin(qy * RAD);
    }
  }

  private visit(left: number, right: number, axis: number, minX: number, minY: number, maxX: number, maxY: number, knn: boolean): void {
    if (left > right) return;
    const bound = this.boxKey(minX, minY, maxX, maxY);
    // a box at exactly the k-th key may still hold a tie with a lower index: keep it
    if (knn ? this.size === this.k && bound > this.heapD[0] : bound > this.limit) return;
    if (right - left <= this.nodeSize) {
      for (let p = left; p <= right; p++) this.offer(p, knn);
      return;
    }
    const m = (left + right) >> 1;
    this.offer(m, knn);
    const split = this.coords[2 * m + axis];
    const lowFirst = (axis === 0 ? this.qx : this.qy) <= split;
    for (let side = 0; side < 2; side++) {
      if ((side === 0) === lowFirst) this.visit(left, m - 1, 1 - axis, minX, minY, axis === 0 ? split : maxX, axis === 1 ? split : maxY, knn);
      else this.visit(m + 1, right, 1 - axis, axis === 0 ? split : minX, axis === 1 ? split : minY, maxX, maxY, knn);
    }
  }

  private boxKey(minX: number, minY: number, maxX: number, maxY: number): number {
    const { qx, qy } = this;
    if (!this.sphere) {
      const dx = qx < minX ? minX - qx : qx > maxX ? qx - maxX : 0;
      const dy = qy < minY ? minY - qy : qy > maxY ? qy - maxY : 0;
      return dx * dx + dy * dy;
    }
    if (minX === -Infinity || maxX === Infinity || minY === -Infinity || maxY === Infinity) {
      // open sides: clamp to the world
      minX = Math.max(minX, -180);
      maxX = Math.min(maxX, 180);
      minY = Math.max(minY, -90);
      maxY = Math.min(maxY, 90);
    }
    if (qx >= minX && qx <= maxX) {
      if (qy < minY) return hav((qy - minY) * RAD);
      if (qy > maxY) return hav((qy - maxY) * RAD);
      return 0;
    }
    const havDx = Math.min(hav((qx - minX) * RAD), hav((qx - maxX) * RAD));
    const cosDx = 1 - 2 * havDx;
    const tangentLat = cosDx <= 0 ? (qy > 0 ? 90 : -90) : Math.atan(Math.tan(qy * RAD) / cosDx) / RAD;
    if (tangentLat > minY && tangentLat < maxY) return this.keyAtLatitude(tangentLat, havDx);
    return Math.min(this.keyAtLatitude(minY, havDx), this.keyAtLatitude(maxY, havDx));
  }

  /** hav of the angle to a point at latitude lat, havDx being hav of the longitude difference. */
  private keyAtLatitude(lat: number, havDx: number): number {
    return this.cosQy * Math.cos(lat * RAD) * havDx + hav((this.qy - lat) * RAD);
  }

  private offer(p: number, knn: boolean): void {
    const id = this.ids[p];
    if (id === this.self) return;
    const d = this.key(p);
    if (!knn) {
      if (d <= this.limit) this.found.push(id);
      return;
    }
    const { heapD, heapI, k } = this;
    if (this.size < k) {
      // sift up in a max-heap ordered by (key, index)
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
    let c = 0;
    for (;;) {
      const l = 2 * c + 1;
      if (l >= k) break;
      const r = l + 1;
      const big = r < k && worse(heapD[r], heapI[r], heapD[l], heapI[l]) ? r : l;
      if (!worse(heapD[big], heapI[big], d, id)) break;
      heapD[c] = heapD[big];
      heapI[c] = heapI[big];
      c = big;
    }
    heapD[c] = d;
    heapI[c] = id;
  }
}

function hav(theta: number): number {
  const s = Math.sin(theta / 2);
  return s * s;
}

function worse(d1: number, i1: number, d2: number, i2: number): boolean {
  return d1 > d2 || (d1 === d2 && i1 > i2);
}
