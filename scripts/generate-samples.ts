/**
 * Writes the demo's invented sample data: the Vell Basin, a made-up river region.
 *
 *   node --import tsx scripts/generate-samples.ts [folder]     (default: sample-workbooks/)
 *
 * Districts: a Voronoi tessellation (d3-delaunay) of jittered hex-grid sites, each cell clipped to
 * a convex invented outline, in projected metres on an invented local grid. Outcome simulated from
 * a spatial lag process on row-standardised queen contiguity. Villages: points with an outcome from
 * a spatial error process on row-standardised 5-nearest-neighbour weights. Everything follows from
 * the two seeds below, so a rerun gives the same files.
 *
 * Written by hand here: the seeded generator (mulberry32), Box–Muller, the convex clipper
 * (Sutherland–Hodgman) and the fixed-point solve — each is a few lines and no kept library has them.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join, resolve, dirname } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import ExcelJS from 'exceljs';
import { unzipSync, zipSync } from 'fflate';

type Pt = [number, number];

export const DISTRICT_SEED = 90125;
export const VILLAGE_SEED = 90126;
const CX = 460000;
const CY = 5055000;
const DISTRICT_TRUTH = {
  rho: 0.5,
  beta: { intercept: 32, broadband_pct: -0.15, rail_km: 0.35, rent_index: -0.08 },
  sigma: 2.5,
};
const VILLAGE_TRUTH = {
  lambda: 0.6,
  beta: { intercept: 4, broadband_pct: 0.06, town_km: -0.05 },
  sigma: 0.9,
};
const NEIGHBOURS_K = 5;
const VILLAGE_COUNT = 120;
const DISTRICT_COUNT = 150;
/** The basin's main town and its two rail lines (polylines; they run past the outline on purpose). */
const TOWN: Pt = [452000, 5050000];
const RAIL_LINES: Pt[][] = [
  [[398000, 5093000], [428000, 5074000], TOWN, [478000, 5030000], [512000, 5006000]],
  [TOWN, [470000, 5075000], [492000, 5098000], [505000, 5118000]],
];
/** Workbook timestamps and zip entry times are pinned so the .xlsx bytes do not change on rerun. */
const FIXED_DATE = new Date(Date.UTC(2024, 0, 1));

/** mulberry32: a 32-bit-state generator (Tommy Ettinger, public domain); uniform on [0, 1). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Box–Muller: one standard normal from two uniforms (the sine partner is discarded for simplicity). */
function normal(rand: () => number): number {
  const u1 = 1 - rand();
  const u2 = rand();
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

const round = (v: number, places: number): number => {
  const f = 10 ** places;
  return Math.round(v * f) / f;
};
const roundPt = (p: Pt): Pt => [round(p[0], 2), round(p[1], 2)];
const cross = (a: Pt, b: Pt, p: Pt): number => (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0]);

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

function ringCentroid(ring: Pt[]): Pt {
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

function polylineDistance(p: Pt, lines: Pt[][], closed = false): number {
  let best = Infinity;
  for (const line of lines) {
    const m = closed ? line.length : line.length - 1;
    for (let i = 0; i < m; i++) best = Math.min(best, segmentDistance(p, line[i], line[(i + 1) % line.length]));
  }
  return best;
}

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

function insideConvex(ring: Pt[], p: Pt): boolean {
  return ring.every((a, i) => cross(a, ring[(i + 1) % ring.length], p) > 0);
}

/** Jittered hex-grid sites kept well inside the outline, north to south, west to east. */
function jitteredSites(rand: () => number, spacing: number, outline: Pt[]): Pt[] {
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
async function districtCells(sites: Pt[], outline: Pt[]): Promise<Pt[][]> {
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

/** Queen contiguity: cells that share at least one exact vertex. Neighbour lists ascending. */
export function sharedVertexNeighbours(cells: Pt[][]): number[][] {
  const owners = new Map<string, Set<number>>();
  cells.forEach((ring, i) => {
    for (const p of ring) {
      const key = `${p[0]},${p[1]}`;
      const set = owners.get(key) ?? new Set<number>();
      set.add(i);
      owners.set(key, set);
    }
  });
  const nb = cells.map(() => new Set<number>());
  for (const set of owners.values()) for (const i of set) for (const j of set) if (i !== j) nb[i].add(j);
  return nb.map((s) => [...s].sort((a, b) => a - b));
}

/** Closest distance between vertices of two cells that are not neighbours (guards tolerance-based matching). */
function closestNonNeighbourGap(cells: Pt[][], nb: number[][]): number {
  let best = Infinity;
  for (let i = 0; i < cells.length; i++) {
    const near = new Set(nb[i]);
    for (let j = i + 1; j < cells.length; j++) {
      if (near.has(j)) continue;
      for (const p of cells[i]) for (const q of cells[j]) best = Math.min(best, Math.hypot(p[0] - q[0], p[1] - q[1]));
    }
  }
  return best;
}

/** k nearest by squared planar distance; throws on a tie at the k-th place so the set is unambiguous. */
export function nearestNeighbours(points: Pt[], k: number): number[][] {
  return points.map((p, i) => {
    const order = points
      .map((q, j) => ({ j, d: (p[0] - q[0]) ** 2 + (p[1] - q[1]) ** 2 }))
      .filter((o) => o.j !== i)
      .sort((a, b) => a.d - b.d || a.j - b.j);
    if (order[k - 1].d === order[k].d) throw new Error(`tie among nearest neighbours of point ${i}`);
    return order.slice(0, k).map((o) => o.j).sort((a, b) => a - b);
  });
}

/**
 * Solves (I − ρW)y = b for row-standardised W by the fixed-point iteration y ← b + ρWy, a
 * contraction with factor |ρ| in the max norm; stops when the largest change is below 1e-13·max|y|.
 */
export function solveSpatial(nb: number[][], rho: number, b: number[]): { y: number[]; iterations: number; residual: number } {
  let y = b.slice();
  for (let it = 1; it <= 10000; it++) {
    const next = b.map((bi, i) => bi + (rho * nb[i].reduce((s, j) => s + y[j], 0)) / nb[i].length);
    const change = Math.max(...next.map((v, i) => Math.abs(v - y[i])));
    y = next;
    if (change <= 1e-13 * Math.max(1, ...y.map(Math.abs))) {
      const residual = Math.max(...y.map((v, i) => Math.abs(v - (rho * nb[i].reduce((s, j) => s + y[j], 0)) / nb[i].length - b[i])));
      return { y, iterations: it, residual };
    }
  }
  throw new Error('spatial solve did not converge');
}

/** A smooth random surface: three plane waves of 35–70 km wavelength, unit variance. */
function smoothField(rand: () => number): (p: Pt) => number {
  const waves = [0, 1, 2].map(() => ({ a: 2 * Math.PI * rand(), k: (2 * Math.PI) / (35000 + 35000 * rand()), ph: 2 * Math.PI * rand() }));
  return (p) => Math.sqrt(2 / 3) * waves.reduce((s, w) => s + Math.sin(w.k * (Math.cos(w.a) * p[0] + Math.sin(w.a) * p[1]) + w.ph), 0);
}

/** Invented names: root + ending, shuffled; the lists were chosen to avoid well-known real places. */
function inventNames(rand: () => number, roots: string[], endings: string[], count: number): string[] {
  const all = roots.flatMap((r) => endings.map((e) => r + e));
  for (let i = all.length - 1; i > 0; i--) {
    const j = Math.floor(rand() * (i + 1));
    [all[i], all[j]] = [all[j], all[i]];
  }
  if (all.length < count) throw new Error('not enough invented names');
  return all.slice(0, count);
}

const stats = (v: number[]): { mean: number; sd: number } => {
  const mean = v.reduce((s, x) => s + x, 0) / v.length;
  return { mean, sd: Math.sqrt(v.reduce((s, x) => s + (x - mean) ** 2, 0) / (v.length - 1)) };
};

export interface DistrictData {
  outline: Pt[];
  cells: Pt[][];
  neighbours: number[][];
  rows: Record<string, string | number>[];
  truth: Record<string, unknown>;
}

export async function makeDistricts(): Promise<DistrictData> {
  let found: { outline: Pt[]; cells: Pt[][]; nb: number[][]; rand: () => number; spacing: number } | null = null;
  // Same seed, slightly different grid spacings, until exactly 150 districts with no near-miss corners.
  for (let step = 0; step < 200 && !found; step++) {
    const rand = mulberry32(DISTRICT_SEED);
    const outline = basinOutline(rand);
    const spacing = 6800 + 10 * step;
    const sites = jitteredSites(rand, spacing, outline);
    if (sites.length !== DISTRICT_COUNT) continue;
    const cells = await districtCells(sites, outline);
    const nb = sharedVertexNeighbours(cells);
    if (nb.some((n) => n.length === 0) || closestNonNeighbourGap(cells, nb) < 10) continue;
    found = { outline, cells, nb, rand, spacing };
  }
  if (!found) throw new Error('no grid spacing gave 150 clean districts');
  const { outline, cells, nb, rand, spacing } = found;
  const names = inventNames(rand, DISTRICT_ROOTS, DISTRICT_ENDINGS, cells.length);
  const broadbandField = smoothField(rand);
  const rentField = smoothField(rand);
  const popField = smoothField(rand);
  const base = cells.map((ring, i) => {
    const c = ringCentroid(ring);
    const townKm = Math.hypot(c[0] - TOWN[0], c[1] - TOWN[1]) / 1000;
    const railKm = round(polylineDistance(c, RAIL_LINES) / 1000, 1);
    const logit = 2.8 - 0.035 * townKm - 0.02 * railKm + 0.35 * broadbandField(c) + 0.2 * normal(rand);
    const logRent = -0.006 * townKm - 0.004 * railKm + 0.1 * rentField(c) + 0.05 * normal(rand);
    const population = Math.round(Math.exp(Math.log(9000) - 0.015 * townKm + 0.25 * popField(c) + 0.3 * normal(rand)));
    return { i, railKm, broadband: round(100 / (1 + Math.exp(-logit)), 1), logRent, population };
  });
  const sortedRent = base.map((b) => b.logRent).sort((a, b) => a - b);
  const mid = sortedRent.length >> 1;
  const medianRent = sortedRent.length % 2 ? sortedRent[mid] : (sortedRent[mid - 1] + sortedRent[mid]) / 2;
  const { beta, rho, sigma } = DISTRICT_TRUTH;
  const X = base.map((b) => ({ ...b, rent: round(100 * Math.exp(b.logRent - medianRent), 1) }));
  const eps = X.map(() => sigma * normal(rand));
  const rhs = X.map((x, i) => beta.intercept + beta.broadband_pct * x.broadband + beta.rail_km * x.railKm + beta.rent_index * x.rent + eps[i]);
  const solved = solveSpatial(nb, rho, rhs);
  if (solved.y.some((v) => v <= 0 || v >= 100)) throw new Error('simulated commute share left 0–100');
  const rows = X.map((x, i) => ({
    district_id: `VB-${String(i + 1).padStart(3, '0')}`,
    district_name: names[i],
    long_commute_pct: round(solved.y[i], 2),
    broadband_pct: x.broadband,
    rail_km: x.railKm,
    rent_index: x.rent,
    population: x.population,
  }));
  const e = stats(eps);
  const truth = {
    dataset: 'Vell Basin districts (invented)',
    files: ['vell-basin.xlsx', 'vell-basin-districts.geojson'],
    n: cells.length,
    seed: DISTRICT_SEED,
    random_generator: 'mulberry32; normal draws by Box–Muller (cosine branch only)',
    process: 'spatial lag: y = (I − rho·W)⁻¹ (X·beta + e), e ~ N(0, sigma²) independent',
    weights: 'queen contiguity (districts sharing at least one boundary vertex), row-standardised',
    outcome: 'long_commute_pct',
    rho,
    beta,
    sigma,
    rounding: 'regressors rounded to 0.1 before simulating; outcome rounded to 0.01 after',
    solver: { method: 'fixed-point iteration y ← b + rho·W·y', stop: 'largest change ≤ 1e-13 · max(1, max|y|)', iterations: solved.iterations, max_residual: Number(solved.residual.toExponential(2)) },
    realised_errors: { mean: round(e.mean, 6), sd: round(e.sd, 6) },
    outline_area_m2: round(ringArea(outline), 2),
    grid_spacing_m: spacing,
  };
  return { outline, cells, neighbours: nb, rows, truth };
}

export interface VillageData {
  points: Pt[];
  neighbours: number[][];
  rows: Record<string, string | number>[];
  truth: Record<string, unknown>;
}

export function makeVillages(outline: Pt[]): VillageData {
  const rand = mulberry32(VILLAGE_SEED);
  const xs = outline.map((p) => p[0]);
  const ys = outline.map((p) => p[1]);
  const points: Pt[] = [];
  // Dart throwing: uniform inside the outline, at least 2.5 km apart.
  for (let tries = 0; points.length < VILLAGE_COUNT; tries++) {
    if (tries > 100000) throw new Error('could not place villages');
    const minX = Math.min(...xs);
    const minY = Math.min(...ys);
    const p: Pt = [Math.round(minX + rand() * (Math.max(...xs) - minX)), Math.round(minY + rand() * (Math.max(...ys) - minY))];
    if (!insideConvex(outline, p) || polylineDistance(p, [outline], true) < 1000) continue;
    if (points.some((q) => Math.hypot(p[0] - q[0], p[1] - q[1]) < 2500)) continue;
    points.push(p);
  }
  points.sort((a, b) => b[1] - a[1] || a[0] - b[0]);
  const nb = nearestNeighbours(points, NEIGHBOURS_K);
  const names = inventNames(rand, VILLAGE_ROOTS, VILLAGE_ENDINGS, points.length);
  const field = smoothField(rand);
  const { beta, lambda, sigma } = VILLAGE_TRUTH;
  const X = points.map((p) => {
    const townKm = round(Math.hypot(p[0] - TOWN[0], p[1] - TOWN[1]) / 1000, 1);
    const railKm = polylineDistance(p, RAIL_LINES) / 1000;
    const logit = 2.8 - 0.035 * townKm - 0.02 * railKm + 0.35 * field(p) + 0.25 * normal(rand);
    return { townKm, broadband: round(100 / (1 + Math.exp(-logit)), 1), residents: Math.round(Math.exp(Math.log(900) + 0.6 * normal(rand))) };
  });
  const eps = X.map(() => sigma * normal(rand));
  const u = solveSpatial(nb, lambda, eps);
  const y = X.map((x, i) => beta.intercept + beta.broadband_pct * x.broadband + beta.town_km * x.townKm + u.y[i]);
  if (y.some((v) => v <= 0)) throw new Error('simulated opening rate went below 0');
  const rows = X.map((x, i) => ({
    village_id: `VL-${String(i + 1).padStart(3, '0')}`,
    village_name: names[i],
    x_m: points[i][0],
    y_m: points[i][1],
    new_business_per_1000: round(y[i], 2),
    broadband_pct: x.broadband,
    town_km: x.townKm,
    residents: x.residents,
  }));
  const e = stats(eps);
  const truth = {
    dataset: 'Vell Basin villages (invented)',
    files: ['vell-basin-villages.xlsx', 'vell-basin-villages.geojson'],
    n: points.length,
    seed: VILLAGE_SEED,
    random_generator: 'mulberry32; normal draws by Box–Muller (cosine branch only)',
    process: 'spatial error: y = X·beta + u, u = (I − lambda·W)⁻¹ e, e ~ N(0, sigma²) independent',
    weights: `${NEIGHBOURS_K} nearest neighbours by straight-line distance in metres, row-standardised (not symmetric)`,
    outcome: 'new_business_per_1000',
    lambda,
    beta,
    sigma,
    rounding: 'coordinates rounded to 1 m and regressors to 0.1 before simulating; outcome rounded to 0.01 after',
    solver: { method: 'fixed-point iteration u ← e + lambda·W·u', stop: 'largest change ≤ 1e-13 · max(1, max|u|)', iterations: u.iterations, max_residual: Number(u.residual.toExponential(2)) },
    realised_errors: { mean: round(e.mean, 6), sd: round(e.sd, 6) },
  };
  return { points, neighbours: nb, rows, truth };
}

/** GeoJSON with one feature per line, so diffs stay readable. */
function geojsonText(features: { properties: Record<string, string>; geometry: object }[]): string {
  const lines = features.map((f) => JSON.stringify({ type: 'Feature', properties: f.properties, geometry: f.geometry }));
  return `{"type":"FeatureCollection","spillway:coordinates":"projected metres, invented local grid","features":[\n${lines.join(',\n')}\n]}\n`;
}

async function workbookBytes(sheetName: string, columns: ColumnSpec[], rows: Record<string, string | number>[], about: (string | number)[][]): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Spillway sample generator';
  wb.created = FIXED_DATE;
  wb.modified = FIXED_DATE;
  const ws = wb.addWorksheet(sheetName, { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.columns = columns.map((c) => ({ header: c.name, key: c.name, width: c.width }));
  ws.getRow(1).font = { bold: true };
  for (const r of rows) {
    const row = ws.addRow(r);
    columns.forEach((c, k) => {
      if (c.format) row.getCell(k + 1).numFmt = c.format;
    });
  }
  const info = wb.addWorksheet('About this data');
  info.getColumn(1).width = 26;
  info.getColumn(2).width = 100;
  for (const line of about) {
    const row = info.addRow(line);
    row.getCell(2).alignment = { wrapText: true, vertical: 'top' };
    row.getCell(1).alignment = { vertical: 'top' };
    if (line.length === 1 && line[0] !== '') row.font = { bold: true };
  }
  const raw = new Uint8Array(await wb.xlsx.writeBuffer());
  // Re-pack with fixed entry times so an unchanged workbook has unchanged bytes.
  const entries = unzipSync(raw);
  const pinned: Record<string, [Uint8Array, { mtime: Date; level: 6 }]> = {};
  for (const [name, data] of Object.entries(entries)) pinned[name] = [data, { mtime: FIXED_DATE, level: 6 }];
  return zipSync(pinned);
}

export async function generateSamples(folder: string): Promise<string[]> {
  mkdirSync(folder, { recursive: true });
  const d = await makeDistricts();
  const v = makeVillages(d.outline);
  const closed = (ring: Pt[]): Pt[] => [...ring, ring[0]];
  const written: Record<string, string | Uint8Array> = {
    'vell-basin-districts.geojson': geojsonText(
      d.cells.map((ring, i) => ({
        properties: { district_id: String(d.rows[i].district_id), district_name: String(d.rows[i].district_name) },
        geometry: { type: 'Polygon', coordinates: [closed(ring)] },
      })),
    ),
    'vell-basin-villages.geojson': geojsonText(
      v.points.map((p, i) => ({
        properties: { village_id: String(v.rows[i].village_id), village_name: String(v.rows[i].village_name) },
        geometry: { type: 'Point', coordinates: p },
      })),
    ),
    'vell-basin-truth.json': `${JSON.stringify(d.truth, null, 2)}\n`,
    'vell-basin-villages-truth.json': `${JSON.stringify(v.truth, null, 2)}\n`,
    'vell-basin.xlsx': await workbookBytes('Districts', DISTRICT_COLUMNS, d.rows, buildAboutRows('districts', d.truth)),
    'vell-basin-villages.xlsx': await workbookBytes('Villages', VILLAGE_COLUMNS, v.rows, buildAboutRows('villages', v.truth)),
  };
  for (const [name, body] of Object.entries(written)) writeFileSync(join(folder, name), body);
  return Object.keys(written);
}

const DISTRICT_ROOTS = ['Arvel', 'Brennic', 'Corvane', 'Dovrin', 'Esselt', 'Fennock', 'Gellin', 'Harrun', 'Istel', 'Jossar', 'Korrin', 'Lummet', 'Morvel', 'Nessar', 'Ovrad', 'Pellow', 'Quessel', 'Rothen', 'Sarrel', 'Tovrin', 'Ulvar', 'Wendrel', 'Yessick', 'Zennic'];
const DISTRICT_ENDINGS = [' Vale', 'mere', 'holt', 'stead', ' Fen', 'brook', 'ley', ' Cross'];
const VILLAGE_ROOTS = ['Abbin', 'Brasket', 'Cuvvel', 'Dimber', 'Evvon', 'Fessick', 'Gorrin', 'Hennel', 'Ilvary', 'Jorrel', 'Kettrin', 'Lemmick', 'Marrin', 'Nibbet', 'Ottrel', 'Pimmock', 'Quellin', 'Rissel', 'Sennet', 'Tavvel'];
const VILLAGE_ENDINGS = ['ton', 'wick', ' Green', 'combe', 'thorpe', ' End', 'by'];

interface ColumnSpec {
  name: string;
  width: number;
  format?: string;
  meaning: string;
}
const DISTRICT_COLUMNS: ColumnSpec[] = [
  { name: 'district_id', width: 12, meaning: 'District code, VB-001 to VB-150; matches district_id in vell-basin-districts.geojson.' },
  { name: 'district_name', width: 18, meaning: 'Invented district name.' },
  { name: 'long_commute_pct', width: 18, format: '0.00', meaning: "Outcome. Share of households whose main earner's usual one-way journey to work takes more than 45 minutes, in percent (0–100)." },
  { name: 'broadband_pct', width: 15, format: '0.0', meaning: 'Share of addresses with a fixed broadband line of at least 100 Mbit/s, in percent. More home working, fewer long commutes.' },
  { name: 'rail_km', width: 10, format: '0.0', meaning: "Straight-line distance from the district's centre to the nearest passenger rail line, in kilometres." },
  { name: 'rent_index', width: 12, format: '0.0', meaning: 'Median monthly rent relative to the median district (= 100). Dearer districts sit near the jobs.' },
  { name: 'population', width: 12, format: '#,##0', meaning: 'Residents. Not part of the simulated process; there for maps and weighting.' },
];
const VILLAGE_COLUMNS: ColumnSpec[] = [
  { name: 'village_id', width: 12, meaning: 'Village code, VL-001 to VL-120; matches village_id in vell-basin-villages.geojson.' },
  { name: 'village_name', width: 18, meaning: 'Invented village name.' },
  { name: 'x_m', width: 12, format: '0', meaning: 'Easting on the invented local grid, in metres.' },
  { name: 'y_m', width: 12, format: '0', meaning: 'Northing on the invented local grid, in metres.' },
  { name: 'new_business_per_1000', width: 22, format: '0.00', meaning: 'Outcome. Small businesses opened in the last year per 1,000 residents.' },
  { name: 'broadband_pct', width: 15, format: '0.0', meaning: 'Share of addresses with a fixed broadband line of at least 100 Mbit/s, in percent.' },
  { name: 'town_km', width: 10, format: '0.0', meaning: 'Straight-line distance to the centre of the basin\'s main town, in kilometres.' },
  { name: 'residents', width: 12, format: '#,##0', meaning: 'Residents. Not part of the simulated process.' },
];

/** The "About this data" sheet: one or two cells a row; a single-cell row is a heading. */
function buildAboutRows(kind: 'districts' | 'villages', truth: Record<string, unknown>): (string | number)[][] {
  const t = truth as { n: number; seed: number; sigma: number; beta: Record<string, number>; rho?: number; lambda?: number; solver: { iterations: number } };
  const betas = Object.entries(t.beta).map(([k, b]) => [`beta: ${k}`, b]);
  const lag = kind === 'districts';
  return [
    [lag ? 'Vell Basin districts: invented sample data' : 'Vell Basin villages: invented sample data'],
    ['', 'Every number, name and boundary here is made up by a program. The Vell Basin is not a real place; do not use these figures for anything but trying out Spillway.'],
    ['', lag
      ? `${t.n} districts tile an invented river basin. Coordinates are projected metres on an invented local grid. Boundaries: vell-basin-districts.geojson (join on district_id).`
      : `${t.n} villages in the same invented basin, given as points (x_m, y_m in projected metres). Also as vell-basin-villages.geojson (join on village_id).`],
    [''],
    ['How the outcome was made'],
    ['', lag
      ? 'Long commutes spill over: a district whose neighbours commute far shares their roads and their job market. So the outcome was simulated from a spatial lag process, y = (I − ρW)⁻¹(Xβ + ε), where W links districts that share at least one boundary point (queen contiguity), each row scaled to sum to 1.'
      : 'Unmeasured local conditions (a shared market, a walking trail, a good bus) cluster across nearby villages. So the outcome was simulated from a spatial error process, y = Xβ + u with u = (I − λW)⁻¹ε, where W links each village to its 5 nearest villages, each row scaled to sum to 1.'],
    ['', 'ε is independent normal noise with standard deviation σ. A spatial regression on this sheet should land near the values below; it will not hit them exactly, because ε is one random draw.'],
    lag ? ['rho (ρ)', t.rho ?? NaN] : ['lambda (λ)', t.lambda ?? NaN],
    ...betas,
    ['sigma (σ)', t.sigma],
    ['seed', `${t.seed} (mulberry32 generator, normal draws by Box–Muller)`],
    ['solve', `fixed-point iteration, converged in ${t.solver.iterations} steps`],
    ['regenerate', 'node --import tsx scripts/generate-samples.ts'],
    [''],
    ['Columns'],
    ...(lag ? DISTRICT_COLUMNS : VILLAGE_COLUMNS).map((c) => [c.name, c.meaning]),
  ];
}

const thisFile = fileURLToPath(import.meta.url);
if (process.argv[1] && pathToFileURL(resolve(process.argv[1])).href === pathToFileURL(thisFile).href) {
  const folder = resolve(process.argv[2] ?? join(dirname(thisFile), '..', 'sample-workbooks'));
  generateSamples(folder).then(
    (files) => console.log(`wrote ${files.length} files to ${folder}:\n  ${files.join('\n  ')}`),
    (err: unknown) => {
      console.error(err);
      process.exitCode = 1;
    },
  );
}
