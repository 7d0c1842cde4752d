import type { AreaGeometry, CoordinateKind } from '../../geo/types.js';

export interface Frame {
  /** map coordinates → pixel */
  x(px: number, py: number): number;
  y(px: number, py: number): number;
  width: number;
  height: number;
  /** pixels per map unit (projected coordinates only; approximate for geographic) */
  scale: number;
  /**
   * Longitude/latitude areas on both sides of the 180° meridian: the longitude where the map is cut
   * (longitudes below it are drawn 360° further east). Absent when nothing was moved.
   */
  longitudeCut?: number;
}

function eachPosition(g: AreaGeometry, f: (x: number, y: number) => void): void {
  if (g.kind === 'point') f(g.point[0], g.point[1]);
  else for (const poly of g.polygons) for (const ring of poly) for (const p of ring) f(p[0], p[1]);
}

/** One-degree bins of longitude, −180° to 180°. */
const BINS = 360;
const binOf = (lon: number) => Math.min(BINS - 1, Math.max(0, Math.floor(lon + 180)));

/**
 * Where to cut a map of longitude/latitude areas so that areas on both sides of the 180° meridian
 * (an island chain cut at ±180°, the Aleutians beside the rest of Alaska) sit together instead of at
 * the two edges of a map of the whole world.
 *
 * Each ring marks the one-degree bins of longitude it covers: from its westernmost to its easternmost
 * vertex, or, for a ring whose vertices span more than 180° (a ring cut at ±180°, with vertices at
 * 179° and −179°), from its westernmost vertex east of 0° to 180° and from −180° to its easternmost
 * vertex west of 0°. The map is cut at the middle of the widest run of bins that no area covers.
 * When that run reaches ±180° the map is drawn as the file has it (null); otherwise the longitude
 * of the cut is returned, and longitudes below it are drawn 360° further east.
 */
export function longitudeCut(geoms: readonly AreaGeometry[]): number | null {
  const covered = new Uint8Array(BINS);
  const mark = (from: number, to: number) => { for (let b = binOf(from); b <= binOf(to); b++) covered[b] = 1; };
  for (const g of geoms) {
    if (g.kind === 'point') { mark(g.point[0], g.point[0]); continue; }
    for (const poly of g.polygons) for (const ring of poly) {
      let min = Infinity, max = -Infinity, eastMin = Infinity, westMax = -Infinity;
      for (const p of ring) {
        const x = p[0];
        if (x < min) min = x;
        if (x > max) max = x;
        if (x >= 0 && x < eastMin) eastMin = x;
        if (x < 0 && x > westMax) westMax = x;
      }
      if (!(min <= max)) continue;
      if (max - min > 180 && eastMin <= 180 && westMax >= -180) { mark(eastMin, 180); mark(-180, westMax); }
      else mark(min, max);
    }
  }
  // the widest run of empty bins, going round the circle
  let bestStart = -1, bestLength = 0;
  const first = covered.indexOf(1);
  if (first < 0) return null;
  for (let k = 0, start = -1; k <= BINS; k++) {
    const b = (first + k) % BINS;
    if (!covered[b] && k < BINS) { if (start < 0) start = k; continue; }
    if (start >= 0 && k - start > bestLength) { bestLength = k - start; bestStart = (first + start) % BINS; }
    start = -1;
  }
  // the widest empty run reaches ±180° (it holds bin 0 or bin 359): the file's own longitudes keep the areas together
  if (bestLength === 0 || bestStart === 0 || bestStart + bestLength >= BINS) return null;
  return -180 + bestStart + bestLength / 2;
}

/**
 * Fits all areas into a box of at most maxWidth × maxHeight, keeping shapes: projected coordinates
 * are drawn as they are; longitude is shrunk by the cosine of the middle latitude so shapes away
 * from the equator are not stretched sideways, and areas on both sides of the 180° meridian are
 * drawn together (longitudeCut): longitudes below the cut are moved 360° east before drawing.
 */
export function fitFrame(geoms: readonly AreaGeometry[], kind: CoordinateKind, maxWidth: number, maxHeight: number, pad = 6): Frame {
  const cut = kind === 'geographic' ? longitudeCut(geoms) : null;
  const lon = cut === null ? (x: number) => x : (x: number) => (x < cut ? x + 360 : x);
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const g of geoms) eachPosition(g, (px, y) => {
    const x = lon(px);
    if (x < x0) x0 = x; if (x > x1) x1 = x; if (y < y0) y0 = y; if (y > y1) y1 = y;
  });
  if (!Number.isFinite(x0)) { x0 = 0; x1 = 1; y0 = 0; y1 = 1; }
  const kx = kind === 'geographic' ? Math.cos((((y0 + y1) / 2) * Math.PI) / 180) : 1;
  const w = Math.max((x1 - x0) * kx, 1e-12), h = Math.max(y1 - y0, 1e-12);
  const s = Math.min((maxWidth - 2 * pad) / w, (maxHeight - 2 * pad) / h);
  const width = Math.ceil(w * s + 2 * pad), height = Math.ceil(h * s + 2 * pad);
  return {
    x: (px) => pad + (lon(px) - x0) * kx * s,
    y: (_px, py) => pad + (y1 - py) * s,
    width, height, scale: s,
    ...(cut === null ? {} : { longitudeCut: cut }),
  };
}
