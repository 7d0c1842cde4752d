/**
 * The model family at scale: every family model fitted on a rook grid of 300 × 300 (90,000 areas,
 * row-standardised, sparse algebra with the second thread, as the command line runs it) on an
 * invented lag process, with seconds and exact log-determinant evaluations per model; and the
 * command line end to end with `--models lag-error` against `--models lag` (the target: within 3×).
 */
import { spawnSync } from 'node:child_process';
import type { WeightsAlgebra } from '../src/linalg/algebra.js';
import { sparseAlgebra } from '../src/linalg/sparse/sparse-algebra.js';
import { startNodeHelper } from '../src/cli/helper-thread.js';
import { fitModel, fitOls } from '../src/models/index.js';
import { csrMultiply } from '../src/linalg/csr.js';
import { rookGrid } from './grid.js';
import { withBuiltCommandLineAndGrid } from './grid-geojson.js';
import { seededRandom } from '../src/linalg/index.js';

const seconds = (t0: number) => +((performance.now() - t0) / 1000).toFixed(3);
const median = (v: number[]) => { const s = [...v].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]); };

/** Each family model on the 300 × 300 grid: seconds, exact evaluations, the spatial parameters. */
export function familyFitsWorkload(rows = 300): Record<string, unknown> {
  const g = rookGrid(rows, rows);
  const n = g.w.n;
  const u = seededRandom(5);
  const normal = () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
  const x1 = new Float64Array(n).map(normal), x2 = new Float64Array(n).map(normal);
  const base = new Float64Array(n).map((_, i) => 1 + 2 * x1[i] - x2[i] + normal());
  const y = base.slice();
  const term = base.slice();
  const next = new Float64Array(n);
  for (let k = 0; k < 60; k++) {
    csrMultiply(g.w, term, next);
    for (let i = 0; i < n; i++) { term[i] = 0.5 * next[i]; y[i] += term[i]; }
  }
  const design = { intercept: 0, names: ['constant', 'x1', 'x2'], columns: [new Float64Array(n).fill(1), x1, x2] };
  let t = performance.now();
  const algebra = sparseAlgebra(g.w, g.s, { coordinates: { x: g.x, y: g.y }, helper: startNodeHelper });
  const algebraSeconds = seconds(t);
  let calls = 0;
  const inner = algebra.logdet;
  const counted: WeightsAlgebra = Object.assign(Object.create(algebra) as WeightsAlgebra, {
    logdet: { evaluate: (r: number) => { calls++; return inner.evaluate(r); }, method: inner.method, accuracy: inner.accuracy },
  });
  const p = { y, design, w: g.w, algebra: counted, ols: fitOls(y, design) };
  const out: Record<string, unknown> = { workload: `model family, rook grid ${rows}x${rows}`, n, algebraSeconds };
  for (const key of ['lag', 'error', 'slx', 'durbin', 'durbinError', 'lagError', 'lagIV', 'errorGM']) {
    calls = 0;
    t = performance.now();
    const f = fitModel(key, p, { seed: 1, impactDraws: 1000 }) as unknown as Record<string, unknown>;
    const rho = (f.rho ?? (key === 'lag' || key === 'durbin' ? f.parameter : undefined)) as number | undefined;
    const lambda = (f.lambda ?? (key === 'error' || key === 'durbinError' ? f.parameter : undefined)) as number | undefined;
    out[key] = { seconds: seconds(t), exactEvaluations: calls, ...(rho !== undefined ? { rho: +rho.toFixed(6) } : {}), ...(lambda !== undefined ? { lambda: +lambda.toFixed(6) } : {}) };
  }
  algebra.dispose?.();
  return { ...out, note: 'fitModel per model (fit, then effects where the model has them, 1,000 draws); exact evaluations counted on the log-determinant; lag and error for comparison' };
}

/** The command line with --models lag-error against --models lag on the same 300 × 300 grid GeoJSON, three runs each, alternating. */
export function commandLineLagErrorWorkload(): Record<string, unknown> {
  return withBuiltCommandLineAndGrid(300, (bin, file) => {
    const run = (model: string) => {
      const a = performance.now();
      const r = spawnSync(process.execPath, [bin, 'fit', '--boundary', file, '--id', 'id', '--y', 'y', '--x', 'x1,x2', '--models', model, '--weights', 'rook', '--json'], { encoding: 'utf8', maxBuffer: 1 << 28 });
      const s = seconds(a);
      if (r.status !== 0) throw new Error(`the command failed: ${r.stderr.split('\n').slice(0, 3).join(' | ')}`);
      return { seconds: s, json: JSON.parse(r.stdout) as Record<string, Record<string, unknown>> };
    };
    const lag: number[] = [];
    const both: number[] = [];
    let last: Record<string, unknown> = {};
    for (let i = 0; i < 3; i++) {
      lag.push(run('lag').seconds);
      const r = run('lag-error');
      both.push(r.seconds);
      last = r.json.lagError;
    }
    return {
      workload: 'command line, 300x300 grid GeoJSON, rook, lag-and-error model against lag model',
      n: 90000,
      lagSecondsMedian: median(lag),
      lagErrorSecondsMedian: median(both),
      ratio: +(median(both) / median(lag)).toFixed(2),
      lagSeconds: lag,
      lagErrorSeconds: both,
      lagErrorEvaluations: last.evaluations,
      rho: last.rho,
      lambda: last.lambda,
      note: 'spillway fit ... --models lag (with its effects) and --models lag-error, three runs each alternating; the target is a ratio within 3',
    };
  });
}
