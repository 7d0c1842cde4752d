/**
 * Areas that are not what a tiling of a map should be: two areas with exactly the same shape, a part
 * of one area lying inside another area (or inside another part of itself), several areas at one
 * point. None stops a run (the neighbours can still be built), but each changes what the neighbours
 * mean, so each is named in a warning.
 *
 * Overlap test: for every polygon part, a point strictly inside it (the middle of the widest
 * stretch of a horizontal line through the middle of its box, holes excluded) is tested against the
 * other areas whose boxes hold it (a uniform grid of boxes finds them), by the even-odd rule over
 * all their rings. A part that lies partly inside another area is found when its inner point does;
 * slivers along a shared edge are not (they are what a snapping tolerance is for).
 */
import { listSome } from '../errors.js';
import type { AreaGeometry } from './types.js';
import { formatCount } from '../core/count.js';

/** Stop looking after this many findings of a kind: the warning lists a few anyway. */
const ENOUGH = 50;

export interface OverlapFindings {
  /** pairs of area indices with exactly the same shape */
  duplicates: [number, number][];
  /** area a's part (1-based) lies inside area b (b = a: inside another part of a itself) */
  overlaps: { a: number; part: number; b: number }[];
  /** groups (2 or more) of areas at exactly one representative point */
  coincident: number[][];
}

export function findOverlaps(geometries: AreaGeometry[], points?: { x: Float64Array; y: Float64Array }): OverlapFindings {
  const duplicates = sameShapes(geometries);
  const twins = new Set(duplicates.map(([a, b]) => `${a}:${b}`));
  const overlaps = partsInside(geometries, twins);
  const coincident = points ? samePoints(points, geometries) : [];
  return { duplicates, overlaps, coincident };
}

/** The warnings for the findings, naming areas by `label(i)` ("D07 (row 8)"). */
export function overlapWarnings(f: OverlapFindings, label: (i: number) => string, source: string): string[] {
  const out: string[] = [];
  if (f.duplicates.length) {
    out.push(
      `${source}: ${f.duplicates.length >= ENOUGH ? `at least ${ENOUGH}` : f.duplicates.length} pair(s) of areas have exactly the same shape: ` +
        `${listSome(f.duplicates.map(([a, b]) => `${label(a)} and ${label(b)}`), 5)}. They count as each other's neighbours and share one centre; ` +
        'check whether one is a copy that should be removed.',
    );
  }
  if (f.overlaps.length) {
    out.push(
      `${source}: ${f.overlaps.length >= ENOUGH ? `at least ${ENOUGH}` : f.overlaps.length} overlap(s) between areas or between the parts of one area: ` +
        `${listSome(f.overlaps.map((o) => (o.a === o.b ? `part ${o.part} of ${label(o.a)} and another of its parts` : `${label(o.a)} and ${label(o.b)}`)), 5)}. ` +
        'Areas should not overlap: contiguity links only areas whose boundaries touch, and an overlapped area\'s centre and size are off. Repair the boundaries in a GIS.',
    );
  }
  if (f.coincident.length) {
    const areas = f.coincident.reduce((s, g) => s + g.length, 0);
    out.push(
      `${source}: ${formatCount(areas)} areas share their location with another area (${formatCount(f.coincident.length)} place${f.coincident.length > 1 ? 's' : ''}; ` +
        `${listSome(f.coincident.map((g) => listSome(g.map(label), 4)), 3)}). Their distance is 0, so distance-based neighbours among them ` +
        'are decided by ties and inverse-distance weights cannot be formed; check for duplicated rows or points placed at one default location.',
    );
  }
  return out;
}

// --- exact duplicates

/** Every vertex (without the closing repeats), sorted: equal for the same shape whatever the start or winding. */
function vertexList(g: AreaGeometry): string {
  if (g.kind === 'point') return `${g.point[0]},${g.point[1]}`;
  const v: string[] = [];
  for (const polygon of g.polygons) for (const ring of polygon) for (let k = 0; k < ring.length - 1; k++) v.push(`${ring[k][0]},${ring[k][1]}`);
  return v.sort().join(';');
}

/**
 * Same shapes: areas are ordered by a numeric signature (vertex count and the sums of their
 * coordinates, which do not depend on the start or the winding), and only areas with equal
 * signatures are compared vertex by vertex.
 */
function sameShapes(geometries: AreaGeometry[]): [number, number][] {
  const idx: number[] = [];
  const count = new Float64Array(geometries.length);
  const sx = new Float64Array(geometries.length);
  const sy = new Float64Array(geometries.length);
  geometries.forEach((g, i) => {
    if (g.kind !== 'polygon') return; // points at one place are reported as coincident
    let c = 0, x = 0, y = 0;
    for (const polygon of g.polygons) for (const ring of polygon) for (let k = 0; k < ring.length - 1; k++) {
      const p = ring[k];
      c++;
      x += p[0];
      y += p[1];
    }
    count[i] = c;
    sx[i] = x;
    sy[i] = y;
    idx.push(i);
  });
  idx.sort((a, b) => sx[a] - sx[b] || sy[a] - sy[b] || count[a] - count[b]);
  const out: [number, number][] = [];
  for (let s = 0; s < idx.length && out.length < ENOUGH;) {
    let e = s + 1;
    while (e < idx.length && sx[idx[e]] === sx[idx[s]] && sy[idx[e]] === sy[idx[s]] && count[idx[e]] === count[idx[s]]) e++;
    if (e - s > 1) {
      const group = idx.slice(s, e).sort((a, b) => a - b);
      const full = group.map((i) => vertexList(geometries[i]));
      for (let a = 0; a < group.length && out.length < ENOUGH; a++) {
        for (let b = a + 1; b < group.length; b++) if (full[a] === full[b]) out.push([group[a], group[b]]);
      }
    }
    s = e;
  }
  return out.slice(0, ENOUGH);
}

// --- parts inside other areas

/** A point strictly inside the polygon (outer ring and holes), or null when none is found. */
export function innerPoint(polygon: number[][][]): [number, number] | null {
  let minY = Infinity, maxY = -Infinity;
  const outer = polygon[0];
  for (let k = 0; k < outer.length; k++) {
    const y = outer[k][1];
    if (y < minY) minY = y;
    if (y > maxY) maxY = y;
  }
  for (const t of [0.5, 0.37, 0.63, 0.21, 0.79]) {
    const y = minY + (maxY - minY) * t;
    const xs: number[] = [];
    for (const ring of polygon) {
      for (let k = 0; k < ring.length - 1; k++) {
        const xa = ring[k][0], ya = ring[k][1];
        const xb = ring[k + 1][0], yb = ring[k + 1][1];
        if ((ya > y) !== (yb > y)) xs.push(xa + ((y - ya) / (yb - ya)) * (xb - xa));
      }
    }
    xs.sort((p, q) => p - q);
    let best = -1, width = 0;
    for (let k = 0; k + 1 < xs.length; k += 2) {
      if (xs[k + 1] - xs[k] > width) {
        width = xs[k + 1] - xs[k];
        best = k;
      }
    }
    if (best >= 0) return [(xs[best] + xs[best + 1]) / 2, y];
  }
  return null;
}

/** Even-odd rule over every ring given. */
function inside(x: number, y: number, rings: number[][][]): boolean {
  let odd = false;
  for (const ring of rings) {
    for (let k = 0, j = ring.length - 2; k < ring.length - 1; j = k++) {
      const xa = ring[k][0], ya = ring[k][1];
      const xb = ring[j][0], yb = ring[j][1];
      if ((ya > y) !== (yb > y) && x < xa + ((y - ya) / (yb - ya)) * (xb - xa)) odd = !odd;
    }
  }
  return odd;
}

function partsInside(geometries: AreaGeometry[], twins: Set<string>): OverlapFindings['overlaps'] {
  const areas: number[] = [];
  geometries.forEach((g, i) => { if (g.kind === 'polygon') areas.push(i); });
  const m = areas.length;
  if (m === 0) return [];
  // each area's box (of its outer rings)
  const box = new Float64Array(4 * m);
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (let a = 0; a < m; a++) {
    const g = geometries[areas[a]] as Extract<AreaGeometry, { kind: 'polygon' }>;
    let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
    for (const polygon of g.polygons) {
      const ring = polygon[0];
      for (let k = 0; k < ring.length; k++) {
        const x = ring[k][0], y = ring[k][1];
        if (x < x0) x0 = x;
        if (y < y0) y0 = y;
        if (x > x1) x1 = x;
        if (y > y1) y1 = y;
      }
    }
    box[4 * a] = x0; box[4 * a + 1] = y0; box[4 * a + 2] = x1; box[4 * a + 3] = y1;
    if (x0 < minX) minX = x0;
    if (y0 < minY) minY = y0;
    if (x1 > maxX) maxX = x1;
    if (y1 > maxY) maxY = y1;
  }
  // a uniform grid over the layer's box, about one cell per area, as lists in one typed array;
  // boxes covering many cells (a large area among small ones) are kept aside and tried for every point
  const side = Math.max(1, Math.ceil(Math.sqrt(m)));
  const cw = (maxX - minX) / side || 1;
  const ch = (maxY - minY) / side || 1;
  const cellX = (v: number) => Math.min(side - 1, Math.max(0, Math.floor((v - minX) / cw)));
  const cellY = (v: number) => Math.min(side - 1, Math.max(0, Math.floor((v - minY) / ch)));
  const large: number[] = [];
  const start = new Int32Array(side * side + 1);
  const spans = (a: number) => [cellX(box[4 * a]), cellX(box[4 * a + 2]), cellY(box[4 * a + 1]), cellY(box[4 * a + 3])];
  const isLarge = new Uint8Array(m);
  for (let a = 0; a < m; a++) {
    const [x0, x1, y0, y1] = spans(a);
    if ((x1 - x0 + 1) * (y1 - y0 + 1) > 64) { isLarge[a] = 1; large.push(a); continue; }
    for (let cy = y0; cy <= y1; cy++) for (let cx = x0; cx <= x1; cx++) start[cy * side + cx + 1]++;
  }
  for (let c = 0; c < side * side; c++) start[c + 1] += start[c];
  const fill = start.slice(0, side * side);
  const members = new Int32Array(start[side * side]);
  for (let a = 0; a < m; a++) {
    if (isLarge[a]) continue;
    const [x0, x1, y0, y1] = spans(a);
    for (let cy = y0; cy <= y1; cy++) for (let cx = x0; cx <= x1; cx++) members[fill[cy * side + cx]++] = a;
  }
  const useLarge = large.length <= 1000 ? large : [];

  const out: OverlapFindings['overlaps'] = [];
  const reported = new Set<string>();
  const selfReported = new Set<number>();
  const tryArea = (a: number, q: number, x: number, y: number, part: number): boolean => {
    if (q === a || x < box[4 * q] || x > box[4 * q + 2] || y < box[4 * q + 1] || y > box[4 * q + 3]) return false;
    const i = areas[a], j = areas[q];
    const pair = i < j ? `${i}:${j}` : `${j}:${i}`;
    if (twins.has(pair) || reported.has(pair)) return false;
    const g = geometries[j] as Extract<AreaGeometry, { kind: 'polygon' }>;
    if (!insideAreas(x, y, g.polygons)) return false;
    out.push({ a: i, part: part + 1, b: j });
    reported.add(pair);
    return true;
  };
  for (let a = 0; a < m && out.length < ENOUGH; a++) {
    const i = areas[a];
    const g = geometries[i] as Extract<AreaGeometry, { kind: 'polygon' }>;
    for (let part = 0; part < g.polygons.length && out.length < ENOUGH; part++) {
      const pt = innerPoint(g.polygons[part]);
      if (!pt) continue;
      const x = pt[0], y = pt[1];
      // another part of the same area
      if (g.polygons.length > 1 && g.polygons.length <= 200 && !selfReported.has(i)) {
        for (let other = 0; other < g.polygons.length; other++) {
          if (other !== part && inside(x, y, g.polygons[other])) {
            out.push({ a: i, part: part + 1, b: i });
            selfReported.add(i);
            break;
          }
        }
      }
      const c = cellY(y) * side + cellX(x);
      let found = false;
      for (let p = start[c]; p < start[c + 1] && !found; p++) found = tryArea(a, members[p], x, y, part);
      for (let k = 0; k < useLarge.length && !found; k++) found = tryArea(a, useLarge[k], x, y, part);
    }
  }
  return out;
}

/** Even-odd rule over every ring of every polygon of an area. */
function insideAreas(x: number, y: number, polygons: number[][][][]): boolean {
  let odd = false;
  for (const polygon of polygons) if (inside(x, y, polygon)) odd = !odd;
  return odd;
}

// --- areas at one point

function samePoints(points: { x: Float64Array; y: Float64Array }, geometries: AreaGeometry[]): number[][] {
  const byPlace = new Map<string, number[]>();
  for (let i = 0; i < points.x.length; i++) {
    if (geometries[i].kind === 'polygon') continue; // polygons at one centre are duplicates or overlaps, reported above
    const key = `${points.x[i]},${points.y[i]}`;
    const list = byPlace.get(key);
    if (list) list.push(i);
    else byPlace.set(key, [i]);
  }
  return [...byPlace.values()].filter((g) => g.length > 1).slice(0, ENOUGH);
}

/** The warnings for a joined set of areas (labels: ID and row). */
export function areaShapeWarnings(
  joined: { ids: string[]; rows: number[]; geometries: AreaGeometry[]; rowKind?: 'row' | 'feature' },
  points: { x: Float64Array; y: Float64Array },
  source: string,
): string[] {
  const word = joined.rowKind === 'feature' ? 'feature' : 'row';
  return overlapWarnings(findOverlaps(joined.geometries, points), (i) => `${joined.ids[i]} (${word} ${joined.rows[i]})`, source);
}
