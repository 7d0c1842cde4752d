/**
 * A realistic stand-in for one run of the pipeline: 25 invented wards of an invented town on a
 * 5 × 5 grid of 1 km squares, rook neighbours, row-standardised. The regression numbers are
 * computed (least squares via ml-matrix) so residuals, fitted values and lags are consistent;
 * the test statistics are invented.
 */
import { createHash } from 'node:crypto';
import { Matrix, solve } from 'ml-matrix';
import type { AnalysisResult, ModelKey } from '../../src/pipeline/types.js';
import type { AreaGeometry } from '../../src/geo/types.js';
import type { Coefficient, SpatialFit } from '../../src/models/types.js';

export const GRID = 5;

export interface FakeOptions {
  coordinates?: 'projected' | 'geographic';
  models?: ModelKey[];
}

function sha256(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** Rook neighbours on the grid, row-standardised: directed edges in row order. */
function gridEdges(): { from: Int32Array; to: Int32Array; weight: Float64Array } {
  const from: number[] = [], to: number[] = [], weight: number[] = [];
  for (let r = 0; r < GRID; r++) for (let c = 0; c < GRID; c++) {
    const nb: number[] = [];
    if (r > 0) nb.push((r - 1) * GRID + c);
    if (c > 0) nb.push(r * GRID + c - 1);
    if (c < GRID - 1) nb.push(r * GRID + c + 1);
    if (r < GRID - 1) nb.push((r + 1) * GRID + c);
    for (const j of nb) { from.push(r * GRID + c); to.push(j); weight.push(1 / nb.length); }
  }
  return { from: Int32Array.from(from), to: Int32Array.from(to), weight: Float64Array.from(weight) };
}

export function spatialLag(edges: { from: Int32Array; to: Int32Array; weight: Float64Array }, v: Float64Array): Float64Array {
  const out = new Float64Array(v.length);
  for (let e = 0; e < edges.from.length; e++) out[edges.from[e]] += edges.weight[e] * v[edges.to[e]];
  return out;
}

function squares(kind: 'projected' | 'geographic'): AreaGeometry[] {
  const size = kind === 'projected' ? 1000 : 0.01;
  const x0 = kind === 'projected' ? 512000 : 14.2;
  const y0 = kind === 'projected' ? 6204000 : 47.1;
  const out: AreaGeometry[] = [];
  for (let r = 0; r < GRID; r++) for (let c = 0; c < GRID; c++) {
    const x = x0 + c * size, y = y0 + (GRID - 1 - r) * size;
    out.push({ kind: 'polygon', polygons: [[[[x, y], [x + size, y], [x + size, y + size], [x, y + size], [x, y]]]] });
  }
  return out;
}

export const FAKE_BOUNDARY_BYTES = new TextEncoder().encode(JSON.stringify({ type: 'FeatureCollection', note: 'invented wards of Lake Marrow', features: [] }));
export const FAKE_DATA_BYTES = new TextEncoder().encode('ward,vacancy_rate,median_rent,distance_km\nW01,4.1,820,0.7\n');

export function fakeResult(opts: FakeOptions = {}): AnalysisResult {
  const coordinates = opts.coordinates ?? 'projected';
  const models = opts.models ?? ['ols', 'lag', 'error'];
  const n = GRID * GRID;
  const ids = Array.from({ length: n }, (_, i) => `W${String(i + 1).padStart(2, '0')}`);
  const rent = new Float64Array(n), dist = new Float64Array(n), y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const r = Math.floor(i / GRID), c = i % GRID;
    dist[i] = Math.hypot(r - 2, c - 2) + 0.3;
    rent[i] = 980 - 60 * dist[i] + ((i * 37) % 11) * 9;
    // a smooth east–west gradient plus a wobble gives positive spatial autocorrelation
    y[i] = 12 - 0.008 * rent[i] + 0.9 * dist[i] + 0.6 * c + (((i * 53) % 7) - 3) * 0.25;
  }
  const X = new Matrix(n, 3);
  for (let i = 0; i < n; i++) { X.set(i, 0, 1); X.set(i, 1, rent[i]); X.set(i, 2, dist[i]); }
  const beta = solve(X, Matrix.columnVector(Array.from(y))).getColumn(0);
  const fitted = Float64Array.from({ length: n }, (_, i) => beta[0] + beta[1] * rent[i] + beta[2] * dist[i]);
  const residuals = Float64Array.from({ length: n }, (_, i) => y[i] - fitted[i]);
  const edges = gridEdges();
  const names = ['constant', 'median_rent', 'distance_km'];
  const ses = [1.9, 0.0018, 0.21];
  const coefs = (scale: number, zName: boolean): Coefficient[] => names.map((name, k) => {
    const estimate = beta[k] * scale, se = ses[k];
    return { name, estimate, se, stat: estimate / se, p: zName ? 0.0004 * (k + 1) : 0.0012 * (k + 1), ...(k === 0 ? { intercept: true as const } : {}) };
  });
  const ybar = y.reduce((a, b) => a + b, 0) / n;
  const z = y.map((v) => v - ybar);
  const wz = spatialLag(edges, z);
  let num = 0, den = 0;
  for (let i = 0; i < n; i++) { num += z[i] * wz[i]; den += z[i] * z[i]; }
  const moranIY = num / den; // row-standardised W: S0 = n

  const spatial = (model: 'lag' | 'error', parameter: number): SpatialFit & { residualLag: Float64Array } => {
    const res = residuals.map((e) => e * 0.82);
    return {
      model, parameter, parameterSe: 0.12, parameterZ: parameter / 0.12, parameterP: 0.0021,
      coefficients: coefs(0.9, true), sigma2: 0.31, logLik: -18.4 - (model === 'error' ? 0.6 : 0), aic: 46.8, bic: 51.7,
      lr: { stat: 6.3, df: 1, p: 0.012 }, pseudoR2: 0.81, residuals: res, fitted: y.map((v, i) => v - res[i]),
      lmRemainingError: model === 'lag' ? { stat: 0.42, df: 1, p: 0.52 } : undefined,
      breuschPagan: { stat: 2.1, df: 2, p: 0.35 }, covariance: new Float64Array(25),
      range: { lower: -1, upper: 1 }, logDeterminantMethod: 'eigenvalues',
      convergence: { converged: true, iterations: 14, tolerance: 1e-8, message: 'converged' }, warnings: [],
      residualLag: spatialLag(edges, res),
    };
  };

  const ols: AnalysisResult['ols'] = {
    n, k: 3, coefficients: coefs(1, false), residuals, fitted, r2: 0.74, adjR2: 0.716, f: { stat: 31.3, df: 2, df2: 22, p: 3.4e-7 },
    sigma2: 0.41, sigma2ML: 0.37, logLik: -21.55, aic: 49.1, bic: 52.76, conditionNumber: 42.7,
    jarqueBera: { stat: 0.81, df: 2, p: 0.667 }, breuschPagan: { stat: 3.2, df: 2, p: 0.2019 }, breuschPaganStudentised: { stat: 2.9, df: 2, p: 0.2346 },
    warnings: [],
    moran: { I: 0.231, expected: -1 / 24, variance: 0.0152, z: 2.21, p: 0.027 },
    lm: { error: { stat: 3.1, df: 1, p: 0.078 }, lag: { stat: 6.9, df: 1, p: 0.0086 }, robustError: { stat: 0.4, df: 1, p: 0.527 }, robustLag: { stat: 4.2, df: 1, p: 0.040 }, joint: { stat: 7.3, df: 2, p: 0.026 } },
    recommendation: { choice: 'lag', text: 'Only the robust lag test is significant, so the spatial lag model is suggested.', rule: 'LM decision rule (plain tests first, robust tests to break ties)', alpha: 0.05 },
  };
  const result: AnalysisResult = {
    engineVersion: '0.1.0', createdAt: '2024-05-06T07:08:09.000Z',
    request: {
      id: 'ward', y: 'vacancy_rate', x: ['median_rent', 'distance_km'], sheet: undefined,
      weights: { method: 'rook' }, transform: 'row', models, dropMissing: false, robust: false,
      seed: 20240506, impactDraws: 1000, permutations: 999,
    },
    inputs: [
      { role: 'boundary', name: 'wards.geojson', bytes: FAKE_BOUNDARY_BYTES.length, sha256: sha256(FAKE_BOUNDARY_BYTES) },
      { role: 'data', name: 'wards.csv', bytes: FAKE_DATA_BYTES.length, sha256: sha256(FAKE_DATA_BYTES) },
    ],
    n, ids, rows: ids.map((_, i) => i + 2), droppedRows: [],
    geometries: squares(coordinates), coordinates,
    coordinateEvidence: coordinates === 'projected' ? 'coordinates far outside longitude/latitude ranges' : 'all coordinates within longitude/latitude ranges',
    join: { unmatchedRows: [], unmatchedFeatures: [], duplicateRows: [], duplicateFeatures: [], blankRows: [], blankFeatures: [], withoutGeometry: [], zeroPaddingSuspects: [] },
    y, xNames: ['median_rent', 'distance_km'],
    weights: {
      method: 'rook', description: 'rook contiguity (shared edge)', transform: 'row', links: edges.from.length, withoutNeighbours: [], components: 1,
      summary: { n, links: edges.from.length, density: edges.from.length / (n * n), minNeighbours: 2, meanNeighbours: edges.from.length / n, medianNeighbours: 3, maxNeighbours: 4, histogram: [[2, 4], [3, 12], [4, 9]], withoutNeighbours: [], components: 1, symmetric: false },
      edges,
    },
    algebra: { logDeterminant: 'eigenvalues (dense)', accuracy: 'exact to rounding', traces: 'exact', range: { lower: -1, upper: 1, method: 'extreme eigenvalues' } },
    ols,
    fits: { ols: { ...ols, residualLag: spatialLag(edges, residuals) } },
    moranY: { I: moranIY, expected: -1 / 24, variance: 0.0152, z: (moranIY + 1 / 24) / Math.sqrt(0.0152), p: 0.0001, permutationP: 0.001, permutations: 999 },
    warnings: [],
    timings: { read: 0.003, weights: 0.001, models: 0.012 }, // seconds, as the pipeline reports them
  };
  if (models.includes('lag')) {
    result.fits.lag = spatial('lag', 0.41);
    result.fits.lag.impacts = {
      impacts: names.slice(1).map((name, k) => {
        const direct = beta[k + 1] * 0.95, indirect = beta[k + 1] * 0.6;
        return { name, direct, indirect, total: direct + indirect, directSe: Math.abs(direct) / 4, indirectSe: Math.abs(indirect) / 2, totalSe: Math.abs(direct + indirect) / 3, directP: 0.0002, indirectP: 0.046, totalP: 0.0031 };
      }),
      draws: 1000, seed: 20240506, method: 'simulation from the asymptotic distribution, exact traces',
    };
  }
  if (models.includes('error')) result.fits.error = spatial('error', 0.37);
  return result;
}
