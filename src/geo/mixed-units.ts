/**
 * Catches a layer that mixes longitude/latitude degrees with planar units (e.g. some features
 * exported before reprojection, some after). The layer-wide ranges cannot see this: they only say
 * "beyond degrees", so the file would be read as projected and the degree features would sit in a
 * tiny clump near the origin.
 */
import { InputError, listSome } from '../errors.js';
import type { Area, AreaGeometry } from './types.js';
import { featureLabel } from './feature-label.js';
import { formatCount } from '../core/count.js';

/** Planar coordinates this far from the origin (in both axes' box) cannot be degrees or a small local grid. */
const FAR = 1e4;

function box(g: AreaGeometry): [number, number, number, number] {
  if (g.kind === 'point') return [g.point[0], g.point[1], g.point[0], g.point[1]];
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const polygon of g.polygons) {
    for (const p of polygon[0]) {
      if (p[0] < x0) x0 = p[0];
      if (p[0] > x1) x1 = p[0];
      if (p[1] < y0) y0 = p[1];
      if (p[1] > y1) y1 = p[1];
    }
  }
  return [x0, y0, x1, y1];
}

/**
 * Throws when some features lie wholly within ±180/±90 and the others wholly outside the square
 * |x|, |y| ≤ 10,000, with none in between: two coordinate systems in one file. A projected layer
 * whose areas spread continuously from the origin outwards (a local grid) is not affected.
 */
export function checkMixedUnits(areas: Area[], file: string): void {
  const degrees: Area[] = [];
  const planar: Area[] = [];
  for (const a of areas) {
    if (!a.geometry) continue;
    const [x0, y0, x1, y1] = box(a.geometry);
    if (x0 >= -180 && x1 <= 360 && y0 >= -90 && y1 <= 90) degrees.push(a);
    else if (x0 > FAR || x1 < -FAR || y0 > FAR || y1 < -FAR) planar.push(a);
    else return; // something in between: not a clean split, so not evidence of mixing
  }
  if (degrees.length === 0 || planar.length === 0) return;
  const label = (list: Area[]) => listSome(list.map((a) => featureLabel(a.feature, a.properties)), 3);
  throw new InputError(
    `${file} mixes two coordinate systems: ${formatCount(degrees.length)} feature(s) lie within longitude/latitude ranges ` +
      `(${label(degrees)}) while ${formatCount(planar.length)} have planar coordinates far beyond them (${label(planar)}). ` +
      'Reproject every feature to one coordinate system and export the file again.',
    { file, feature: degrees[0].feature },
  );
}
