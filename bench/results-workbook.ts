/**
 * Bench workload: the results workbook (`--out`) against the same run with `--json`, on a side × side
 * grid GeoJSON (rook, lag model), the built command line. The two are run back to back, alternating,
 * so that both meet the same load on a shared machine; the figure to read is their ratio (target:
 * `--out` within 2× the `--json` time and under 1.5 GB peak at 90,000 areas). Peak memory is each
 * child's own (its maximum resident set, worker thread included), written on exit by
 * bench/peak-memory.mjs.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gridGeoJson } from './grid-geojson.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const PEAK = fileURLToPath(new URL('./peak-memory.mjs', import.meta.url));

const median = (v: number[]) => { const s = [...v].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]); };
const round = (x: number, d = 2) => +x.toFixed(d);

interface Run { seconds: number; peakMB: number }

export function resultsWorkbookWorkload(side: number, pairs: number): Record<string, unknown> {
  const build = spawnSync('npm', ['run', '--silent', 'build'], { cwd: ROOT, encoding: 'utf8' });
  if (build.status !== 0) throw new Error(`the build failed: ${build.stderr.split('\n').slice(0, 3).join(' | ')}`);
  const dir = mkdtempSync(join(tmpdir(), 'spillway-bench-'));
  try {
    const file = join(dir, `grid${side}.geojson`);
    writeFileSync(file, gridGeoJson(side, side));
    const out = join(dir, 'results.xlsx');
    const peakFile = join(dir, 'peak.txt');
    const bin = join(ROOT, 'bin/spillway.mjs');
    const run = (extra: string[]): Run => {
      rmSync(out, { force: true });
      const a = performance.now();
      const child = spawnSync(process.execPath, ['--import', PEAK, bin, 'fit', '--boundary', file, '--id', 'id', '--y', 'y', '--x', 'x1,x2', '--models', 'lag', '--weights', 'rook', ...extra], {
        encoding: 'utf8', maxBuffer: 1 << 28, env: { ...process.env, SPILLWAY_BENCH_PEAK_FILE: peakFile },
      });
      const seconds = (performance.now() - a) / 1000;
      if (child.status !== 0) throw new Error(`the command failed: ${child.stderr.split('\n').slice(0, 3).join(' | ')}`);
      return { seconds: round(seconds), peakMB: Math.round(Number(readFileSync(peakFile, 'utf8')) / 1024) };
    };
    const json: Run[] = [], xlsx: Run[] = [];
    let bytes = 0;
    for (let i = 0; i < pairs; i++) {
      json.push(run(['--json']));
      xlsx.push(run(['--out', out]));
      bytes = statSync(out).size;
    }
    const j = median(json.map((r) => r.seconds)), o = median(xlsx.map((r) => r.seconds));
    return {
      workload: `results workbook ${side}x${side}`,
      n: side * side,
      jsonSecondsMedian: round(j),
      outSecondsMedian: round(o),
      outOverJson: round(o / j),
      outOverJsonEachPair: xlsx.map((r, i) => round(r.seconds / json[i].seconds)),
      jsonSeconds: json.map((r) => r.seconds),
      outSeconds: xlsx.map((r) => r.seconds),
      jsonPeakMB: Math.max(...json.map((r) => r.peakMB)),
      outPeakMB: Math.max(...xlsx.map((r) => r.peakMB)),
      workbookMB: round(bytes / 1e6, 1),
      note: `spillway fit --boundary grid${side}.geojson --id id --y y --x x1,x2 --models lag --weights rook, with --json and with --out results.xlsx, ${pairs} pairs back to back (the built command line)`,
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
