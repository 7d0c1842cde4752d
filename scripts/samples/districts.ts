/** The 150 invented districts: Voronoi cells of the basin, an outcome from a spatial lag process. */
import { districtCells, basinOutline, jitteredSites, RAIL_LINES, TOWN } from './basin.js';
import type { ColumnSpec } from './files.js';
import { polylineDistance, ringArea, ringCentroid, round, type Pt } from './geometry.js';
import { closestNonNeighbourGap, sharedVertexNeighbours, solveSpatial } from './neighbours.js';
import { inventNames, mulberry32, normal, smoothField, stats } from './random.js';

export const DISTRICT_SEED = 90125;
export const DISTRICT_TRUTH = {
  rho: 0.5,
  beta: { intercept: 32, broadband_pct: -0.15, rail_km: 0.35, rent_index: -0.08 },
  sigma: 2.5,
};
const DISTRICT_COUNT = 150;

const DISTRICT_ROOTS = ['Arvel', 'Brennic', 'Corvane', 'Dovrin', 'Esselt', 'Fennock', 'Gellin', 'Harrun', 'Istel', 'Jossar', 'Korrin', 'Lummet', 'Morvel', 'Nessar', 'Ovrad', 'Pellow', 'Quessel', 'Rothen', 'Sarrel', 'Tovrin', 'Ulvar', 'Wendrel', 'Yessick', 'Zennic'];
const DISTRICT_ENDINGS = [' Vale', 'mere', 'holt', 'stead', ' Fen', 'brook', 'ley', ' Cross'];

export const DISTRICT_COLUMNS: ColumnSpec[] = [
  { name: 'district_id', width: 12, meaning: 'District code, VB-001 to VB-150; matches district_id in vell-basin-districts.geojson.' },
  { name: 'district_name', width: 18, meaning: 'Invented district name.' },
  { name: 'long_commute_pct', width: 18, format: '0.00', meaning: "Outcome. Share of households whose main earner's usual one-way journey to work takes more than 45 minutes, in percent (0–100)." },
  { name: 'broadband_pct', width: 15, format: '0.0', meaning: 'Share of addresses with a fixed broadband line of at least 100 Mbit/s, in percent. More home working, fewer long commutes.' },
  { name: 'rail_km', width: 10, format: '0.0', meaning: "Straight-line distance from the district's centre to the nearest passenger rail line, in kilometres." },
  { name: 'rent_index', width: 12, format: '0.0', meaning: 'Median monthly rent relative to the median district (= 100). Dearer districts sit near the jobs.' },
  { name: 'population', width: 12, format: '#,##0', meaning: 'Residents. Not part of the simulated process; there for maps and weighting.' },
  { name: 'clinic_wait_days', width: 16, format: '0.0', meaning: 'Average wait for a routine clinic appointment, in days. Not part of the commute model: drawn on its own with one planted cluster of long waits and one of short waits, for the local-patterns example.' },
  { name: 'residents_70plus', width: 16, format: '#,##0', meaning: 'Residents aged 70 or over. In most districts about 14–22 % of the population; in 8 newly built districts only a few dozen, since few older people have moved in yet. For the rates example.' },
  { name: 'fall_admissions', width: 15, format: '0', meaning: 'Hospital admissions after a fall among residents aged 70 or over, in one year: a count drawn around an underlying rate that varies smoothly across the basin. For the rates example (build the rate fall_admissions per 1,000 residents_70plus).' },
];

/** A third stream for the rates example, so everything drawn before it stays as it was. */
export const RATE_SEED = 90127;
export const RATE_TRUTH = { per_1000: 50, spread: 0.25, small_districts: 8, small_min: 30, small_max: 150 };

/** A second, separate stream for the planted clusters, so the commute data stay as they were. */
export const CLUSTER_SEED = 90126;
export const CLUSTER_TRUTH = { baseline: 20, sd: 2, shift: 10 };

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
    clinic_wait_days: 0,
    residents_70plus: 0,
    fall_admissions: 0,
  }));
  const planted = plantClusters(cells, nb);
  rows.forEach((r, i) => { r.clinic_wait_days = planted.values[i]; });
  const counts = fallCounts(cells, X.map((x) => x.population));
  rows.forEach((r, i) => { r.residents_70plus = counts.older[i]; r.fall_admissions = counts.events[i]; });
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
    planted_clusters: {
      column: 'clinic_wait_days',
      seed: CLUSTER_SEED,
      process: `baseline ${CLUSTER_TRUTH.baseline} + N(0, ${CLUSTER_TRUTH.sd}²) days, plus ${CLUSTER_TRUTH.shift} days in the long-wait cluster and minus ${CLUSTER_TRUTH.shift} in the short-wait cluster (a centre district and its queen neighbours)`,
      long_waits: planted.high.map((i) => rows[i].district_id),
      short_waits: planted.low.map((i) => rows[i].district_id),
    },
    rates_example: {
      events: 'fall_admissions',
      population: 'residents_70plus',
      seed: RATE_SEED,
      process: `residents_70plus = population × a share drawn uniformly from 14–22 %, except ${RATE_TRUTH.small_districts} newly built districts with ${RATE_TRUTH.small_min}–${RATE_TRUTH.small_max}; ` +
        `fall_admissions ~ Poisson(residents_70plus × r), r = ${RATE_TRUTH.per_1000} per 1,000 × exp(${RATE_TRUTH.spread} × a smooth random surface of unit variance)`,
      small_districts: counts.small.map((i) => rows[i].district_id),
      underlying_rate_per_1000: counts.rate.map((r) => round(r * 1000, 3)),
    },
  };
  return { outline, cells, neighbours: nb, rows, truth };
}

/**
 * Two planted clusters: the districts nearest the quarter points of the basin's bounding box (lower
 * left, upper right), each with its queen neighbours, shifted up and down from a noisy baseline.
 */
function plantClusters(cells: Pt[][], nb: number[][]): { values: number[]; high: number[]; low: number[] } {
  const rand = mulberry32(CLUSTER_SEED);
  const c = cells.map(ringCentroid);
  const xs = c.map((p) => p[0]);
  const ys = c.map((p) => p[1]);
  const at = (fx: number, fy: number): number => {
    const tx = Math.min(...xs) + fx * (Math.max(...xs) - Math.min(...xs));
    const ty = Math.min(...ys) + fy * (Math.max(...ys) - Math.min(...ys));
    let best = 0;
    c.forEach((p, i) => { if (Math.hypot(p[0] - tx, p[1] - ty) < Math.hypot(c[best][0] - tx, c[best][1] - ty)) best = i; });
    return best;
  };
  const highCentre = at(0.7, 0.7);
  const lowCentre = at(0.3, 0.3);
  const high = [highCentre, ...nb[highCentre]].sort((a, b) => a - b);
  const low = [lowCentre, ...nb[lowCentre]].sort((a, b) => a - b);
  const { baseline, sd, shift } = CLUSTER_TRUTH;
  const values = cells.map((_, i) => round(baseline + sd * normal(rand) + (high.includes(i) ? shift : low.includes(i) ? -shift : 0), 1));
  return { values, high, low };
}

/** Knuth's multiplication method for a Poisson draw (fine for the means below 100 used here). */
function poisson(rand: () => number, mean: number): number {
  const limit = Math.exp(-mean);
  let k = 0;
  for (let p = rand(); p > limit; p *= rand()) k++;
  return k;
}

/**
 * The rates example: residents aged 70+ (a share of each district's population, except a few newly
 * built districts with only a few dozen) and their fall admissions in a year, drawn around a smoothly
 * varying underlying rate, so that smoothing has visible work to do on the small districts.
 */
function fallCounts(cells: Pt[][], population: number[]): { older: number[]; events: number[]; small: number[]; rate: number[] } {
  const rand = mulberry32(RATE_SEED);
  const field = smoothField(rand);
  const { per_1000, spread, small_districts, small_min, small_max } = RATE_TRUTH;
  const small: number[] = [];
  while (small.length < small_districts) {
    const i = Math.floor(rand() * cells.length);
    if (!small.includes(i)) small.push(i);
  }
  small.sort((a, b) => a - b);
  const older = population.map((p, i) => (small.includes(i)
    ? small_min + Math.floor(rand() * (small_max - small_min + 1))
    : Math.round(p * (0.14 + 0.08 * rand()))));
  const rate = cells.map((ring) => (per_1000 / 1000) * Math.exp(spread * field(ringCentroid(ring))));
  const events = older.map((n, i) => Math.min(n, poisson(rand, n * rate[i])));
  return { older, events, small, rate };
}
