/**
 * Groups the rings of one shapefile record into polygons by containment. The shapefile format says
 * outer rings run clockwise and holes counter-clockwise, but files break that rule, and the
 * `shapefile` package attaches a hole only when its own point-on-segment test agrees (it returns
 * true whenever a point projects onto a segment's end, however far away), so a hole strictly inside
 * its outer ring could come back as a second outer part, adding its area instead of subtracting it.
 *
 * The rule here: a ring lying inside other rings of the same record sits at a depth equal to the
 * number of rings holding it. Even depth (0: not inside any ring; 2: an island in a lake) is an
 * outer ring; odd depth is a hole of the smallest ring holding it. Orientation does not decide; a
 * ring whose orientation disagrees with the role it gets is counted so the reader can say so.
 * Containment uses turf's point-in-polygon test on the first vertex not on the holder's boundary.
 */
import booleanPointInPolygon from '@turf/boolean-point-in-polygon';
import { ringSignedArea } from './ring-checks.js';

export interface NestedRings {
  /** GeoJSON MultiPolygon order: polygons → rings (outer first, then its holes) */
  polygons: number[][][][];
  /** rings whose orientation says the other role (clockwise holes, counter-clockwise outer rings) */
  againstOrientation: number;
}

export function nestRings(rings: number[][][]): NestedRings {
  const n = rings.length;
  const area = rings.map((r) => Math.abs(ringSignedArea(r)));
  const box = rings.map(ringBox);
  const usable = rings.map((r) => r.length >= 4 && r[0][0] === r[r.length - 1][0] && r[0][1] === r[r.length - 1][1]);
  const depth = new Int32Array(n);
  const holder = new Int32Array(n).fill(-1);
  for (let i = 0; i < n; i++) {
    if (!usable[i]) continue;
    for (let j = 0; j < n; j++) {
      if (j === i || !usable[j] || !(area[j] > area[i]) || !boxHolds(box[j], box[i])) continue;
      if (!ringInside(rings[i], rings[j])) continue;
      depth[i]++;
      if (holder[i] < 0 || area[j] < area[holder[i]]) holder[i] = j;
    }
  }
  const polygonOf = new Int32Array(n).fill(-1);
  const polygons: number[][][][] = [];
  const isHole = (i: number) => depth[i] % 2 === 1 && holder[i] >= 0 && depth[holder[i]] % 2 === 0;
  for (let i = 0; i < n; i++) {
    if (isHole(i)) continue;
    polygonOf[i] = polygons.length;
    polygons.push([rings[i]]);
  }
  let againstOrientation = 0;
  for (let i = 0; i < n; i++) {
    const hole = isHole(i);
    if (hole) polygons[polygonOf[holder[i]]].push(rings[i]);
    // shapefile rule: clockwise (negative shoelace area) outer rings, counter-clockwise holes
    const clockwise = ringSignedArea(rings[i]) < 0;
    if (usable[i] && area[i] > 0 && clockwise === hole) againstOrientation++;
  }
  return { polygons, againstOrientation };
}

type Box = [number, number, number, number];

function ringBox(ring: number[][]): Box {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const p of ring) {
    if (p[0] < x0) x0 = p[0];
    if (p[0] > x1) x1 = p[0];
    if (p[1] < y0) y0 = p[1];
    if (p[1] > y1) y1 = p[1];
  }
  return [x0, y0, x1, y1];
}

function boxHolds(outer: Box, inner: Box): boolean {
  return outer[0] <= inner[0] && outer[1] <= inner[1] && inner[2] <= outer[2] && inner[3] <= outer[3];
}

/** Whether `inner` lies inside `outer`: decided by its first vertex off `outer`'s boundary. */
function ringInside(inner: number[][], outer: number[][]): boolean {
  const polygon = { type: 'Polygon' as const, coordinates: [outer] };
  for (let k = 0; k < inner.length - 1; k++) {
    const p = inner[k];
    const strictly = booleanPointInPolygon(p, polygon, { ignoreBoundary: true });
    if (strictly) return true;
    if (!booleanPointInPolygon(p, polygon)) return false;
    // on the boundary: the next vertex decides
  }
  return false;
}
