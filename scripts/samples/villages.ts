/** The 120 invented villages: points in the basin, an outcome from a spatial error process. */
import { RAIL_LINES, TOWN } from './basin.js';
import type { ColumnSpec } from './files.js';
import { insideConvex, polylineDistance, round, type Pt } from './geometry.js';
import { nearestNeighbours, solveSpatial } from './neighbours.js';
import { inventNames, mulberry32, normal, smoothField, stats } from './random.js';

export const VILLAGE_SEED = 90126;
export const VILLAGE_TRUTH = {
  lambda: 0.6,
  beta: { intercept: 4, broadband_pct: 0.06, town_km: -0.05 },
  sigma: 0.9,
};
const NEIGHBOURS_K = 5;
const VILLAGE_COUNT = 120;

const VILLAGE_ROOTS = ['Abbin', 'Brasket', 'Cuvvel', 'Dimber', 'Evvon', 'Fessick', 'Gorrin', 'Hennel', 'Ilvary', 'Jorrel', 'Kettrin', 'Lemmick', 'Marrin', 'Nibbet', 'Ottrel', 'Pimmock', 'Quellin', 'Rissel', 'Sennet', 'Tavvel'];
const VILLAGE_ENDINGS = ['ton', 'wick', ' Green', 'combe', 'thorpe', ' End', 'by'];

export const VILLAGE_COLUMNS: ColumnSpec[] = [
  { name: 'village_id', width: 12, meaning: 'Village code, VL-001 to VL-120; matches village_id in vell-basin-villages.geojson.' },
  { name: 'village_name', width: 18, meaning: 'Invented village name.' },
  { name: 'x_m', width: 12, format: '0', meaning: 'Easting on the invented local grid, in metres.' },
  { name: 'y_m', width: 12, format: '0', meaning: 'Northing on the invented local grid, in metres.' },
  { name: 'new_business_per_1000', width: 22, format: '0.00', meaning: 'Outcome. Small businesses opened in the last year per 1,000 residents.' },
  { name: 'broadband_pct', width: 15, format: '0.0', meaning: 'Share of addresses with a fixed broadband line of at least 100 Mbit/s, in percent.' },
  { name: 'town_km', width: 10, format: '0.0', meaning: 'Straight-line distance to the centre of the basin\'s main town, in kilometres.' },
  { name: 'residents', width: 12, format: '#,##0', meaning: 'Residents. Not part of the simulated process.' },
];

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
