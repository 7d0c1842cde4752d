/** Plane geometry for the sample generator, on [x, y] pairs in projected metres. */
export type Pt = [number, number];

export const round = (v: number, places: number): number => {
  const f = 10 ** places;
  return Math.round(v * f) / f;
};
export const roundPt = (p: Pt): Pt => [round(p[0], 2), round(p[1], 2)];
export const cross = (a: Pt, b: Pt, p: Pt): number => (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0]);

/** Shoelace area (positive when counter-clockwise), computed about an offset to keep digits. */
export function ringArea(ring: Pt[]): number {
  const [ox, oy] = ring[0];
  let s = 0;
  for (let i = 0; i < ring.length; i++) {
    const [x1, y1] = ring[i];
    const [x2, y2] = ring[(i + 1) % ring.length];
    s += (x1 - ox) * (y2 - oy) - (x2 - ox) * (y1 - oy);
  }
  return s / 2;
}

export function ringCentroid(ring: Pt[]): Pt {
  const [ox, oy] = ring[0];
  let a = 0;
  let cx = 0;
  let cy = 0;
  for (let i = 0; i < ring.length; i++) {
    const x1 = ring[i][0] - ox;
    const y1 = ring[i][1] - oy;
    const x2 = ring[(i + 1) % ring.length][0] - ox;
    const y2 = ring[(i + 1) % ring.length][1] - oy;
    const c = x1 * y2 - x2 * y1;
    a += c;
    cx += (x1 + x2) * c;
    cy += (y1 + y2) * c;
  }
  return [ox + cx / (3 * a), oy + cy / (3 * a)];
}

function segmentDistance(p: Pt, a: Pt, b: Pt): number {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const t = Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / (dx * dx + dy * dy)));
  return Math.hypot(p[0] - a[0] - t * dx, p[1] - a[1] - t * dy);
}

export function polylineDistance(p: Pt, lines: Pt[][], closed = false): number {
  let best = Infinity;
  for (const line of lines) {
    const m = closed ? line.length : line.length - 1;
    for (let i = 0; i < m; i++) best = Math.min(best, segmentDistance(p, line[i], line[(i + 1) % line.length]));
  }
  return best;
}

/**
 * Intersection of segment pq with the line through a, b. The endpoints are put in a fixed order
 * first, so the two cells that share an edge compute bit-identical points.
 */
function lineCut(p: Pt, q: Pt, a: Pt, b: Pt): Pt {
  const [s, e] = p[0] < q[0] || (p[0] === q[0] && p[1] < q[1]) ? [p, q] : [q, p];
  const ds = cross(a, b, s);
  const t = ds / (ds - cross(a, b, e));
  return [s[0] + t * (e[0] - s[0]), s[1] + t * (e[1] - s[1])];
}

/** Sutherland–Hodgman: clips a polygon to a convex counter-clockwise clip ring. */
export function clipToConvex(subject: Pt[], clip: Pt[]): Pt[] {
  let out = subject;
  for (let k = 0; k < clip.length && out.length > 0; k++) {
    const a = clip[k];
    const b = clip[(k + 1) % clip.length];
    const input = out;
    out = [];
    for (let i = 0; i < input.length; i++) {
      const cur = input[i];
      const prev = input[(i + input.length - 1) % input.length];
      const curIn = cross(a, b, cur) >= 0;
      const prevIn = cross(a, b, prev) >= 0;
      if (curIn !== prevIn) out.push(lineCut(prev, cur, a, b));
      if (curIn) out.push(cur);
    }
  }
  return out;
}

export function insideConvex(ring: Pt[], p: Pt): boolean {
  return ring.every((a, i) => cross(a, ring[(i + 1) % ring.length], p) > 0);
}
