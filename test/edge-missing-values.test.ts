// Missing values. Default: refuse and list the rows. With dropMissing: the rows leave the analysis
// and the neighbours are built on the remaining areas, so a run with dropped rows must give exactly
// the estimates of a run on a table (and boundary file) from which those rows were deleted by hand
// (an identity of the method: the same areas, in the same order, give the same numbers).
import { describe, expect, it } from 'vitest';
import { runAnalysis, type AnalysisRequest, type AnalysisResult } from '../src/pipeline/index.js';
import { InputError } from '../src/errors.js';
import { main } from '../src/cli/run.js';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gridFile, gridRows, gridCsv, text } from './bad-inputs/make.js';
import type { WeightsSpec } from '../src/weights/index.js';

const R = 5, C = 5;
const rows = gridRows(R, C, 11);
const codesOnly = (keep: (code: string) => boolean) =>
  gridFile('districts.geojson', (fc) => { fc.features = fc.features.filter((f) => keep(f.properties.code)); }, { rows: R, cols: C, props: rows.map((g) => ({ code: g.code })) });
const DROP = new Set(['D04', 'D13']);

/** Table with a blank y for D04 and NaN x2 for D13 (user rows 5 and 14). */
const holey = () => gridCsv('table.csv', (r) => { r[3][1] = ''; r[12][3] = 'NaN'; }, R, C);
const trimmed = () => gridCsv('table.csv', (r) => { for (let i = r.length - 1; i >= 0; i--) if (DROP.has(String(r[i][0]))) r.splice(i, 1); }, R, C);

/** Rook links of the 5 × 5 grid as an edge list, optionally without some areas. */
function rookList(without: Set<string> = new Set()): string {
  const lines = ['origin,neighbour,weight'];
  for (let i = 0; i < R * C; i++) {
    const [r, c] = [Math.floor(i / C), i % C];
    for (const [dr, dc] of [[-1, 0], [1, 0], [0, -1], [0, 1]]) {
      const rr = r + dr, cc = c + dc;
      if (rr < 0 || rr >= R || cc < 0 || cc >= C) continue;
      const a = rows[i].code, b = rows[rr * C + cc].code;
      if (!without.has(a) && !without.has(b)) lines.push(`${a},${b},1`);
    }
  }
  return lines.join('\n') + '\n';
}

function request(weights: WeightsSpec, over: Partial<AnalysisRequest> = {}): AnalysisRequest {
  return {
    boundary: [codesOnly(() => true)], data: holey(), id: 'code', y: 'y', x: ['x1', 'x2'], weights, transform: 'row',
    models: ['ols', 'lag', 'error'], permutations: 99, impactDraws: 50, seed: 5, ...over,
  };
}

function estimates(r: AnalysisResult) {
  return {
    n: r.n, ids: r.ids,
    ols: r.ols.coefficients.map((c) => [c.estimate, c.se]), olsLogLik: r.ols.logLik, moran: r.ols.moran.I, lm: r.ols.lm.lag.stat,
    rho: r.fits.lag!.parameter, lagLogLik: r.fits.lag!.logLik, lag: r.fits.lag!.coefficients.map((c) => [c.estimate, c.se]),
    lambda: r.fits.error!.parameter, error: r.fits.error!.coefficients.map((c) => [c.estimate, c.se]),
    impacts: r.fits.lag!.impacts!.impacts.map((i) => [i.direct, i.indirect, i.total]),
    links: [Array.from(r.weights.edges.from), Array.from(r.weights.edges.to), Array.from(r.weights.edges.weight)],
    moranY: r.moranY.I,
  };
}

describe('missing values', () => {
  it('by default refuse, listing every row at fault', async () => {
    await expect(runAnalysis(request({ method: 'queen' }))).rejects.toThrow(InputError);
    await expect(runAnalysis(request({ method: 'queen' }))).rejects.toThrow(/Column "y".*blank cells in row 5/);
    await expect(runAnalysis(request({ method: 'queen' }, { y: 'x2', x: ['x1'] }))).rejects.toThrow(/Column "x2".*row 14 \(NaN\)/);
  });

  for (const weights of [{ method: 'queen' }, { method: 'rook' }, { method: 'knn', k: 4 }, { method: 'band', distance: 0.8 }] as WeightsSpec[]) {
    it(`with dropMissing, ${weights.method} weights: the same estimates as deleting the rows and their features`, async () => {
      const dropped = await runAnalysis(request(weights, { dropMissing: true }));
      const byHand = await runAnalysis(request(weights, { boundary: [codesOnly((c) => !DROP.has(c))], data: trimmed() }));
      expect(dropped.droppedRows).toEqual([{ row: 5, id: 'D04', columns: ['y'] }, { row: 14, id: 'D13', columns: ['x2'] }]);
      expect(dropped.warnings.join(' ')).toMatch(/2 row\(s\) with missing values were left out \(rows 5, 14\)/);
      expect(dropped.n).toBe(23);
      expect(estimates(dropped)).toEqual(estimates(byHand));
      // row-standardised again over the remaining areas: every row with links sums to 1
      const sums = new Float64Array(dropped.n);
      dropped.weights.edges.from.forEach((i, p) => { sums[i] += dropped.weights.edges.weight[p]; });
      for (const s of sums) if (s !== 0) expect(s).toBeCloseTo(1, 14);
    });
  }

  it('with dropMissing and an edge list naming the dropped areas: their links go, the rest is re-standardised', async () => {
    const dropped = await runAnalysis(request({ method: 'queen' }, { dropMissing: true, edgeList: text('links.csv', rookList()) }));
    const byHand = await runAnalysis(request({ method: 'queen' }, {
      boundary: [codesOnly((c) => !DROP.has(c))], data: trimmed(), edgeList: text('links.csv', rookList(DROP)),
    }));
    expect(estimates(dropped)).toEqual(estimates(byHand));
  });

  it('the command line drops, reports, and exits 0 with --drop-missing', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'spillway-missing-'));
    try {
      writeFileSync(join(dir, 'districts.geojson'), codesOnly(() => true).bytes);
      writeFileSync(join(dir, 'table.csv'), holey().bytes);
      let out = '', err = '';
      const io = { stdout: (t: string) => { out += t; }, stderr: (t: string) => { err += t; } };
      const args = ['fit', '--boundary', join(dir, 'districts.geojson'), '--data', join(dir, 'table.csv'), '--id', 'code', '--y', 'y', '--x', 'x1,x2',
        '--models', 'ols', '--permutations', '0', '--json'];
      expect(await main(args, io)).toBe(2);
      expect(err).toMatch(/blank cells in row 5/);
      out = ''; err = '';
      expect(await main([...args, '--drop-missing'], io)).toBe(0);
      const json = JSON.parse(out);
      expect(json.n).toBe(23);
      expect(JSON.stringify(json)).toMatch(/rows 5, 14/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
