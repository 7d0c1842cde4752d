import type { AreaGeometry } from '../geo/types.js';
import type { CsrMatrix } from '../linalg/index.js';
import { InputError } from '../errors.js';
import { BoxIndex } from './box-index.js';
import { csrFromSortedPairs } from './pattern.js';

/** Relative size of the "exact" tolerance: 1e-9 of the larger side of the layer's bounding box. */
const EXACT_RELATIVE = 1e-9;

/** Boundary vertices of all areas, one ring after another, without closing repeats. */
interface Boundary {
  x: Float64Array;
  y: Float64Array;
  owner: Int32Array;
  /** next / previous vertex around the same ring; segment v runs from v to next[v] */
  next: Int32Array;
  prev: Int32Array;
  count: number;
  span: number;
}

/**
 * Binary contiguity pattern (values 1, symmetric, rows sorted by column).
 *
 * queen: the two areas share at least one boundary point — a vertex of one lies on the boundary
 *   (vertex or segment) of the other, within the tolerance.
 * rook: the two areas share a piece of boundary of positive length — some segment of one runs
 *   along a segment of the other over more than the tolerance.
 *
 * Both tests go vertex → nearby segments, so boundaries whose vertices differ along the shared
 * stretch (T-junctions, one side more detailed) are found: every end of a shared stretch is a
 * vertex of one of the two areas lying on a segment of the other.
 *
 * tolerance: in coordinate units, to bridge slivers and gaps; default 1e-9 × the layer's extent.
 * Point geometries have no boundary: they come out as areas without neighbours.
 * geographic: longitude/latitude, where a boundary along longitude 180 meets one along −180 (areas
 *   cut at the antimeridian).
 */
export function contiguityNeighbours(geometries: AreaGeometry[], rule: 'queen' | 'rook', tolerance?: number, geographic = false): CsrMatrix {
  if (tolerance !== undefined && !(Number.isFinite(tolerance) && tolerance >= 0)) {
    throw new InputError(`The contiguity tolerance must be a number of coordinate units, 0 or more; got ${tolerance}.`);
  }
  const n = geometries.length;
  const b = flattenBoundaries(geometries);
  const tol = Math.max(tolerance ?? 0, EXACT_RELATIVE * b.span);
  const { x, y, owner, next, prev, count } = b;

  const x0 = new Float64Array(count), y0 = new Float64Array(count);
  const x1 = new Float64Array(count), y1 = new Float64Array(count);
  for (let v = 0; v < count; v++) {
    const w = next[v];
    x0[v] = Math.min(x[v], x[w]) - tol;
    y0[v] = Math.min(y[v], y[w]) - tol;
    x1[v] = Math.max(x[v], x[w]) + tol;
    y1[v] = Math.max(y[v], y[w]) + tol;
  }
  const index = new BoxIndex(x0, y0, x1, y1);
  const places = groupCoincident(x, y, count);

  const pairs = new PairKeys(n);
  const mark = new Int32Array(n).fill(-1);
  const touching: number[] = [];
  for (let place = 0; place < places.count; place++) {
    const first = places.members[places.start[place]];
    const px = x[first], py = y[first];
    const found = index.search(px, py, px, py);
    const hits = index.results;
    if (rule === 'queen') {
      // every area whose boundary passes through this point touches every other such area
      touching.length = 0;
      for (let h = 0; h < found; h++) {
        const s = hits[h];
        const a = owner[s];
        if (mark[a] === place) continue;
        if (pointSegmentDistance(px, py, x[s], y[s], x[next[s]], y[next[s]]) > tol) continue;
        mark[a] = place;
        touching.push(a);
      }
      for (let u = 0; u < touching.length; u++) {
        for (let t = u + 1; t < touching.length; t++) pairs.add(touching[u], touching[t]);
      }
      continue;
    }
    for (let m = places.start[place], mEnd = places.start[place + 1]; m < mEnd; m++) {
      const v = places.members[m];
      const a = owner[v];
      const nx = x[next[v]], ny = y[next[v]], qx = x[prev[v]], qy = y[prev[v]];
      let lastPartner = -1;
      for (let h = 0; h < found; h++) {
        const s = hits[h];
        const other = owner[s];
        if (other === a || other === lastPartner) continue;
        const sx = x[s], sy = y[s], ex = x[next[s]], ey = y[next[s]];
        if (runsAlong(sx, sy, ex, ey, px, py, nx, ny, tol) || runsAlong(sx, sy, ex, ey, px, py, qx, qy, tol)) {
          lastPartner = other;
          pairs.add(a, other);
        }
      }
    }
  }
  if (geographic) acrossAntimeridian(b, rule, tol, pairs);
  return csrFromSortedPairs(n, pairs.sortedUnique());
}

/**
 * Areas cut at the antimeridian: latitude intervals of boundary on longitude 180 against those on
 * −180. Rook pairs overlap by more than the tolerance; queen pairs touch (a shared end is enough),
 * and a vertex on the meridian counts as a point interval.
 */
function acrossAntimeridian(b: Boundary, rule: 'queen' | 'rook', tol: number, pairs: PairKeys): void {
  const { x, y, owner, next, count } = b;
  const east: number[] = [], west: number[] = []; // triples: owner, low latitude, high latitude
  const on = (v: number, side: number) => Math.abs(x[v] - side) <= tol;
  for (let v = 0; v < count; v++) {
    for (const [side, list] of [[180, east], [-180, west]] as const) {
      if (!on(v, side)) continue;
      const w = next[v];
      if (on(w, side)) list.push(owner[v], Math.min(y[v], y[w]), Math.max(y[v], y[w]));
      else if (rule === 'queen') list.push(owner[v], y[v], y[v]);
    }
  }
  for (let i = 0; i < east.length; i += 3) {
    for (let j = 0; j < west.length; j += 3) {
      if (east[i] === west[j]) continue;
      const overlap = Math.min(east[i + 2], west[j + 2]) - Math.max(east[i + 1], west[j + 1]);
      if (rule === 'rook' ? overlap > tol : overlap >= -tol) pairs.add(east[i], west[j]);
    }
  }
}

/** Unordered area pairs as keys min·n + max in a growable Float64Array. */
class PairKeys {
  private keys = new Float64Array(1024);
  private length = 0;
  constructor(private readonly n: number) {}

  add(a: number, b: number): void {
    if (this.length === this.keys.length) {
      const bigger = new Float64Array(this.keys.length * 2);
      bigger.set(this.keys);
      this.keys = bigger;
    }
    this.keys[this.length++] = a < b ? a * this.n + b : b * this.n + a;
  }

  sortedUnique(): Float64Array {
    const sorted = this.keys.subarray(0, this.length).sort();
    let m = 0;
    for (let k = 0; k < sorted.length; k++) if (k === 0 || sorted[k] !== sorted[k - 1]) sorted[m++] = sorted[k];
    return sorted.slice(0, m);
  }
}

/**
 * Vertices at bitwise-equal coordinates grouped into places (open-addressing hash on the
 * coordinates' bits), so that each shared corner is looked up once, not once per area.
 */
function groupCoincident(x: Float64Array, y: Float64Array, count: number): { count: number; start: Int32Array; members: Int32Array } {
  let size = 1;
  while (size < count * 2) size <<= 1;
  const slotPlace = new Int32Array(size).fill(-1);
  const placeVertex: number[] = [];
  const placeOf = new Int32Array(count);
  const bits = new Float64Array(2);
  const words = new Int32Array(bits.buffer);
  for (let v = 0; v < count; v++) {
    bits[0] = x[v] + 0; // + 0 turns −0 into 0
    bits[1] = y[v] + 0;
    let h = Math.imul(words[0] ^ Math.imul(words[1], 0x9e3779b1), 0x85ebca6b) ^ Math.imul(words[2] ^ Math.imul(words[3], 0xc2b2ae35), 0x27d4eb2f);
    h ^= h >>> 15;
    let slot = h & (size - 1);
    for (;;) {
      const place = slotPlace[slot];
      if (place < 0) {
        slotPlace[slot] = placeVertex.length;
        placeOf[v] = placeVertex.length;
        placeVertex.push(v);
        break;
      }
      const w = placeVertex[place];
      if (x[w] === x[v] && y[w] === y[v]) {
        placeOf[v] = place;
        break;
      }
      slot = (slot + 1) & (size - 1);
    }
  }
  const places = placeVertex.length;
  const start = new Int32Array(places + 1);
  for (let v = 0; v < count; v++) start[placeOf[v] + 1]++;
  for (let p = 0; p < places; p++) start[p + 1] += start[p];
  const fill = start.slice(0, places);
  const members = new Int32Array(count);
  for (let v = 0; v < count; v++) members[fill[placeOf[v]]++] = v;
  return { count: places, start, members };
}

function flattenBoundaries(geometries: AreaGeometry[]): Boundary {
  let total = 0;
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  geometries.forEach((g, a) => {
    if (g.kind !== 'polygon') return;
    for (const polygon of g.polygons) {
      for (const ring of polygon) {
        total += ring.length;
        for (const pos of ring) {
          const px = pos[0], py = pos[1];
          if (!Number.isFinite(px) || !Number.isFinite(py)) {
            throw new InputError(`Area ${a + 1} has a boundary point that is not a pair of finite numbers (${px}, ${py}). Repair the boundary file and load it again.`, { feature: a + 1 });
          }
          if (px < minX) minX = px;
          if (px > maxX) maxX = px;
          if (py < minY) minY = py;
          if (py > maxY) maxY = py;
        }
      }
    }
  });
  const span = total > 0 ? Math.max(maxX - minX, maxY - minY) || 1 : 1;
  const same = EXACT_RELATIVE * span;
  const x = new Float64Array(total), y = new Float64Array(total);
  const owner = new Int32Array(total), next = new Int32Array(total), prev = new Int32Array(total);
  let count = 0;
  geometries.forEach((g, a) => {
    if (g.kind !== 'polygon') return;
    for (const polygon of g.polygons) {
      for (const ring of polygon) {
        const start = count;
        for (const pos of ring) {
          // drop repeated points (and the closing point) so that every segment has a length
          if (count > start && Math.abs(pos[0] - x[count - 1]) <= same && Math.abs(pos[1] - y[count - 1]) <= same) continue;
          x[count] = pos[0];
          y[count] = pos[1];
          owner[count] = a;
          count++;
        }
        while (count - start > 1 && Math.abs(x[count - 1] - x[start]) <= same && Math.abs(y[count - 1] - y[start]) <= same) count--;
        if (count - start < 2) {
          count = start;
          continue;
        }
        for (let v = start; v < count; v++) {
          next[v] = v + 1 < count ? v + 1 : start;
          prev[v] = v > start ? v - 1 : count - 1;
        }
      }
    }
  });
  return { x, y, owner, next, prev, count, span };
}

function pointSegmentDistance(px: number, py: number, ax: number, ay: number, bx: number, by: number): number {
  const dx = bx - ax, dy = by - ay;
  const len2 = dx * dx + dy * dy;
  let t = len2 > 0 ? ((px - ax) * dx + (py - ay) * dy) / len2 : 0;
  if (t < 0) t = 0;
  else if (t > 1) t = 1;
  return Math.hypot(px - (ax + t * dx), py - (ay + t * dy));
}

/**
 * True when segment p→q lies along segment a→b over a stretch longer than tol: the projections
 * of p, q onto a→b overlap it by more than tol, and at both ends of that overlap p→q is within
 * tol of the line through a and b (distance to the line varies linearly along p→q).
 */
function runsAlong(ax: number, ay: number, bx: number, by: number, px: number, py: number, qx: number, qy: number, tol: number): boolean {
  const dx = bx - ax, dy = by - ay;
  const len = Math.hypot(dx, dy);
  if (len <= tol) return false;
  const ux = dx / len, uy = dy / len;
  const tp = (px - ax) * ux + (py - ay) * uy;
  const tq = (qx - ax) * ux + (qy - ay) * uy;
  const lo = Math.max(0, Math.min(tp, tq));
  const hi = Math.min(len, Math.max(tp, tq));
  if (hi - lo <= tol) return false;
  const dp = ux * (py - ay) - uy * (px - ax);
  const dq = ux * (qy - ay) - uy * (qx - ax);
  const atLo = dp + ((dq - dp) * (lo - tp)) / (tq - tp);
  const atHi = dp + ((dq - dp) * (hi - tp)) / (tq - tp);
  return Math.abs(atLo) <= tol && Math.abs(atHi) <= tol;
}
