/**
 * Checks on one polygon ring given as [x, y] positions (first = last). Written here because none of
 * the kept libraries validates rings; they assume well-formed input.
 */

/** Relative tolerance under which a ring counts as closed (floating-point noise from converters). */
export const CLOSURE_TOLERANCE = 1e-12;
/** Rings longer than this are not searched for self-crossings (the check would dominate load time). */
export const CROSSING_CHECK_MAX_VERTICES = 10_000;

/** Signed shoelace area (counter-clockwise positive), with coordinates taken relative to the first
 *  position so large projected coordinates (millions of metres) do not lose precision. */
export function ringSignedArea(ring: number[][]): number {
  const n = ring.length;
  if (n < 3) return 0;
  const x0 = ring[0][0];
  const y0 = ring[0][1];
  let twice = 0;
  for (let i = 1; i < n - 1; i++) {
    const ax = ring[i][0] - x0;
    const ay = ring[i][1] - y0;
    const bx = ring[i + 1][0] - x0;
    const by = ring[i + 1][1] - y0;
    twice += ax * by - bx * ay;
  }
  return twice / 2;
}

/** True when first and last positions agree exactly or within CLOSURE_TOLERANCE relative to their size. */
export function ringIsClosed(ring: number[][]): boolean {
  const a = ring[0];
  const b = ring[ring.length - 1];
  if (a[0] === b[0] && a[1] === b[1]) return true;
  const scale = Math.max(1, Math.abs(a[0]), Math.abs(a[1]));
  return Math.abs(a[0] - b[0]) <= CLOSURE_TOLERANCE * scale && Math.abs(a[1] - b[1]) <= CLOSURE_TOLERANCE * scale;
}

/**
 * Whether two non-adjacent edges of the ring touch or cross. Edges are sorted by their left end and
 * swept left to right, so only edges whose x-ranges overlap are compared: O(n log n) for ordinary
 * boundaries, O(n²) only for pathological rings. Adjacent edges (sharing a vertex) are skipped, as
 * are zero-length edges from repeated vertices.
 */
export function ringSelfCrosses(ring: number[][]): boolean {
  const m = ring.length - 1; // number of edges
  if (m < 4) return false; // a triangle cannot cross itself
  const order = new Int32Array(m);
  const minX = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    order[i] = i;
    minX[i] = Math.min(ring[i][0], ring[i + 1][0]);
  }
  if (m > 32) order.sort((a, b) => minX[a] - minX[b]);
  for (let oi = 0; oi < m; oi++) {
    const i = order[oi];
    const ax = ring[i][0], ay = ring[i][1], bx = ring[i + 1][0], by = ring[i + 1][1];
    if (ax === bx && ay === by) continue;
    const maxXi = Math.max(ax, bx);
    for (let oj = m > 32 ? oi + 1 : 0; oj < m; oj++) {
      const j = order[oj];
      if (m > 32) {
        if (minX[j] > maxXi) break;
      } else if (j <= i) continue;
      if (j === i + 1 || i === j + 1 || (i === 0 && j === m - 1) || (j === 0 && i === m - 1)) continue;
      const cx = ring[j][0], cy = ring[j][1], dx = ring[j + 1][0], dy = ring[j + 1][1];
      if (cx === dx && cy === dy) continue;
      if (segmentsTouch(ax, ay, bx, by, cx, cy, dx, dy)) return true;
    }
  }
  return false;
}

function orient(ax: number, ay: number, bx: number, by: number, cx: number, cy: number): number {
  const v = (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
  return v > 0 ? 1 : v < 0 ? -1 : 0;
}

function onSegment(ax: number, ay: number, bx: number, by: number, px: number, py: number): boolean {
  return Math.min(ax, bx) <= px && px <= Math.max(ax, bx) && Math.min(ay, by) <= py && py <= Math.max(ay, by);
}

/** Standard orientation test for closed segments AB and CD (touching counts). */
function segmentsTouch(ax: number, ay: number, bx: number, by: number, cx: number, cy: number, dx: number, dy: number): boolean {
  if (Math.max(ay, by) < Math.min(cy, dy) || Math.max(cy, dy) < Math.min(ay, by)) return false;
  const o1 = orient(ax, ay, bx, by, cx, cy);
  const o2 = orient(ax, ay, bx, by, dx, dy);
  const o3 = orient(cx, cy, dx, dy, ax, ay);
  const o4 = orient(cx, cy, dx, dy, bx, by);
  if (o1 !== o2 && o3 !== o4) return true;
  if (o1 === 0 && onSegment(ax, ay, bx, by, cx, cy)) return true;
  if (o2 === 0 && onSegment(ax, ay, bx, by, dx, dy)) return true;
  if (o3 === 0 && onSegment(cx, cy, dx, dy, ax, ay)) return true;
  if (o4 === 0 && onSegment(cx, cy, dx, dy, bx, by)) return true;
  return false;
}
