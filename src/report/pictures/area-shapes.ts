/**
 * The areas of a map as SVG, drawn so that a map of many areas stays quick to draw and to turn into
 * a picture, and says how it was drawn.
 *
 * Up to MANY_AREAS areas each area is one path with an outline. Above that the outlines are left
 * out (at a pixel or two per area they would cover the colours) and the areas of one colour are
 * one path, with every ring turned so that the non-zero fill rule keeps holes open and overlaps
 * filled. When the boundaries carry more than POINT_BUDGET points they are simplified in pixel
 * space to within SIMPLIFY_PX of the original line (Ramer–Douglas–Peucker, by turf's simplify
 * module), which cannot be seen at the map's size. No area is ever left out: one that is too
 * small to show at the map's scale is drawn as a one-pixel square where it lies.
 */
import { simplify } from '@turf/simplify';
import type { AreaGeometry } from '../../geo/types.js';
import type { Frame } from './projection.js';
import { c1 } from './svg.js';
import { formatCount } from '../../core/count.js';

/** Above this many areas: no outlines, one path per colour. */
export const MANY_AREAS = 20_000;
/** Above this many boundary points (all rings, closing point not counted): simplified. */
export const POINT_BUDGET = 100_000;
/** How far, in pixels, a simplified boundary may stray from the original. */
export const SIMPLIFY_PX = 0.5;

/** How the areas of one map were drawn, for the note beside it. */
export interface MapDrawing {
  areas: number;
  /** each area outlined (false: outlines left out for the number of areas) */
  outlines: boolean;
  simplified: null | {
    tolerancePx: number;
    /** the same tolerance in the boundary file's units (degrees of latitude for geographic coordinates) */
    toleranceMapUnits: number;
    pointsBefore: number;
    pointsAfter: number;
  };
  /** areas too small to show at the map's scale, drawn as one-pixel squares */
  enlarged: number;
  /** longitude/latitude areas on both sides of 180°: longitudes below this were drawn 360° further east (projection.ts) */
  longitudeCut?: number;
}

export interface AreaLook {
  stroke: string;
  strokeWidth: number;
  /** radius of a point area, in pixels, while there are few areas */
  pointRadius: number;
  pointStroke: string;
}

type Ring = number[][];

function countPoints(geoms: readonly AreaGeometry[]): number {
  let n = 0;
  for (const g of geoms) {
    if (g.kind === 'point') continue;
    for (const poly of g.polygons) for (const ring of poly) n += Math.max(0, ring.length - 1);
  }
  return n;
}

/** Twice the signed area of a closed ring in pixel space (positive: counter-clockwise on screen). */
function signedArea2(ring: Ring): number {
  let s = 0;
  for (let k = 0; k + 1 < ring.length; k++) s += ring[k][0] * ring[k + 1][1] - ring[k + 1][0] * ring[k][1];
  return s;
}

/** Rings with fewer points than this are drawn as they are: simplifying them saves nothing. */
const SIMPLIFY_FROM_POINTS = 8;

/**
 * A ring in pixel space. When simplifying, points within a fifth of the tolerance of the last point
 * kept are dropped first (they round to the same tenth of a pixel anyway), then turf's simplify
 * module runs Ramer–Douglas–Peucker on what is left; it refuses degenerate rings, which stay as
 * they are.
 */
function pixelRing(ring: readonly number[][], frame: Frame, tolerance: number): Ring {
  const px: Ring = [];
  const near = (tolerance / 5) ** 2;
  let lx = NaN, ly = NaN;
  for (let k = 0; k < ring.length; k++) {
    const x = frame.x(ring[k][0], ring[k][1]), y = frame.y(ring[k][0], ring[k][1]);
    if (tolerance && k > 0 && k < ring.length - 1 && (x - lx) ** 2 + (y - ly) ** 2 < near) continue;
    px.push([x, y]);
    lx = x; ly = y;
  }
  if (!tolerance || px.length < SIMPLIFY_FROM_POINTS) return px;
  try {
    return simplify({ type: 'Polygon', coordinates: [px] }, { tolerance, highQuality: false, mutate: true }).coordinates[0];
  } catch {
    return px;
  }
}

/** Path data of one ring rounded to a tenth of a pixel, or '' when it rounds to fewer than three points. */
function ringPath(ring: Ring): string {
  const pts: string[] = [];
  let last = '';
  for (const p of ring) {
    const s = `${c1(p[0])} ${c1(p[1])}`;
    if (s !== last) pts.push(s);
    last = s;
  }
  if (pts.length > 1 && pts[pts.length - 1] === pts[0]) pts.pop();
  return pts.length >= 3 ? `M${pts.join('L')}Z` : '';
}

/** A one-pixel square at the middle of a ring's box: where an area too small to draw lies. */
function dotPath(ring: Ring): string {
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const p of ring) { x0 = Math.min(x0, p[0]); x1 = Math.max(x1, p[0]); y0 = Math.min(y0, p[1]); y1 = Math.max(y1, p[1]); }
  // on whole pixels, so that the square is one full pixel of the area's colour
  return `M${Math.floor((x0 + x1) / 2)} ${Math.floor((y0 + y1) / 2)}h1v1h-1Z`;
}

/** True when a ring spans less than this in both directions: it would not show, so it gets a dot. */
const TOO_SMALL_PX = 0.3;

function tooSmall(ring: Ring): boolean {
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const p of ring) { x0 = Math.min(x0, p[0]); x1 = Math.max(x1, p[0]); y0 = Math.min(y0, p[1]); y1 = Math.max(y1, p[1]); }
  return x1 - x0 < TOO_SMALL_PX && y1 - y0 < TOO_SMALL_PX;
}

/**
 * Path data of one polygonal area in pixel space. `orient`: outer rings counter-clockwise on
 * screen, holes clockwise (for the non-zero rule when areas share a path).
 */
function areaPath(g: Extract<AreaGeometry, { kind: 'polygon' }>, frame: Frame, tolerance: number, orient: boolean, count: { after: number }): { d: string; enlarged: boolean } {
  const parts: string[] = [];
  let largest: Ring | null = null, largestArea = -1;
  for (const poly of g.polygons) {
    poly.forEach((raw, r) => {
      if (raw.length < 3) return;
      let ring = pixelRing(raw, frame, tolerance);
      count.after += Math.max(0, ring.length - 1);
      const a = signedArea2(ring);
      if (Math.abs(a) > largestArea) { largestArea = Math.abs(a); largest = ring; }
      if (orient && (r === 0 ? a < 0 : a > 0)) ring = ring.slice().reverse();
      const d = ringPath(ring);
      if (d) parts.push(d);
    });
  }
  const outer = largest as Ring | null;
  if (outer && (parts.length === 0 || tooSmall(outer))) return { d: dotPath(outer), enlarged: true };
  return { d: parts.join(''), enlarged: false };
}

function circlePath(cx: number, cy: number, r: number): string {
  return `M${c1(cx - r)} ${c1(cy)}a${r} ${r} 0 1 0 ${2 * r} 0a${r} ${r} 0 1 0 ${-2 * r} 0Z`;
}

/** Path data of every polygonal area for one frame ('' for a point), with what the drawing did. */
interface Shapes { d: string[]; dot: Uint8Array; enlarged: number; pointsBefore: number; pointsAfter: number; tolerance: number }

/**
 * The maps of one run share their areas and frame (outcome, residuals, local maps): their paths are
 * worked out once per geometry list and frame, and kept while the list lives.
 */
const SHAPES = new WeakMap<readonly AreaGeometry[], Map<string, Shapes>>();

function shapesOf(geoms: readonly AreaGeometry[], frame: Frame, orient: boolean): Shapes {
  const key = `${frame.width} ${frame.height} ${frame.scale} ${frame.x(0, 0)} ${frame.y(0, 0)} ${orient}`;
  let byFrame = SHAPES.get(geoms);
  const kept = byFrame?.get(key);
  if (kept) return kept;
  const pointsBefore = countPoints(geoms);
  const tolerance = pointsBefore > POINT_BUDGET ? SIMPLIFY_PX : 0;
  const count = { after: 0 };
  let enlarged = 0;
  const dot = new Uint8Array(geoms.length);
  const d = geoms.map((g, i) => {
    if (g.kind === 'point') return '';
    const a = areaPath(g, frame, tolerance, orient, count);
    if (a.enlarged) { enlarged++; dot[i] = 1; }
    return a.d;
  });
  const shapes: Shapes = { d, dot, enlarged, pointsBefore, pointsAfter: count.after, tolerance };
  if (!byFrame) SHAPES.set(geoms, (byFrame = new Map()));
  byFrame.set(key, shapes);
  return shapes;
}

/**
 * Path data of each polygonal area ('' for a point) as drawAreas draws it on this frame: for
 * overlays such as hatching drawn over chosen areas.
 */
export function areaPaths(geoms: readonly AreaGeometry[], frame: Frame): readonly string[] {
  return shapesOf(geoms, frame, geoms.length > MANY_AREAS).d;
}

/**
 * The areas' SVG, inside a group moved right by `left` and down by `top` pixels; `fillOf(i)` is
 * area i's fill. Returns the SVG elements and how they were drawn.
 */
export function drawAreas(geoms: readonly AreaGeometry[], frame: Frame, top: number, fillOf: (i: number) => string, look: AreaLook, left = 0): { body: string[]; drawing: MapDrawing } {
  const many = geoms.length > MANY_AREAS;
  const shapes = shapesOf(geoms, frame, many);
  const { tolerance, pointsBefore, pointsAfter, enlarged } = shapes;
  const body: string[] = [];
  if (!many) {
    body.push(`<g transform="translate(${left} ${top})" stroke="${look.stroke}" stroke-width="${look.strokeWidth}" stroke-linejoin="round" fill-rule="evenodd">`);
    for (let i = 0; i < geoms.length; i++) {
      const g = geoms[i];
      const fill = fillOf(i);
      if (g.kind === 'point') {
        body.push(`<circle cx="${c1(frame.x(g.point[0], g.point[1]))}" cy="${c1(frame.y(g.point[0], g.point[1]))}" r="${look.pointRadius}" fill="${fill}" stroke="${look.pointStroke}"/>`);
        continue;
      }
      const d = shapes.d[i];
      // an outline would cover most of a one-pixel square
      if (d) body.push(`<path d="${d}" fill="${fill}"${shapes.dot[i] ? ' stroke="none"' : ''}/>`);
    }
    body.push('</g>');
  } else {
    const byFill = new Map<string, string[]>();
    // points shrink with the number of areas, to at most half of a grid cell's side, and at least a pixel
    const r = Math.max(0.6, Math.min(look.pointRadius, 0.5 * Math.sqrt((frame.width * frame.height) / geoms.length)));
    for (let i = 0; i < geoms.length; i++) {
      const g = geoms[i];
      const d = g.kind === 'point' ? circlePath(frame.x(g.point[0], g.point[1]), frame.y(g.point[0], g.point[1]), +r.toFixed(2)) : shapes.d[i];
      if (!d) continue;
      const fill = fillOf(i);
      const list = byFill.get(fill);
      if (list) list.push(d); else byFill.set(fill, [d]);
    }
    body.push(`<g transform="translate(${left} ${top})" stroke="none" fill-rule="nonzero">`);
    for (const [fill, ds] of byFill) body.push(`<path d="${ds.join('')}" fill="${fill}"/>`);
    body.push('</g>');
  }
  return {
    body,
    drawing: {
      areas: geoms.length,
      outlines: !many,
      simplified: tolerance ? { tolerancePx: tolerance, toleranceMapUnits: tolerance / frame.scale, pointsBefore, pointsAfter } : null,
      enlarged,
      ...(frame.longitudeCut === undefined ? {} : { longitudeCut: frame.longitudeCut }),
    },
  };
}

/** A longitude in words: "172.5° E", "60° W", "0°". */
function longitudeWords(lon: number): string {
  const a = +Math.abs(lon).toFixed(1);
  return a === 0 || a === 180 ? `${a}°` : `${a}° ${lon > 0 ? 'E' : 'W'}`;
}

/** The note that goes beside a map drawn in any way other than plainly (simplified, or cut away from ±180°); null when it was drawn plainly. */
export function describeDrawing(d: MapDrawing, coordinates: 'geographic' | 'projected'): string | null {
  const parts: string[] = [];
  const n = formatCount;
  if (!d.outlines) parts.push('outlines between areas left out, as at this size they would hide the colours');
  if (d.simplified) {
    const s = d.simplified;
    const units = coordinates === 'projected' ? `${n(+s.toleranceMapUnits.toPrecision(2))} map units` : `${+s.toleranceMapUnits.toPrecision(2)} degrees`;
    parts.push(s.pointsAfter < s.pointsBefore
      ? `boundaries simplified to within ${s.tolerancePx} pixel of the true line (about ${units}; Ramer–Douglas–Peucker), ${n(s.pointsAfter)} boundary points drawn of ${n(s.pointsBefore)}`
      : `boundaries drawn as they are: simplifying them to within ${s.tolerancePx} pixel (about ${units}) would remove none of their ${n(s.pointsBefore)} points`);
  }
  if (d.enlarged) parts.push(`${n(d.enlarged)} area${d.enlarged === 1 ? '' : 's'} too small to show drawn as one-pixel squares`);
  const sentences: string[] = [];
  if (parts.length) sentences.push(`Maps of ${n(d.areas)} areas are drawn simplified here: ${parts.join('; ')}. Every area is on the map, and the tables hold the exact values.`);
  if (d.longitudeCut !== undefined) {
    sentences.push(`The areas lie on both sides of the 180° meridian, so the maps are drawn across it: longitudes west of ${longitudeWords(d.longitudeCut)} are moved 360° east, and the areas sit together (the tables and files keep the longitudes as given).`);
  }
  return sentences.length ? sentences.join(' ') : null;
}
