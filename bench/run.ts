/**
 * Benchmarks of the large-n engine. `npm run bench` runs every workload in its own child process
 * (so that peak memory is per workload) and prints one JSON line each:
 *  - rook grids 56², 300², 500²: symbolic analysis, seconds per exact log-determinant, lag and error
 *    fits (with the exact evaluations they used), peak memory, and scipy's splu on the same
 *    I − ρS when python3 with scipy is installed (ratio = ours / scipy, same ρ values);
 *  - us-atlas counties, queen and rook: weights built by the real pipeline (readBoundary +
 *    buildWeights), then the full analysis (OLS, Moran, LM, lag, error, impacts) by runAnalysis;
 *  - Columbus (the shapefile under test/fixtures): the full analysis in process;
 *  - the command line end to end on a 300×300 grid GeoJSON written to a temporary folder;
 *  - the model cell functions on cell ranges (Columbus; 3,000 areas): first call and recalculation.
 *  - the results workbook (--out) against --json on the same grid, back to back (bench/results-workbook.ts);
 *    at 500×500 only with --with-large (several minutes);
 *  - the input checks: refusing a zip entry that understates its size, and the overlap checks
 *    (bench/input-checks.ts).
 * `node --import tsx bench/run.ts --one <name>` runs a single workload.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { csrMultiply, type CsrMatrix } from '../src/linalg/csr.js';
import type { WeightsAlgebra } from '../src/linalg/algebra.js';
import { sparseAlgebra } from '../src/linalg/sparse/sparse-algebra.js';
import { SparseCholeskyLogDet } from '../src/linalg/sparse/cholesky-logdet.js';
import { startNodeHelper } from '../src/cli/helper-thread.js';
import { fitSpatialError, fitSpatialLag } from '../src/models/index.js';
import { readBoundary } from '../src/geo/index.js';
import { buildWeights, symmetricForm } from '../src/weights/index.js';
import { runAnalysis } from '../src/pipeline/run-analysis.js';
import { rookGrid } from './grid.js';
import { normalSampler, seededRandom } from '../src/linalg/random.js';
import { nearestNeighbours } from '../src/weights/nearest.js';
import { applyTransform } from '../src/weights/transform.js';
import { withBuiltCommandLineAndGrid } from './grid-geojson.js';
import { localStatisticsWorkload } from './local-statistics.js';
import { commandLineLagErrorWorkload, familyFitsWorkload } from './family.js';
import { columbusCellsWorkload, gridCellsWorkload } from './cell-functions.js';
import { resultsWorkbookWorkload } from './results-workbook.js';
import { overlapChecksWorkload, understatedZipWorkload } from './input-checks.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));

let peakRss = 0;
const sample = () => { peakRss = Math.max(peakRss, process.memoryUsage().rss); };
const timer = setInterval(sample, 20);
timer.unref();
const peakMB = () => Math.round(Math.max(peakRss, process.resourceUsage().maxRSS * 1024) / 1e6);
const median = (v: number[]) => { const s = [...v].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]); };
const round = (x: number, d = 3) => +x.toFixed(d);
const seconds = (t0: number) => (performance.now() - t0) / 1000;

function scipyAvailable(): boolean {
  return spawnSync('python3', ['-c', 'import scipy'], { stdio: 'ignore' }).status === 0;
}

function runScipy(s: CsrMatrix, rhos: number[]): { seconds: number; logdets: number[] } | null {
  if (!scipyAvailable()) return null;
  const dir = mkdtempSync(join(tmpdir(), 'spillway-bench-'));
  try {
    const nnz = s.rowPtr[s.n];
    const head = new Int32Array([s.n, nnz]);
    const rows = new Int32Array(nnz);
    for (let i = 0; i < s.n; i++) rows.fill(i, s.rowPtr[i], s.rowPtr[i + 1]);
    const file = join(dir, 'matrix.bin');
    const parts = [head, rows, s.colIdx, s.values, new Int32Array([rhos.length]), Float64Array.from(rhos)];
    writeFileSync(file, Buffer.concat(parts.map((p) => Buffer.from(p.buffer, p.byteOffset, p.byteLength))));
    const script = fileURLToPath(new URL('./scipy_logdet.py', import.meta.url));
    const out = spawnSync('python3', [script, file], { encoding: 'utf8', maxBuffer: 1 << 24 });
    if (out.status !== 0) return null;
    const parsed = JSON.parse(out.stdout.trim()) as { seconds: number[]; logdets: number[] };
    return { seconds: median(parsed.seconds), logdets: parsed.logdets };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Seeded normals (test data only). */
/** Standard normals from the engine's one seeded generator. */
function normals(seed: number) {
  return normalSampler(seededRandom(seed));
}

/** y = (I − 0.5W)⁻¹(1 + 2x₁ − x₂ + ε) by the Neumann series (60 terms). */
function lagData(w: CsrMatrix, seed = 12345) {
  const n = w.n;
  const normal = normals(seed);
  const x1 = new Float64Array(n).map(normal), x2 = new Float64Array(n).map(normal);
  const base = new Float64Array(n).map((_, i) => 1 + 2 * x1[i] - x2[i] + normal());
  const y = base.slice();
  let term = base.slice();
  const next = new Float64Array(n);
  for (let k = 0; k < 60; k++) {
    csrMultiply(w, term, next);
    for (let i = 0; i < n; i++) { term[i] = 0.5 * next[i]; y[i] += term[i]; }
  }
  return { y, x1, x2, design: { intercept: 0, names: ['constant', 'x1', 'x2'], columns: [new Float64Array(n).fill(1), x1, x2] } };
}

/** The algebra with its exact log-determinant counted. */
function counted(alg: WeightsAlgebra): { alg: WeightsAlgebra; count: () => number; reset: () => void } {
  let calls = 0;
  const inner = alg.logdet;
  const logdet = { evaluate: (r: number) => { calls++; return inner.evaluate(r); }, method: inner.method, accuracy: inner.accuracy };
  return { alg: Object.assign(Object.create(alg) as WeightsAlgebra, { logdet }), count: () => calls, reset: () => { calls = 0; } };
}

async function gridWorkload(rows: number, rhos: number[], scipyRhos: number[]): Promise<Record<string, unknown>> {
  const g = rookGrid(rows, rows);
  sample();
  const t0 = performance.now();
  // as the command line runs it: a second thread shares the factor and its solves
  const alg = sparseAlgebra(g.w, g.s, { coordinates: { x: g.x, y: g.y }, helper: startNodeHelper });
  const algebraSeconds = seconds(t0);
  const chol = alg.cholesky!;
  const times: number[] = [];
  for (const rho of rhos) { const a = performance.now(); alg.logdet.evaluate(rho); times.push(seconds(a)); sample(); }
  const { design, y } = lagData(g.w);
  const c = counted(alg);
  let a = performance.now();
  const lag = fitSpatialLag(y, design, c.alg);
  const lagFitSeconds = seconds(a);
  const lagEvaluations = c.count();
  sample();
  c.reset();
  a = performance.now();
  const err = fitSpatialError(y, design, c.alg);
  const errorFitSeconds = seconds(a);
  const errorEvaluations = c.count();
  sample();
  const scipy = runScipy(chol.s, scipyRhos);
  const ours: number[] = [];
  for (const [i, rho] of scipyRhos.entries()) {
    a = performance.now();
    const v = alg.logdet.evaluate(rho + 1e-9); // a new ρ: no kept factor
    ours.push(seconds(a));
    if (scipy && Math.abs(v - scipy.logdets[i]) > 1e-6 * Math.abs(scipy.logdets[i])) throw new Error(`log-determinant disagrees with scipy at ρ = ${rho}: ${v} vs ${scipy.logdets[i]}`);
  }
  sample();
  const peak = peakMB();
  // the same evaluations on one thread, for comparison
  alg.dispose?.();
  const single = new SparseCholeskyLogDet(chol.s, { coordinates: { x: g.x, y: g.y } });
  const oneThread: number[] = [];
  for (const rho of rhos) { const b = performance.now(); single.evaluate(rho); oneThread.push(seconds(b)); }
  const oneThreadScipy: number[] = [];
  for (const rho of scipyRhos) { const b = performance.now(); single.evaluate(rho + 1e-9); oneThreadScipy.push(seconds(b)); }
  return {
    workload: `rook grid ${rows}x${rows}`,
    n: g.w.n,
    links: g.w.rowPtr[g.w.n],
    symbolicSeconds: round(chol.symbolicSeconds),
    algebraSeconds: round(algebraSeconds),
    logdetSecondsMedian: round(median(times), 4),
    logdetSeconds: times.map((s) => round(s, 4)),
    logdetSecondsMedianOneThread: round(median(oneThread), 4),
    logdetSecondsOneThread: oneThread.map((s) => round(s, 4)),
    nnzL: chol.symbolic.nnzL,
    lagFitSeconds: round(lagFitSeconds),
    lagExactEvaluations: lagEvaluations,
    errorFitSeconds: round(errorFitSeconds),
    errorExactEvaluations: errorEvaluations,
    rho: lag.parameter,
    rhoSe: lag.parameterSe,
    lambda: err.parameter,
    peakRssMB: peak,
    scipySpluSecondsMedian: scipy ? round(scipy.seconds, 4) : null,
    oursOverScipy: scipy ? round(median(ours) / scipy.seconds) : null,
    oursOneThreadOverScipy: scipy ? round(median(oneThreadScipy) / scipy.seconds) : null,
    method: alg.logdet.method,
    traceMethod: alg.traceMethod,
    search: lag.convergence.message,
  };
}

/** Full analyses through runAnalysis: the median of `timed` runs after `warm` warm-up runs (JIT). */
async function analysisWorkload(name: string, request: Parameters<typeof runAnalysis>[0], weightsSeconds: number | null, warm = 1, timed = 1): Promise<Record<string, unknown>> {
  for (let i = 0; i < warm; i++) await runAnalysis(request, { helper: startNodeHelper });
  sample();
  const runs: number[] = [];
  let result = await runAnalysis(request, { helper: startNodeHelper });
  for (let i = 0; i < timed; i++) {
    const a = performance.now();
    result = await runAnalysis(request, { helper: startNodeHelper });
    runs.push(seconds(a));
  }
  const reportSeconds = median(runs);
  sample();
  const r = result as unknown as { n: number; timings: Record<string, number>; fits: { lag?: { convergence: { iterations: number; message: string } } }; algebra?: { logDeterminant: string } };
  return {
    workload: name,
    n: r.n,
    weightsSeconds: weightsSeconds === null ? null : round(weightsSeconds),
    reportSeconds: round(reportSeconds),
    stageSeconds: Object.fromEntries(Object.entries(r.timings).map(([k, v]) => [k, round(v)])),
    lagSearch: r.fits.lag?.convergence.message,
    peakRssMB: peakMB(),
    method: r.algebra?.logDeterminant,
  };
}

async function countiesWorkload(kind: 'queen' | 'rook'): Promise<Record<string, unknown>> {
  const require = createRequire(import.meta.url);
  const bytes = new Uint8Array(readFileSync(require.resolve('us-atlas/counties-10m.json')));
  const boundary = [{ name: 'counties-10m.json', bytes }];
  const layer = await readBoundary(boundary, { layer: 'counties' });
  const ids = layer.areas.map((f) => String(f.properties.id));
  // weights by the real pipeline pieces, timed after a warm-up
  const input = { ids, geometries: layer.areas.map((f) => f.geometry!), coordinates: layer.coordinates };
  buildWeights(input, { method: kind } as never);
  const a = performance.now();
  const w = buildWeights(input, { method: kind } as never);
  const weightsSeconds = seconds(a);
  // invented outcome: a lag process on these weights (ρ = 0.5)
  const { y, x1, x2 } = lagData(w);
  const csv = ['id,y,x1,x2', ...ids.map((id, i) => `${id},${y[i]},${x1[i]},${x2[i]}`)].join('\n');
  const data = { name: 'invented-county-figures.csv', bytes: new TextEncoder().encode(csv) };
  const out = await analysisWorkload(`us counties ${kind}`, { boundary, layer: 'counties', data, id: 'id', y: 'y', x: ['x1', 'x2'], weights: { method: kind } as never, transform: 'row', models: ['ols', 'lag', 'error'] }, weightsSeconds, 1, 2);
  const form = symmetricForm(w);
  const alg = sparseAlgebra(w, form, {});
  const times: number[] = [];
  for (const rho of [0.2, 0.5, 0.8, 0.9]) { const t = performance.now(); alg.logdet.evaluate(rho); times.push(seconds(t)); }
  return { ...out, symbolicSeconds: alg.cholesky ? round(alg.cholesky.symbolicSeconds) : null, logdetSecondsMedian: round(median(times), 4) };
}

async function columbusWorkload(): Promise<Record<string, unknown>> {
  const dir = join(ROOT, 'test/fixtures/columbus');
  const boundary = ['columbus.shp', 'columbus.dbf', 'columbus.shx'].map((f) => ({ name: f, bytes: new Uint8Array(readFileSync(join(dir, f))) }));
  return analysisWorkload('columbus', { boundary, id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' } as never, transform: 'row', models: ['ols', 'lag', 'error'] }, null, 10, 5);
}

function cliWorkload(): Record<string, unknown> {
  // the built command line, as `npx spillway` runs it after npm ci; built now so it is never stale
  return withBuiltCommandLineAndGrid(300, (bin, file) => {
    const run = (extra: string[]) => {
      const a = performance.now();
      const out = spawnSync(process.execPath, [bin, 'fit', '--boundary', file, '--id', 'id', '--y', 'y', '--x', 'x1,x2', '--models', 'lag', '--weights', 'rook', '--json', ...extra], { encoding: 'utf8', maxBuffer: 1 << 28 });
      const s = seconds(a);
      if (out.status !== 0) throw new Error(`the command failed: ${out.stderr.split('\n').slice(0, 3).join(' | ')}`);
      const parsed = JSON.parse(out.stdout) as { lag?: { rho?: number; parameter?: number } };
      return { seconds: round(s), rho: parsed.lag?.rho ?? parsed.lag?.parameter };
    };
    // alternating, five runs each: on a shared machine single runs vary by up to 1.5×
    const runs: { seconds: number; rho?: number }[] = [];
    const oneThread: { seconds: number; rho?: number }[] = [];
    for (let i = 0; i < 5; i++) { runs.push(run([])); oneThread.push(run(['--threads', '1'])); }
    const withPermutations = run(['--permutations', '999']);
    return {
      workload: 'command line, 300x300 grid GeoJSON, rook, lag model',
      n: 90000,
      cliSecondsMedian: round(median(runs.map((r) => r.seconds))),
      cliSecondsFastest: Math.min(...runs.map((r) => r.seconds)),
      cliSeconds: runs.map((r) => r.seconds),
      cliSecondsOneThreadMedian: round(median(oneThread.map((r) => r.seconds))),
      cliSecondsOneThread: oneThread.map((r) => r.seconds),
      cliSecondsWith999Permutations: withPermutations.seconds,
      rho: runs[0].rho,
      note: 'spillway fit --boundary grid300.geojson --id id --y y --x x1,x2 --models lag --weights rook --json (the built command line, as after npm ci), five runs alternating with five --threads 1 runs; then once with --permutations 999 (above 10,000 areas the permutation test of y runs only when asked)',
    };
  });
}

/** k-nearest-neighbour weights (no symmetric form) on invented random points: the exact sparse LU. */
async function knnWorkload(n: number, k: number): Promise<Record<string, unknown>> {
  const u = seededRandom(31);
  const x = new Float64Array(n).map(() => u()), y = new Float64Array(n).map(() => u());
  let a = performance.now();
  const { pattern } = nearestNeighbours({ x, y, greatCircle: false }, k);
  const w = applyTransform(pattern, 'row');
  const weightsSeconds = seconds(a);
  sample();
  a = performance.now();
  const alg = sparseAlgebra(w, null, { coordinates: { x, y } });
  const algebraSeconds = seconds(a);
  const times: number[] = [];
  for (const rho of [0.2, 0.5, 0.8]) { const b = performance.now(); alg.logdet.evaluate(rho); times.push(seconds(b)); sample(); }
  const { design, y: outcome } = lagData(w);
  const c = counted(alg);
  a = performance.now();
  const lag = fitSpatialLag(outcome, design, c.alg);
  const lagFitSeconds = seconds(a);
  sample();
  return {
    workload: `${k} nearest neighbours, ${n} random points`,
    n,
    weightsSeconds: round(weightsSeconds),
    algebraSeconds: round(algebraSeconds),
    logdetSecondsMedian: round(median(times), 4),
    logdetSeconds: times.map((t) => round(t, 4)),
    lagFitSeconds: round(lagFitSeconds),
    lagExactEvaluations: c.count(),
    rho: lag.parameter,
    rhoSe: lag.parameterSe,
    peakRssMB: peakMB(),
    method: alg.logdet.method,
    traceMethod: alg.traceMethod,
  };
}

/**
 * The full analysis (OLS, Moran, LM tests, lag with its 1,000 impact draws, error) through
 * runAnalysis under k-nearest-neighbour weights, row-standardised: on the 500-plot wheat trial
 * (test/fixtures/wheat, its yields against the plot coordinates) or on invented random points given
 * as GeoJSON, the outcome a lag process on their k-nearest weights (ρ = 0.5). Targets: 500 areas
 * under 2 s, 20,000 under 10 s.
 */
async function knnAnalysisWorkload(n: number | 'wheat', k: number): Promise<Record<string, unknown>> {
  if (n === 'wheat') {
    const dir = join(ROOT, 'test/fixtures/wheat');
    const boundary = ['wheat.shp', 'wheat.dbf', 'wheat.shx'].map((f) => ({ name: f, bytes: new Uint8Array(readFileSync(join(dir, f))) }));
    return analysisWorkload(`knn ${k} full run, 500 wheat plots`, { boundary, id: 'SP_ID', y: 'yield', x: ['lat1', 'lon'], coordinates: 'projected', weights: { method: 'knn', k } as never, transform: 'row', models: ['ols', 'lag', 'error'] }, null, 1, 3);
  }
  const u = seededRandom(47);
  const x = new Float64Array(n).map(() => 1000 * u()), y = new Float64Array(n).map(() => 1000 * u());
  const { pattern } = nearestNeighbours({ x, y, greatCircle: false }, k);
  const { y: outcome, x1, x2 } = lagData(applyTransform(pattern, 'row'));
  const features = Array.from({ length: n }, (_, i) =>
    `{"type":"Feature","properties":{"id":"p${i}","y":${outcome[i]},"x1":${x1[i]},"x2":${x2[i]}},"geometry":{"type":"Point","coordinates":[${x[i] + 500000},${y[i] + 4000000}]}}`);
  const bytes = new TextEncoder().encode(`{"type":"FeatureCollection","features":[${features.join(',')}]}`);
  const boundary = [{ name: 'invented-points.geojson', bytes }];
  return analysisWorkload(`knn ${k} full run, ${n} random points`, { boundary, id: 'id', y: 'y', x: ['x1', 'x2'], coordinates: 'projected', weights: { method: 'knn', k } as never, transform: 'row', models: ['ols', 'lag', 'error'] }, null, n > 5000 ? 0 : 1, 1);
}

const WORKLOADS: Record<string, () => Promise<Record<string, unknown>> | Record<string, unknown>> = {
  'columbus': columbusWorkload,
  'rook grid 56x56': () => gridWorkload(56, [0.2, 0.5, 0.8, -0.3, 0.9, 0.95, 0.6], [0.2, 0.5, 0.8, 0.9, 0.95]),
  'us counties queen': () => countiesWorkload('queen'),
  'us counties rook': () => countiesWorkload('rook'),
  'rook grid 300x300': () => gridWorkload(300, [0.2, 0.5, 0.8, -0.3, 0.9], [0.5, 0.8, 0.9]),
  'rook grid 500x500': () => gridWorkload(500, [0.2, 0.5, 0.8], [0.5, 0.8]),
  'knn 6 of 90000 points': () => knnWorkload(90000, 6),
  'knn 6 of 20000 points': () => knnWorkload(20000, 6),
  'knn 4 full run, wheat plots': () => knnAnalysisWorkload('wheat', 4),
  'knn 4 full run, 500 points': () => knnAnalysisWorkload(500, 4),
  'knn 6 full run, 20000 points': () => knnAnalysisWorkload(20000, 6),
  'command line 300x300': cliWorkload,
  'model family 300x300': () => familyFitsWorkload(300),
  'command line 300x300 lag-and-error': commandLineLagErrorWorkload,
  'local statistics 55x55': () => localStatisticsWorkload(55),
  'local statistics 300x300': () => localStatisticsWorkload(300),
  'cell functions Columbus': columbusCellsWorkload,
  'cell functions 3000 areas': () => gridCellsWorkload(50, 60),
  'results workbook 300x300': () => resultsWorkbookWorkload(300, 3),
  'results workbook 500x500': () => resultsWorkbookWorkload(500, 1),
  'zip understating its size': understatedZipWorkload,
  'overlap checks': overlapChecksWorkload,
};

/** Workloads left out of a full run unless asked for with --with-large. */
const LARGE = new Set(['results workbook 500x500']);

async function main(): Promise<void> {
  const at = process.argv.indexOf('--one');
  if (at >= 0) {
    const name = process.argv[at + 1];
    const work = WORKLOADS[name];
    if (!work) throw new Error(`unknown workload ${name}`);
    const load = loadavg()[0];
    console.log(JSON.stringify({ ...(await work()), loadAverageAtStart: round(load, 2) }));
    return;
  }
  const script = fileURLToPath(import.meta.url);
  const withLarge = process.argv.includes('--with-large');
  for (const name of Object.keys(WORKLOADS)) {
    if (LARGE.has(name) && !withLarge) continue;
    const child = spawnSync(process.execPath, [...process.execArgv, script, '--one', name], { encoding: 'utf8', maxBuffer: 1 << 24 });
    const line = child.stdout.trim().split('\n').pop();
    if (child.status === 0 && line) console.log(line);
    else console.log(JSON.stringify({ workload: name, error: (child.stderr || 'failed').trim().split('\n').slice(-3).join(' | ') }));
  }
}

await main();
