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
      `${source}: ${areas} areas share their location with another area (${f.coincident.length} place${f.coincident.length > 1 ? 's' : ''}; ` +
        `${listSome(f.coincident.map((g) => listSome(g.map(label), 4)), 3)}). Their distance is 0, so distance-based neighbours among them ` +
        'are decided by ties and inverse-distance weights cannot be formed; check for duplicated rows or points placed at one default location.',
    );
  }
  return out;
}

// --- exact duplicates

function shapeKey(g: AreaGeometry): string {
  if (g.kind === 'point') return `p${g.point[0]},${g.point[1]}`;
  let count = 0, sx = 0, sy = 0;
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (const polygon of g.polygons) for (const ring of polygon) for (let k = 0; k < ring.length - 1; k++) {
    const p = ring[k];
    const x = p[0], y = p[1];
    count++;
    sx += x;
    sy += y;
    if (x < minX) minX = x;
    if (y < minY) minY = y;
    if (x > maxX) maxX = x;
    if (y > maxY) maxY = y;
  }
  return `${count}|${minX},${minY},${maxX},${maxY}|${sx},${sy}`;
}

/** Every vertex (without the closing repeats), sorted: equal for the same shape whatever the start or winding. */
function vertexList(g: AreaGeometry): string {
  if (g.kind === 'point') return `${g.point[0]},${g.point[1]}`;
  const v: string[] = [];
  for (const polygon of g.polygons) for (const ring of polygon) for (let k = 0; k < ring.length - 1; k++) v.push(`${ring[k][0]},${ring[k][1]}`);
  return v.sort().join(';');
}

function sameShapes(geometries: AreaGeometry[]): [number, number][] {
  const byKey = new Map<string, number[]>();
  geometries.forEach((g, i) => {
    if (g.kind !== 'polygon') return; // points at one place are reported as coincident
    const key = shapeKey(g);
    const list = byKey.get(key);
    if (list) list.push(i);
    else byKey.set(key, [i]);
  });
  const out: [number, number][] = [];
  for (const list of byKey.values()) {
    if (list.length < 2) continue;
    const full = list.map((i) => vertexList(geometries[i]));
    for (let a = 0; a < list.length && out.length < ENOUGH; a++) {
      for (let b = a + 1; b < list.length; b++) if (full[a] === full[b]) out.push([list[a], list[b]]);
    }
  }
  return out.slice(0, ENOUGH);
}

// --- parts inside other areas

type Box = [number, number, number, number];

function boxOf(rings: number[][][]): Box {
  const b: Box = [Infinity, Infinity, -Infinity, -Infinity];
  for (const ring of rings) for (let k = 0; k < ring.length; k++) {
    const x = ring[k][0], y = ring[k][1];
    if (x < b[0]) b[0] = x;
    if (y < b[1]) b[1] = y;
    if (x > b[2]) b[2] = x;
    if (y > b[3]) b[3] = y;
  }
  return b;
}

/** A point strictly inside the polygon (outer ring and holes), or null when none is found. */
export function innerPoint(polygon: number[][][]): [number, number] | null {
  const [, minY, , maxY] = boxOf([polygon[0]]);
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
  const polys: { i: number; rings: number[][][]; box: Box }[] = [];
  geometries.forEach((g, i) => {
    if (g.kind === 'polygon') {
      const rings = g.polygons.flat();
      polys.push({ i, rings, box: boxOf(g.polygons.map((p) => p[0])) });
    }
  });
  if (polys.length === 0) return [];
  // a uniform grid over the layer's box, about one cell per area
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (const p of polys) {
    minX = Math.min(minX, p.box[0]);
    minY = Math.min(minY, p.box[1]);
    maxX = Math.max(maxX, p.box[2]);
    maxY = Math.max(maxY, p.box[3]);
  }
  const side = Math.max(1, Math.ceil(Math.sqrt(polys.length)));
  const cw = (maxX - minX) / side || 1;
  const ch = (maxY - minY) / side || 1;
  const cell = (v: number, lo: number, size: number) => Math.min(side - 1, Math.max(0, Math.floor((v - lo) / size)));
  const grid = new Map<number, number[]>();
  // boxes covering many cells (a large area among small ones) are kept aside and tried for every point
  const large: number[] = [];
  polys.forEach((p, k) => {
    const x0 = cell(p.box[0], minX, cw), x1 = cell(p.box[2], minX, cw);
    const y0 = cell(p.box[1], minY, ch), y1 = cell(p.box[3], minY, ch);
    if ((x1 - x0 + 1) * (y1 - y0 + 1) > 64) {
      large.push(k);
      return;
    }
    for (let cx = x0; cx <= x1; cx++) for (let cy = y0; cy <= y1; cy++) {
      const key = cy * side + cx;
      const list = grid.get(key);
      if (list) list.push(k);
      else grid.set(key, [k]);
    }
  });
  const out: OverlapFindings['overlaps'] = [];
  const reported = new Set<string>();
  const selfReported = new Set<number>();
  for (const p of polys) {
    const g = geometries[p.i] as Extract<AreaGeometry, { kind: 'polygon' }>;
    for (let part = 0; part < g.polygons.length && out.length < ENOUGH; part++) {
      const pt = innerPoint(g.polygons[part]);
      if (!pt) continue;
      const [x, y] = pt;
      // another part of the same area
      if (g.polygons.length > 1 && g.polygons.length <= 200 && !selfReported.has(p.i)) {
        for (let other = 0; other < g.polygons.length; other++) {
          if (other !== part && inside(x, y, g.polygons[other])) {
            out.push({ a: p.i, part: part + 1, b: p.i });
            selfReported.add(p.i);
            break;
          }
        }
      }
      const near = grid.get(cell(y, minY, ch) * side + cell(x, minX, cw)) ?? [];
      for (const k of large.length <= 1000 ? near.concat(large) : near) {
        const q = polys[k];
        if (q.i === p.i || x < q.box[0] || x > q.box[2] || y < q.box[1] || y > q.box[3]) continue;
        const pair = p.i < q.i ? `${p.i}:${q.i}` : `${q.i}:${p.i}`;
        if (twins.has(pair) || reported.has(pair)) continue;
        if (inside(x, y, q.rings)) {
          out.push({ a: p.i, part: part + 1, b: q.i });
          reported.add(pair);
          break;
        }
      }
    }
    if (out.length >= ENOUGH) break;
  }
  return out;
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
