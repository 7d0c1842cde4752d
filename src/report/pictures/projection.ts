import type { AreaGeometry, CoordinateKind } from '../../geo/types.js';

export interface Frame {
  /** map coordinates → pixel */
  x(px: number, py: number): number;
  y(px: number, py: number): number;
  width: number;
  height: number;
  /** pixels per map unit (projected coordinates only; approximate for geographic) */
  scale: number;
}

function eachPosition(g: AreaGeometry, f: (x: number, y: number) => void): void {
  if (g.kind === 'point') f(g.point[0], g.point[1]);
  else for (const poly of g.polygons) for (const ring of poly) for (const p of ring) f(p[0], p[1]);
}

/**
 * Fits all areas into a box of at most maxWidth × maxHeight, keeping shapes: projected coordinates
 * are drawn as they are; longitude is shrunk by the cosine of the middle latitude so shapes away
 * from the equator are not stretched sideways.
 */
export function fitFrame(geoms: readonly AreaGeometry[], kind: CoordinateKind, maxWidth: number, maxHeight: number, pad = 6): Frame {
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const g of geoms) eachPosition(g, (x, y) => {
    if (x < x0) x0 = x; if (x > x1) x1 = x; if (y < y0) y0 = y; if (y > y1) y1 = y;
  });
  if (!Number.isFinite(x0)) { x0 = 0; x1 = 1; y0 = 0; y1 = 1; }
  const kx = kind === 'geographic' ? Math.cos((((y0 + y1) / 2) * Math.PI) / 180) : 1;
  const w = Math.max((x1 - x0) * kx, 1e-12), h = Math.max(y1 - y0, 1e-12);
  const s = Math.min((maxWidth - 2 * pad) / w, (maxHeight - 2 * pad) / h);
  const width = Math.ceil(w * s + 2 * pad), height = Math.ceil(h * s + 2 * pad);
  return {
    x: (px) => pad + (px - x0) * kx * s,
    y: (_px, py) => pad + (y1 - py) * s,
    width, height, scale: s,
  };
}
