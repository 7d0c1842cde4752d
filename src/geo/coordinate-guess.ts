/**
 * When a file does not say what its coordinates are and every one lies within ±180/±90, they may be
 * longitude/latitude degrees or planar units that happen to be small (a field trial in metres, a
 * map digitised in inches). The rule here, the one the README states:
 *
 * The layer is read as projected (planar) when both
 *  1. the ranges are small: every x and every y lies between 0 and 90, the numbers a local grid
 *     counted from its own corner has; and
 *  2. the shapes are not plausible on the sphere: among at least MIN_AREAS polygon areas, their
 *     bounding boxes are in the median closer to as wide as tall in the file's own units than they
 *     would be on the ground if the numbers were degrees. With m the median of log(width / height)
 *     and c the median of log(1 / cos latitude) at the boxes' centres, the ground reading has log
 *     aspect m − c, the planar one m; planar wins when |m| < |m − c|, that is m < c / 2. (Areas are
 *     on the whole neither wider nor taller on the ground; one degree of longitude is cos(latitude)
 *     of one of latitude.)
 * Otherwise they are read as longitude/latitude. Near the equator c is near 0 and the shapes cannot
 * tell; there the two readings give nearly the same neighbours, and the warning says it was a guess.
 * Common practice, not a theorem: the analyst's --coordinates choice always wins.
 */
import type { Area } from './types.js';

/** Fewer polygons than this say too little about typical shapes. */
export const MIN_AREAS = 5;

export interface PlanarLook {
  planar: boolean;
  /** one sentence on what was measured, for the evidence */
  reason: string;
}

export function shapesLookPlanar(areas: Area[], bounds: [number, number, number, number]): PlanarLook {
  const [x0, y0, x1, y1] = bounds;
  if (!(x0 >= 0 && y0 >= 0 && x1 <= 90 && y1 <= 90)) {
    return { planar: false, reason: 'not every coordinate lies between 0 and 90, so they are not a small local grid' };
  }
  const logAspect: number[] = [];
  const logStretch: number[] = [];
  for (const a of areas) {
    const g = a.geometry;
    if (!g || g.kind !== 'polygon') continue;
    let ax = Infinity, ay = Infinity, bx = -Infinity, by = -Infinity;
    for (const polygon of g.polygons) {
      for (const p of polygon[0]) {
        if (p[0] < ax) ax = p[0];
        if (p[0] > bx) bx = p[0];
        if (p[1] < ay) ay = p[1];
        if (p[1] > by) by = p[1];
      }
    }
    if (!(bx > ax && by > ay)) continue;
    logAspect.push(Math.log((bx - ax) / (by - ay)));
    logStretch.push(-Math.log(Math.cos((((ay + by) / 2) * Math.PI) / 180)));
  }
  if (logAspect.length < MIN_AREAS) {
    return { planar: false, reason: `fewer than ${MIN_AREAS} polygon areas, too few to judge their shapes` };
  }
  const m = median(logAspect);
  const c = median(logStretch);
  const width = Math.exp(m).toFixed(2);
  const ground = Math.exp(m - c).toFixed(2);
  return m < c / 2
    ? { planar: true, reason: `the areas are typically ${width} times as wide as tall in these units but would be ${ground} on the ground if they were degrees, so they fit planar units better` }
    : { planar: false, reason: `the areas are typically ${ground} times as wide as tall on the ground if these are degrees (${width} in planar units), which fits degrees at least as well` };
}

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : (s[h - 1] + s[h]) / 2;
}
