/**
 * The same question under other neighbour definitions. What the checks rest on:
 * - the independent numpy/scipy reference (test/golden/columbus.json, scripts/reference/columbus.py)
 *   for the Columbus data (Anselin 1988) under queen and 4-nearest-neighbour weights;
 * - the reference's note that rook contiguity by shared segment gives 200 links on Columbus;
 * - identities: the first row is the run itself; a definition refitted alone gives the same figures.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runAnalysis } from '../src/pipeline/index.js';
import type { AnalysisRequest, WeightsComparison } from '../src/pipeline/types.js';
import { suggestedAlternatives } from '../src/pipeline/compare-weights.js';
import { buildReport } from '../src/report/index.js';
import { readWorkbook, writeResultsWorkbook } from '../src/workbook/index.js';
import { resultToJson } from '../src/pipeline/to-json.js';
import { formatSummary } from '../src/cli/summary.js';
import { readGolden } from './helpers/columbus.js';
import { failure } from './helpers/input-error.js';
import { ROOT, runCli, STACK_LINE } from './helpers/cli.js';

const dir = join(ROOT, 'test/fixtures/columbus');
const boundary = ['columbus.shp', 'columbus.dbf', 'columbus.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(dir, name))) }));
// Columbus coordinates are planar units that happen to lie within longitude/latitude ranges; the
// reference measures straight-line distances, so the run says they are projected
const request = (extra: Partial<AnalysisRequest> = {}): AnalysisRequest => ({
  boundary, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
  models: ['ols', 'lag', 'error'], permutations: 0, impactDraws: 50, ...extra,
});
const golden = readGolden(); // throws when the file is missing: the checks fail, never skip
/** ρ or λ of a comparison row's lag or error model */
const param = (r: WeightsComparison, model: 'lag' | 'error') => r.fits[model]!.parameters[0];
const sig6 = (a: number, b: number) => expect(Math.abs(a - b) / Math.max(Math.abs(b), 1e-300), `${a} vs ${b}`).toBeLessThan(5e-6);

describe('neighbour definitions compared (Columbus)', async () => {
  const result = await runAnalysis(request({ compareWeights: [{ method: 'knn', k: 4 }, { method: 'rook' }, { method: 'queen' }] }));
  const rows = result.comparison!;

  it('the first row is the run itself; the run\'s own definition asked again is not repeated', () => {
    expect(rows.map((r) => r.asRun)).toEqual([true, false, false]);
    expect(param(rows[0], 'lag').estimate).toBe(result.fits.lag!.parameter);
    expect(param(rows[0], 'error').estimate).toBe(result.fits.error!.parameter);
    expect(rows[0].moran.I).toBe(result.ols.moran.I);
    expect(result.request.compareWeights).toEqual([{ method: 'knn', k: 4 }, { method: 'rook' }]);
  });

  it('4 nearest neighbours agree with the numpy/scipy reference to 6 significant digits', () => {
    const g = golden.knn4;
    const r = rows[1];
    expect(r.links).toBe(g.weights.links);
    for (const f of ['I', 'z', 'p'] as const) sig6(r.moran[f], g.ols.moran[f]);
    for (const f of ['error', 'lag', 'robustError', 'robustLag'] as const) sig6(r.lmP[f], g.ols.lm[f].p);
    sig6(param(r, 'lag').estimate, g.lag.rho); sig6(param(r, 'lag').se, g.lag.rhoSe); sig6(r.fits.lag!.logLik!, g.lag.logLik); sig6(r.fits.lag!.aic!, g.lag.aic);
    sig6(param(r, 'error').estimate, g.error.lambda); sig6(param(r, 'error').se, g.error.lambdaSe); sig6(r.fits.error!.logLik!, g.error.logLik); sig6(r.fits.error!.aic!, g.error.aic);
  });

  it('rook contiguity has the reference\'s 200 links and the figures of a run made with rook alone', async () => {
    const alone = await runAnalysis(request({ weights: { method: 'rook' } }));
    const r = rows[2];
    expect(r.links).toBe(200);
    expect(param(r, 'lag').estimate).toBe(alone.fits.lag!.parameter);
    expect(param(r, 'error').se).toBe(alone.fits.error!.parameterSe);
    expect(r.lmP.robustLag).toBe(alone.ols.lm.robustLag.p);
    expect(r.suggestion).toBe(alone.ols.recommendation.choice);
    // the lag model's effects with the same draws and seed as a run of its own
    expect(r.fits.lag!.impacts).toEqual(alone.fits.lag!.impacts!.impacts);
    expect(rows[0].fits.lag!.impacts).toEqual(result.fits.lag!.impacts!.impacts);
  });

  it('a definition that links nothing is reported in its row, not fatal', async () => {
    const r = await runAnalysis(request({ models: ['ols', 'lag'], compareWeights: [{ method: 'band', distance: 0.1 }] }));
    expect(r.comparison![1].failed).toMatch(/links nothing/);
    expect(Number.isNaN(r.comparison![1].moran.I)).toBe(true);
    expect(r.fits.lag).toBeDefined();
  });

  it('refuses more than six alternatives, saying how many fit', async () => {
    const many = Array.from({ length: 7 }, (_, k) => ({ method: 'knn' as const, k: k + 2 }));
    const e = await failure(runAnalysis(request({ compareWeights: many })));
    expect(e.message).toMatch(/7 neighbour definitions .* at most 6/);
  });

  it('suggests the other contiguity rule and 4 and 6 nearest neighbours for polygons, 4, 6 and 8 for points', () => {
    expect(suggestedAlternatives({ method: 'queen' }, true)).toEqual([{ method: 'rook' }, { method: 'knn', k: 4 }, { method: 'knn', k: 6 }]);
    expect(suggestedAlternatives({ method: 'knn', k: 6 }, false)).toEqual([{ method: 'knn', k: 4 }, { method: 'knn', k: 8 }]);
    expect(suggestedAlternatives({ method: 'edge-list' }, true)).toHaveLength(3);
  });

  it('the report gets its own sheet with both tables, a reading and the caution; the JSON carries the rows', () => {
    const report = buildReport(result);
    const sheet = report.sheets.find((s) => s.role === 'comparison')!;
    expect(sheet.name).toBe('Neighbour definitions compared');
    const titles = sheet.blocks.filter((b) => b.kind === 'table').map((b) => (b as { title: string }).title);
    expect(titles).toEqual(['Neighbours and the tests on the plain regression\'s residuals', 'The spatial models under each definition', 'Spillover effects of the spatial lag model under each definition']);
    expect(sheet.blocks.some((b) => b.kind === 'keyValues' && b.title === 'The definitions in full')).toBe(true);
    const text = sheet.blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text).join('\n');
    expect(text).toMatch(/ρ runs from 0\.423 to 0\.463/); // rook 0.4228, queen 0.4233, 4 nearest 0.4632 (reference above)
    expect(text).toMatch(/for a reason about the places/);
    const summary = report.sheets[0].blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text).join('\n');
    expect(summary).toMatch(/Other neighbour definitions, on the sheet "Neighbour definitions compared": across the 3 distinct definitions/);
    // no nested brackets in the readings
    for (const t of [text, summary]) expect(t).not.toMatch(/\([^()]*\(/);
    const json = resultToJson(result) as { comparison: { asRun: boolean; lag: { rho: number } }[] };
    expect(json.comparison).toHaveLength(3);
    expect(json.comparison[1].lag.rho).toBe(param(rows[1], 'lag').estimate);
  });

  it('the workbook carries the sheet: every number of the two tables reads back as written (exceljs)', async () => {
    const report = buildReport(result);
    const sheets = await readWorkbook(await writeResultsWorkbook(report));
    const written = sheets.find((s) => s.name === 'Neighbour definitions compared')!;
    const cells = new Set(written.rows.flat().filter((c): c is number => typeof c === 'number'));
    for (const r of rows) for (const v of [r.moran.I, r.lmP.robustLag, param(r, 'lag').estimate, param(r, 'lag').se, r.fits.error!.aic!]) expect(cells.has(v), String(v)).toBe(true);
  });

  it('the command line takes --compare and names a bad rule in plain words', () => {
    const base = ['fit', '--boundary', join(dir, 'columbus.shp'), '--id', 'POLYID', '--y', 'CRIME', '--x', 'INC,HOVAL', '--models', 'lag'];
    const ok = runCli([...base, '--compare', 'suggested', '--json']);
    expect(ok.code).toBe(0);
    expect(JSON.parse(ok.stdout).comparison.map((c: { label: string }) => c.label)).toEqual(['queen contiguity', 'rook contiguity', '4 nearest neighbours', '6 nearest neighbours']);
    const bad = runCli([...base, '--compare', 'rook,hexagon']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--compare: .*unknown rule "hexagon"/);
    expect(bad.stderr).not.toMatch(STACK_LINE);
  });
});

describe('a definition that links the same neighbours as another is said once', () => {
  // on a grid of unit squares, a distance band of 1.2 between centres links exactly the rook neighbours
  // (centres 1 apart across an edge, √2 across a corner): an identity of the grid's geometry
  it('is recognised, not refitted, and named once in the report instead of repeating identical rows', async () => {
    const side = 6;
    const features = Array.from({ length: side * side }, (_, i) => {
      const x = i % side, y = Math.floor(i / side);
      return {
        type: 'Feature', properties: { cell: `G${i + 1}`, y: Math.sin(i) + x * 0.4 + ((i * 7) % 5) * 0.3, x: Math.cos(i * 1.3) + y * 0.2 },
        geometry: { type: 'Polygon', coordinates: [[[x, y], [x + 1, y], [x + 1, y + 1], [x, y + 1], [x, y]]] },
      };
    });
    const bytes = new TextEncoder().encode(JSON.stringify({ type: 'FeatureCollection', features }));
    const r = await runAnalysis({
      boundary: [{ name: 'grid.geojson', bytes }], coordinates: 'projected', id: 'cell', y: 'y', x: ['x'], weights: { method: 'rook' }, transform: 'row',
      models: ['ols', 'lag'], permutations: 0, impactDraws: 20, compareWeights: [{ method: 'band', distance: 1.2 }, { method: 'queen' }],
    });
    const [own, band, queen] = r.comparison!;
    expect(band.sameAs).toBe(own.label);
    expect(band.fits.lag!.parameters[0].estimate).toBe(own.fits.lag!.parameters[0].estimate);
    expect(queen.sameAs).toBeUndefined();
    const sheet = buildReport(r).sheets.find((s) => s.role === 'comparison')!;
    const first = sheet.blocks.find((b) => b.kind === 'table')!;
    expect(first.kind === 'table' && first.rows.map((row) => row[0])).toEqual(['rook contiguity (this run)', 'queen contiguity']);
    const notes = sheet.blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text).join('\n');
    expect(notes).toMatch(/^The definition "all areas within distance 1\.2" links exactly the same neighbours as "rook contiguity" on these areas, so it gives the same figures/m);
    expect(notes).toMatch(/Across the 2 distinct definitions \(1 more linked the same neighbours as one of these\)/);
    expect((resultToJson(r) as { comparison: { sameAs?: string }[] }).comparison[1].sameAs).toBe('rook contiguity');
    // the command line's text summary says it the same way: no row of repeated figures, one line naming both
    const text = formatSummary(r);
    const section = text.slice(text.indexOf('The same question under other neighbour definitions')).split('\n\n')[0];
    const rowsOf = section.split('\n').slice(2).filter((l) => /^ {2}\S/.test(l) && !l.startsWith('  "'));
    expect(rowsOf.map((l) => l.trim().split(/\s{2,}/)[0])).toEqual(['rook contiguity (this run)', 'queen contiguity']);
    expect(section).toContain('"all areas within distance 1.2" links exactly the same neighbours as "rook contiguity" on these areas, so it gives the same figures; its row is not repeated.');
  });
});

describe('ties among nearest neighbours under a compared definition (#18 §2)', () => {
  // A 9 × 9 lattice of unit squares: the centres' squared distances are whole numbers, so which areas
  // the tie rule decided is counted here exactly, in integers (the lattice's geometry is the source).
  const side = 9, n = side * side;
  const col = (i: number) => i % side, rw = (i: number) => Math.floor(i / side);
  const d2 = (i: number, j: number) => (col(i) - col(j)) ** 2 + (rw(i) - rw(j)) ** 2;
  /** areas with more others at the k-th nearest distance than places left for them */
  const decidedByTies = (k: number) => Array.from({ length: n }, (_, i) => i).filter((i) => {
    const others = Array.from({ length: n }, (_, j) => j).filter((j) => j !== i).sort((a, b) => d2(i, a) - d2(i, b));
    return others.filter((j) => d2(i, j) <= d2(i, others[k - 1])).length > k;
  }).length;
  const features = Array.from({ length: n }, (_, i) => {
    const x = col(i), y = rw(i);
    return {
      type: 'Feature', properties: { cell: `L${i + 1}`, y: Math.sin(i) + x * 0.3 + ((i * 7) % 5) * 0.2, x: Math.cos(i * 1.7) + y * 0.1 },
      geometry: { type: 'Polygon', coordinates: [[[x, y], [x + 1, y], [x + 1, y + 1], [x, y + 1], [x, y]]] },
    };
  });
  const bytes = new TextEncoder().encode(JSON.stringify({ type: 'FeatureCollection', features }));

  it('warns, as the run does for its own definition: how many areas, under which definition; in the warnings, the JSON and the comparison sheet', async () => {
    const r = await runAnalysis({
      boundary: [{ name: 'lattice.geojson', bytes }], coordinates: 'projected', id: 'cell', y: 'y', x: ['x'], weights: { method: 'queen' }, transform: 'row',
      models: ['ols', 'lag'], permutations: 0, impactDraws: 20, compareWeights: [{ method: 'knn', k: 3 }, { method: 'knn', k: 3, ties: 'include' }],
    });
    const [own, lower, include] = r.comparison!;
    expect(own.tiesWarning).toBeUndefined(); // contiguity has no ties to decide
    const want = decidedByTies(3);
    expect(want).toBeGreaterThan(0);
    expect(lower.tiesDecided).toBe(want);
    expect(include.tiesDecided).toBe(want);
    expect(lower.tiesWarning).toMatch(new RegExp(`^${want} area\\(s\\) had more areas tied at the k-th nearest distance.*lowest row were taken`));
    expect(include.tiesWarning).toMatch(/every tied area was made a neighbour/);
    // the run's warnings name the compared definition, as they name the run's own ties
    const said = r.warnings.filter((w) => /tied at the k-th nearest distance/.test(w));
    expect(said).toEqual([`Under the compared definition "${lower.label}": ${lower.tiesWarning}`, `Under the compared definition "${include.label}": ${include.tiesWarning}`]);
    expect((resultToJson(r) as { comparison: { tiesDecided?: number }[] }).comparison.map((c) => c.tiesDecided)).toEqual([undefined, want, want]);
    const sheet = buildReport(r).sheets.find((s) => s.role === 'comparison')!;
    const notes = sheet.blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text);
    expect(notes).toContain(`Under ${lower.label}: ${lower.tiesWarning}`);
  });

  it('the run\'s own k-nearest definition carries its tie count in the first row too (and is warned of once)', async () => {
    const r = await runAnalysis({
      boundary: [{ name: 'lattice.geojson', bytes }], coordinates: 'projected', id: 'cell', y: 'y', x: ['x'], weights: { method: 'knn', k: 4 }, transform: 'row',
      models: ['ols', 'lag'], permutations: 0, impactDraws: 20, compareWeights: [{ method: 'queen' }],
    });
    expect(r.comparison![0].tiesDecided).toBe(decidedByTies(4));
    expect(r.warnings.filter((w) => /tied at the k-th nearest distance/.test(w))).toHaveLength(1);
  });
});

describe('the sidebar’s comparison of neighbour definitions with every model ticked', async () => {
  // what the sidebar does: the worker sends the registry's models (modelChoices), the model step's tick
  // boxes set s.models, and Run asks for requestedModels(s.models, choices) with compareWeights 'suggested'
  const { modelChoices, requestedModels } = await import('../addin/shared/model-choices.js');
  const { MODELS } = await import('../src/models/index.js');
  const family = JSON.parse(readFileSync(join(ROOT, 'test/golden/family.json'), 'utf8'));
  const choices = modelChoices();

  it('offers a tick box for every registry model but the always-fitted one, and by default asks for the plain, lag and error models', () => {
    expect(choices.filter((c) => !c.baseline).map((c) => c.key)).toEqual(MODELS.filter((m) => !m.baseline).map((m) => m.key));
    expect(requestedModels(null, choices)).toEqual(['ols', 'lag', 'error']); // the sidebar's first state: s.models null
  });

  it('accepts every one: each other definition refits every model, and under 4 nearest neighbours gives the numpy reference’s spatial parameters', async () => {
    const models = requestedModels(new Set(choices.filter((c) => !c.baseline).map((c) => c.key)), choices);
    expect(models).toEqual(MODELS.map((m) => m.key));
    const result = await runAnalysis(request({ models: models as AnalysisRequest['models'], compareWeights: 'suggested' }));
    const rows = result.comparison!.filter((r) => !r.failed && !r.sameAs);
    expect(rows.length).toBeGreaterThan(2);
    for (const r of rows) {
      for (const m of MODELS.filter((e) => !e.baseline)) {
        const fit = r.fits[m.key as keyof typeof r.fits];
        expect(fit, `${r.label}: ${m.key}`).toBeTruthy();
        expect(fit!.parameters.map((q) => q.key), `${r.label}: ${m.key}`).toEqual(m.parameters.map((q) => q.key));
      }
    }
    // scripts/reference/family.py, knn4 (numpy/scipy, dense): the spatial parameters to 5e-5
    const knn4 = rows.find((r) => r.label === '4 nearest neighbours')!;
    expect(knn4, rows.map((r) => r.label).join('; ')).toBeTruthy();
    const at = (key: string, q: string) => knn4.fits[key as keyof typeof knn4.fits]!.parameters.find((p) => p.key === q)!.estimate;
    const close = (a: number, b: number, what: string) => expect(Math.abs(a - b), `${what}: ${a} vs ${b}`).toBeLessThan(5e-5);
    close(at('durbin', 'rho'), family.knn4.durbin.rho, 'Durbin ρ');
    close(at('durbinError', 'lambda'), family.knn4.durbinError.lambda, 'Durbin error λ');
    close(at('lagError', 'rho'), family.knn4.lagError.rho, 'lag-and-error ρ');
    close(at('lagError', 'lambda'), family.knn4.lagError.lambda, 'lag-and-error λ');
    close(at('lagIV', 'rho'), family.knn4.lagIV.rho, 'instruments ρ');
    close(at('errorGM', 'lambda'), family.knn4.errorGM.lambda, 'moments λ');
    // the Comparison sheet has every model's columns
    const sheet = buildReport(result).sheets.find((x) => x.role === 'comparison')!;
    const table = sheet.blocks.find((b) => b.kind === 'table' && b.title === 'The spatial models under each definition') as { columns: { group?: string }[] };
    const groups = new Set(table.columns.map((c) => c.group).filter(Boolean));
    for (const m of MODELS.filter((e) => !e.baseline)) expect([...groups].some((g) => g!.includes(m.label)), m.label).toBe(true);
  });
});
