/** The invented basin: its outline, its town and rail lines, and the district cells that tile it. */
import { clipToConvex, cross, insideConvex, polylineDistance, ringArea, roundPt, type Pt } from './geometry.js';

export const CX = 460000;
export const CY = 5055000;
/** The basin's main town and its two rail lines (polylines; they run past the outline on purpose). */
export const TOWN: Pt = [452000, 5050000];
export const RAIL_LINES: Pt[][] = [
  [[398000, 5093000], [428000, 5074000], TOWN, [478000, 5030000], [512000, 5006000]],
  [TOWN, [470000, 5075000], [492000, 5098000], [505000, 5118000]],
];

/** A wobbly convex blob: an ellipse with three small harmonics, 96 vertices, counter-clockwise. */
export function basinOutline(rand: () => number): Pt[] {
  const phase = [rand(), rand(), rand()].map((u) => 2 * Math.PI * u);
  const ring: Pt[] = [];
  for (let j = 0; j < 96; j++) {
    const t = (2 * Math.PI * j) / 96;
    const r = 1 + 0.06 * Math.cos(2 * t + phase[0]) + 0.025 * Math.cos(3 * t + phase[1]) + 0.008 * Math.cos(5 * t + phase[2]);
    ring.push(roundPt([CX + 50000 * r * Math.cos(t), CY + 45000 * r * Math.sin(t)]));
  }
  for (let j = 0; j < ring.length; j++) {
    if (cross(ring[j], ring[(j + 1) % 96], ring[(j + 2) % 96]) <= 0) throw new Error('basin outline is not convex');
  }
  return ring;
}

/** Jittered hex-grid sites kept well inside the outline, north to south, west to east. */
export function jitteredSites(rand: () => number, spacing: number, outline: Pt[]): Pt[] {
  const rowStep = (spacing * Math.sqrt(3)) / 2;
  const xs = outline.map((p) => p[0]);
  const ys = outline.map((p) => p[1]);
  const [x0, x1, y0, y1] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
  const sites: Pt[] = [];
  for (let row = 0, y = y1; y >= y0; row++, y -= rowStep) {
    for (let x = x0 + (row % 2) * (spacing / 2); x <= x1; x += spacing) {
      const p: Pt = [x + (rand() - 0.5) * 0.6 * spacing, y + (rand() - 0.5) * 0.6 * rowStep];
      if (insideConvex(outline, p) && polylineDistance(p, [outline], true) > 0.25 * spacing) sites.push(p);
    }
  }
  return sites;
}

interface DelaunayModule {
  Delaunay: { from(points: ArrayLike<Pt>): { voronoi(bounds: [number, number, number, number]): { cellPolygon(i: number): Pt[] | null } } };
}

/** Voronoi cells of the sites clipped to the outline, rounded to 0.01 m, counter-clockwise, open rings. */
export async function districtCells(sites: Pt[], outline: Pt[]): Promise<Pt[][]> {
  // d3-delaunay ships no type declarations; the non-literal specifier keeps the typed slice above.
  const specifier: string = 'd3-delaunay';
  const { Delaunay } = (await import(specifier)) as DelaunayModule;
  // A far ring of extra sites makes every real cell finite, so all its corners are shared circumcentres.
  const ghosts: Pt[] = Array.from({ length: 32 }, (_, j) => [CX + 200000 * Math.cos((j * Math.PI) / 16), CY + 200000 * Math.sin((j * Math.PI) / 16)]);
  const voronoi = Delaunay.from([...sites, ...ghosts]).voronoi([CX - 1e6, CY - 1e6, CX + 1e6, CY + 1e6]);
  return sites.map((_, i) => {
    const raw = voronoi.cellPolygon(i);
    if (!raw) throw new Error(`district site ${i} has no Voronoi cell`);
    let cell = raw.slice(0, -1);
    if (ringArea(cell) < 0) cell = cell.reverse();
    const ring = clipToConvex(cell, outline).map(roundPt);
    const clean = ring.filter((p, k) => {
      const next = ring[(k + 1) % ring.length];
      return p[0] !== next[0] || p[1] !== next[1];
    });
    if (clean.length < 3 || ringArea(clean) <= 0) throw new Error(`district cell ${i} is degenerate`);
    return clean;
  });
}
