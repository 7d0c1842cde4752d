/**
 * A square-cell grid as GeoJSON (projected coordinates), with a seeded lag-process outcome, for the
 * end-to-end command-line benchmark: cells of side 100 (projected units, an invented origin far from
 * 0 so the coordinates read as planar), id "c<row>_<col>", columns y, x1, x2.
 * The outcome follows y = (I − ρW)⁻¹(1 + 2·x1 − x2 + ε) with rook weights, ρ = 0.5, summed by the
 * Neumann series (60 terms; 0.5⁶⁰ is below rounding).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { seededRandom } from '../src/linalg/random.js';

export function gridGeoJson(rows: number, cols: number, seed = 17): string {
  const n = rows * cols;
  const u = seededRandom(seed);
  const normal = () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
  const x1 = new Float64Array(n).map(normal);
  const x2 = new Float64Array(n).map(normal);
  const base = new Float64Array(n).map((_, i) => 1 + 2 * x1[i] - x2[i] + normal());
  const y = base.slice();
  let term = base.slice();
  const next = new Float64Array(n);
  for (let k = 0; k < 60; k++) {
    for (let r = 0; r < rows; r++) {
      for (let c = 0; c < cols; c++) {
        let s = 0, d = 0;
        if (r > 0) { s += term[(r - 1) * cols + c]; d++; }
        if (r + 1 < rows) { s += term[(r + 1) * cols + c]; d++; }
        if (c > 0) { s += term[r * cols + c - 1]; d++; }
        if (c + 1 < cols) { s += term[r * cols + c + 1]; d++; }
        next[r * cols + c] = (0.5 * s) / d;
      }
    }
    term.set(next);
    for (let i = 0; i < n; i++) y[i] += term[i];
  }
  const parts: string[] = [];
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const i = r * cols + c;
      const x0 = 500000 + 100 * c, y0 = 4000000 + 100 * r, x1c = x0 + 100, y1c = y0 + 100;
      const ring = `[[${x0},${y0}],[${x1c},${y0}],[${x1c},${y1c}],[${x0},${y1c}],[${x0},${y0}]]`;
      parts.push(`{"type":"Feature","properties":{"id":"c${r}_${c}","y":${y[i].toFixed(6)},"x1":${x1[i].toFixed(6)},"x2":${x2[i].toFixed(6)}},"geometry":{"type":"Polygon","coordinates":[${ring}]}}`);
    }
  }
  return `{"type":"FeatureCollection","features":[${parts.join(',')}]}`;
}

/**
 * Builds `dist/` (so a figure is never of a stale build), writes the rows × rows grid GeoJSON to a
 * temporary folder and hands the built command line and the file to `work`; the folder goes after.
 */
export function withBuiltCommandLineAndGrid<T>(rows: number, work: (bin: string, file: string) => T): T {
  const root = fileURLToPath(new URL('..', import.meta.url));
  const build = spawnSync('npm', ['run', '--silent', 'build'], { cwd: root, encoding: 'utf8' });
  if (build.status !== 0) throw new Error(`the build failed: ${build.stderr.split('\n').slice(0, 3).join(' | ')}`);
  const dir = mkdtempSync(join(tmpdir(), 'spillway-bench-'));
  try {
    const file = join(dir, `grid${rows}.geojson`);
    writeFileSync(file, gridGeoJson(rows, rows));
    return work(join(root, 'bin/spillway.mjs'), file);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
