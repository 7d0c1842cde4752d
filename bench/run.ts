/**
 * Benchmarks of the large-n weights algebra. `npm run bench` runs every workload in its own child
 * process (so that peak memory is per workload) and prints one JSON line each.
 * `node --import tsx bench/run.ts --one <name>` runs a single workload.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { csrMultiply, type CsrMatrix } from '../src/linalg/csr.js';
import { sparseAlgebra } from '../src/linalg/sparse/sparse-algebra.js';
import { rookGrid } from './grid.js';
import { countyWeights } from './counties.js';

interface Workload {
  name: string;
  build: () => { w: CsrMatrix; s: CsrMatrix; x: Float64Array; y: Float64Array };
  rhos: number[];
  scipyRhos: number[];
  fits: boolean;
}

const WORKLOADS: Workload[] = [
  { name: 'columbus-size grid 7x7', build: () => rookGrid(7, 7), rhos: [0.2, 0.5, 0.8, -0.3, 0.9], scipyRhos: [0.2, 0.5, 0.8], fits: true },
  { name: 'rook grid 56x56', build: () => rookGrid(56, 56), rhos: [0.2, 0.5, 0.8, -0.3, 0.9, 0.95, 0.6], scipyRhos: [0.2, 0.5, 0.8, 0.9, 0.95], fits: true },
  { name: 'us counties rook', build: () => countyWeights('rook'), rhos: [0.2, 0.5, 0.8, -0.3, 0.9, 0.95, 0.6], scipyRhos: [0.2, 0.5, 0.8, 0.9, 0.95], fits: true },
  { name: 'us counties queen', build: () => countyWeights('queen'), rhos: [0.2, 0.5, 0.8, -0.3, 0.9, 0.95, 0.6], scipyRhos: [0.2, 0.5, 0.8, 0.9, 0.95], fits: true },
  { name: 'rook grid 300x300', build: () => rookGrid(300, 300), rhos: [0.2, 0.5, 0.8, -0.3, 0.9], scipyRhos: [0.5, 0.8, 0.9], fits: true },
  { name: 'rook grid 500x500', build: () => rookGrid(500, 500), rhos: [0.2, 0.5, 0.8, -0.3, 0.9], scipyRhos: [0.5, 0.8, 0.9], fits: false },
];

let peakRss = 0;
const sample = () => { peakRss = Math.max(peakRss, process.memoryUsage().rss); };
const timer = setInterval(sample, 20);
timer.unref();

const median = (v: number[]) => { const s = [...v].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]); };

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

/** y from a lag process y = (I − ρW)⁻¹(Xβ + ε), by the Neumann series (ρ = 0.5, 60 terms). */
function syntheticData(w: CsrMatrix) {
  const n = w.n;
  let state = 12345;
  const u = () => ((state = (Math.imul(state, 1103515245) + 12345) >>> 0) / 4294967296);
  const normal = () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
  const x1 = new Float64Array(n).map(normal);
  const base = new Float64Array(n).map((_, i) => 1 + 2 * x1[i] + normal());
  const y = base.slice();
  let term = base.slice();
  const next = new Float64Array(n);
  for (let k = 0; k < 60; k++) {
    csrMultiply(w, term, next);
    for (let i = 0; i < n; i++) { term[i] = 0.5 * next[i]; y[i] += term[i]; }
  }
  return { y, design: { names: ['constant', 'x1'], columns: [new Float64Array(n).fill(1), x1] } };
}

async function runOne(work: Workload): Promise<Record<string, unknown>> {
  const t0 = performance.now();
  const g = work.build();
  const buildSeconds = (performance.now() - t0) / 1000;
  sample();
  const alg = sparseAlgebra(g.w, g.s, { coordinates: { x: g.x, y: g.y } });
  const chol = alg.cholesky!;
  sample();
  const seconds: number[] = [];
  const logdets: number[] = [];
  for (const rho of work.rhos) {
    const a = performance.now();
    logdets.push(alg.logdet.evaluate(rho));
    seconds.push((performance.now() - a) / 1000);
    sample();
  }
  const tt = performance.now();
  alg.traces(0.5);
  const tracesSeconds = (performance.now() - tt) / 1000;
  sample();
  let lagFitSeconds: number | null = null;
  let errorFitSeconds: number | null = null;
  let fitNote = 'TODO: src/models/index.ts (fitSpatialLag, fitSpatialError) not available yet';
  if (work.fits) {
    try {
      const models = (await import('../src/models/index.js' as string)) as Record<string, unknown>;
      const lag = models.fitSpatialLag as ((y: Float64Array, x: unknown, a: unknown) => unknown) | undefined;
      const err = models.fitSpatialError as ((y: Float64Array, x: unknown, a: unknown) => unknown) | undefined;
      if (lag && err) {
        const { y, design } = syntheticData(g.w);
        let a = performance.now();
        lag(y, design, alg);
        lagFitSeconds = (performance.now() - a) / 1000;
        a = performance.now();
        err(y, design, alg);
        errorFitSeconds = (performance.now() - a) / 1000;
        fitNote = 'synthetic lag process, ρ = 0.5, two regressors';
      }
    } catch (e) {
      fitNote = `TODO: model fits unavailable (${(e as Error).message.split('\n')[0]})`;
    }
  } else {
    fitNote = 'skipped at this size to keep the benchmark short';
  }
  sample();
  const scipy = runScipy(chol.s, work.scipyRhos);
  const oursAtScipyRhos: number[] = [];
  for (const rho of work.scipyRhos) {
    const a = performance.now();
    const v = alg.logdet.evaluate(rho);
    oursAtScipyRhos.push((performance.now() - a) / 1000);
    if (scipy) {
      const ref = scipy.logdets[work.scipyRhos.indexOf(rho)];
      if (Math.abs(v - ref) > 1e-8 * Math.abs(ref)) throw new Error(`log-determinant disagrees with scipy at ρ = ${rho}: ${v} vs ${ref}`);
    }
  }
  sample();
  const sym = chol.symbolic;
  return {
    workload: work.name,
    n: g.w.n,
    links: g.w.rowPtr[g.w.n],
    buildSeconds: +buildSeconds.toFixed(3),
    symbolicSeconds: +chol.symbolicSeconds.toFixed(3),
    logdetSecondsMedian: +median(seconds).toFixed(4),
    logdetSeconds: seconds.map((s) => +s.toFixed(4)),
    nnzL: sym.nnzL,
    nnzStored: sym.nnzStored,
    supernodes: sym.superCount,
    largestFront: sym.maxFront,
    tracesSeconds: +tracesSeconds.toFixed(3),
    traceMethod: alg.traceMethod,
    lagFitSeconds,
    errorFitSeconds,
    fitNote,
    peakRssMB: Math.round(Math.max(peakRss, process.resourceUsage().maxRSS * 1024) / 1e6),
    scipySpluSecondsMedian: scipy ? +scipy.seconds.toFixed(4) : null,
    oursOverScipy: scipy ? +(median(oursAtScipyRhos) / scipy.seconds).toFixed(3) : null,
    method: alg.logdet.method,
    range: alg.range.method,
  };
}

async function main(): Promise<void> {
  const at = process.argv.indexOf('--one');
  if (at >= 0) {
    const work = WORKLOADS.find((w) => w.name === process.argv[at + 1]);
    if (!work) throw new Error(`unknown workload ${process.argv[at + 1]}`);
    console.log(JSON.stringify(await runOne(work)));
    return;
  }
  const script = fileURLToPath(import.meta.url);
  for (const work of WORKLOADS) {
    const child = spawnSync(process.execPath, [...process.execArgv, script, '--one', work.name], { encoding: 'utf8', maxBuffer: 1 << 24 });
    const line = child.stdout.trim().split('\n').pop();
    if (child.status === 0 && line) console.log(line);
    else console.log(JSON.stringify({ workload: work.name, error: (child.stderr || 'failed').trim().split('\n').slice(-3).join(' | ') }));
  }
}

await main();
