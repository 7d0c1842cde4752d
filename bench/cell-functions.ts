/**
 * Bench workload: the model cell functions as Excel calls them, on cell ranges (2-D arrays): the very
 * first call in a fresh runtime, the first call on a new neighbour range (weights read and the weights
 * algebra built) and a recalculation after one value of the outcome changed (weights and algebra
 * kept), for SPILL.FIT with the lag model, plus
 * SPILL.LMTESTS and SPILL.EFFECTS (1,000 draws) on the warm algebra. Targets (issue 16): Columbus-size
 * under 50 ms, 3,000 areas under 1 s.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { effectsRows, fitRows, lmTestRows } from '../addin/functions/model-logic.js';
import type { Grid } from '../addin/functions/ranges.js';
import { readBoundary } from '../src/geo/index.js';
import { buildWeights } from '../src/weights/index.js';
import { rookGrid } from './grid.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const ms = (t0: number) => +(performance.now() - t0).toFixed(1);
const median = (v: number[]) => { const s = [...v].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]); };

interface Ranges { y: Grid; x: Grid; ids: Grid; links: Grid }

function time(r: Ranges, recalcs = 9): Record<string, number> {
  // the very first call of a fresh runtime (code not yet compiled), on the links less the last one
  let t = performance.now();
  fitRows(r.y, r.x, r.ids, r.links.slice(0, -1), 'lag');
  const cold = ms(t);
  // a new neighbour range in a running workbook: weights read and their algebra built
  t = performance.now();
  fitRows(r.y, r.x, r.ids, r.links, 'lag');
  const first = ms(t);
  const again: number[] = [];
  for (let k = 0; k < recalcs; k++) {
    const y = r.y.map((row) => [...row]);
    y[1 + k][0] = (y[1 + k][0] as number) + 0.5; // one cell edited
    t = performance.now();
    fitRows(y, r.x, r.ids, r.links, 'lag');
    again.push(ms(t));
  }
  t = performance.now();
  lmTestRows(r.y, r.x, r.ids, r.links);
  const tests = ms(t);
  t = performance.now();
  effectsRows(r.y, r.x, r.ids, r.links, 'lag', 'draws=1000');
  const effects = ms(t);
  return { coldStartMs: cold, newNeighboursFitMs: first, recalculatedFitMs: median(again), lmTestsMs: tests, effectsMs: effects };
}

export async function columbusCellsWorkload(): Promise<Record<string, unknown>> {
  const dir = join(ROOT, 'test/fixtures/columbus');
  const layer = await readBoundary(['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(dir, name))) })));
  const ids = layer.areas.map((a) => String(a.properties.POLYID));
  const w = buildWeights({ ids, geometries: layer.areas.map((a) => a.geometry!), coordinates: layer.coordinates }, { method: 'queen' }, { transform: 'row' });
  const links: Grid = [['origin', 'neighbour', 'weight']];
  for (let i = 0; i < w.n; i++) for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) links.push([ids[i], ids[w.colIdx[p]], w.values[p]]);
  const col = (name: string) => layer.areas.map((a) => Number(a.properties[name]));
  const inc = col('INC'), hoval = col('HOVAL');
  const r: Ranges = {
    y: [['CRIME'], ...col('CRIME').map((v) => [v])], x: [['INC', 'HOVAL'], ...inc.map((v, i) => [v, hoval[i]])],
    ids: [['POLYID'], ...ids.map((id) => [id])], links,
  };
  return { workload: 'cell functions, Columbus (49 areas, queen), SPILL.FIT lag', n: 49, ...time(r) };
}

/** 3,000 areas: a 50 × 60 rook grid, the outcome simulated from a lag process (ρ = 0.5) with two regressors. */
export function gridCellsWorkload(rows = 50, cols = 60): Record<string, unknown> {
  const g = rookGrid(rows, cols);
  const n = g.w.n;
  let state = 20261201;
  const u = () => ((state = (Math.imul(state, 1103515245) + 12345) >>> 0) + 0.5) / 4294967296;
  const normal = () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
  const x1 = Float64Array.from({ length: n }, normal);
  const x2 = Float64Array.from({ length: n }, normal);
  // y = (I − 0.5W)⁻¹(1 + 2x₁ − x₂ + ε), by 60 terms of the Neumann series
  const base = Float64Array.from({ length: n }, (_, i) => 1 + 2 * x1[i] - x2[i] + normal());
  let term = base.slice();
  const y = base.slice();
  for (let k = 0; k < 60; k++) {
    const next = new Float64Array(n);
    for (let i = 0; i < n; i++) for (let p = g.w.rowPtr[i]; p < g.w.rowPtr[i + 1]; p++) next[i] += 0.5 * g.w.values[p] * term[g.w.colIdx[p]];
    for (let i = 0; i < n; i++) y[i] += next[i];
    term = next;
  }
  const id = (i: number) => `G${String(i + 1).padStart(4, '0')}`;
  const links: Grid = [['origin', 'neighbour', 'weight']];
  for (let i = 0; i < n; i++) for (let p = g.w.rowPtr[i]; p < g.w.rowPtr[i + 1]; p++) links.push([id(i), id(g.w.colIdx[p]), 1]);
  const r: Ranges = {
    y: [['y'], ...Array.from(y, (v) => [v])], x: [['x1', 'x2'], ...Array.from(x1, (v, i) => [v, x2[i]])],
    ids: [['id'], ...Array.from({ length: n }, (_, i) => [id(i)])], links,
  };
  return { workload: `cell functions, ${n} areas (rook grid ${rows}x${cols}), SPILL.FIT lag`, n, links: links.length - 1, ...time(r, 5) };
}
