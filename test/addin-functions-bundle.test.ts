// The BUILT cell-functions script (functions.js from addin/vite.functions.config.ts), loaded in Node the
// way the shared runtime loads it: evaluated as a classic script with a stand-in CustomFunctions that
// records each associate(id, fn), and an Excel.run over the in-memory stand-in workbook
// (test/helpers/fake-excel.ts) that keeps the Columbus boundary file. Each function is then called by
// its metadata id on Columbus arrays. Sources: the independent numpy reference figures
// (test/golden/columbus.json, scripts/reference/columbus.py) and the engine's own statistics for the
// functions the reference does not cover.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createContext, runInContext } from 'node:vm';
import { build } from 'vite';
import { readBoundary, representativePoints } from '../src/geo/index.js';
import { moranColumn } from '../src/stats/index.js';
import { buildWeights } from '../src/weights/index.js';
import { boundaryParts } from '../addin/excel/boundary-part.js';
import { SETUP_KEY } from '../addin/excel/adapter.js';
import { FakeExcel } from './helpers/fake-excel.js';
import { runAnalysis } from '../src/pipeline/index.js';
import { MODELS } from '../src/models/index.js';
import { readWorkbook } from '../src/workbook/index.js';
import { CELL_FUNCTION_GUIDE, WORKED_EXAMPLE } from '../addin/shared/functions-guide.js';
import { readGolden } from './helpers/columbus.js';

/* eslint-disable @typescript-eslint/no-explicit-any */
const ROOT = join(import.meta.dirname, '..');
const golden = readGolden();
const files = ['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(ROOT, 'test/fixtures/columbus', name))) }));

class CellError extends Error {
  constructor(readonly code: string, message?: string) { super(message); }
}

let out: string;
let metadata: { functions: { id: string; name: string; description: string; result: unknown; parameters: { name: string; description?: string; optional?: boolean }[] }[] };
const associated = new Map<string, (...args: any[]) => any>();
const excel = new FakeExcel();

beforeAll(async () => {
  out = mkdtempSync(join(tmpdir(), 'spillway-functions-'));
  await build({ configFile: join(ROOT, 'addin/vite.functions.config.ts'), logLevel: 'warn', build: { outDir: out } });
  metadata = JSON.parse(readFileSync(join(out, 'functions.json'), 'utf8'));
  // the workbook as the sidebar leaves it after a run: the boundary file kept, the setup saved
  for (const xml of boundaryParts(files)) excel.newPart(xml);
  excel.settings.set(SETUP_KEY, JSON.stringify({ version: 1, id: 'POLYID', areas: { kind: 'file', names: files.map((f) => f.name) } }));
  const sandbox = {
    CustomFunctions: {
      associate: (id: string, fn: (...args: any[]) => any) => { associated.set(id, fn); },
      Error: CellError,
      ErrorCode: { invalidValue: '#VALUE!', notAvailable: '#N/A' },
    },
    Excel: { run: excel.run },
    // what every browser runtime offers besides
    atob, btoa, TextDecoder, TextEncoder,
  };
  runInContext(readFileSync(join(out, 'functions.js'), 'utf8'), createContext(sandbox), { filename: 'functions.js' });
}, 120_000);

afterAll(() => { if (out) rmSync(out, { recursive: true, force: true }); });

const call = (id: string, ...args: any[]) => {
  const fn = associated.get(id);
  if (!fn) throw new Error(`${id} was not associated`);
  return fn(...args);
};

async function columbus() {
  const layer = await readBoundary(files);
  const ids = layer.areas.map((a) => String(a.properties.POLYID));
  const col = (name: string) => layer.areas.map((a) => Number(a.properties[name]));
  const pts = representativePoints(layer.areas.map((a) => a.geometry!));
  const column = (head: string, xs: ArrayLike<number | string>) => [[head], ...Array.from(xs, (v) => [v])];
  const links: any[][] = [['origin', 'neighbour', 'weight']];
  (golden.weights.neighbours as number[][]).forEach((nb, i) => nb.forEach((j) => links.push([ids[i], ids[j], 1 / nb.length])));
  const matrix = ids.map((_, i) => ids.map((__, j) => ((golden.weights.neighbours[i] as number[]).includes(j) ? 1 / golden.weights.neighbours[i].length : 0)));
  return {
    layer, ids, links, matrix,
    idRange: column('POLYID', ids),
    crime: column('CRIME', col('CRIME')),
    x: column('x', pts.x), y: column('y', pts.y),
    regressors: [['INC', 'HOVAL'], ...col('INC').map((v, i) => [v, col('HOVAL')[i]])],
  };
}

/** Neighbour sets per area (as positions) from spilled rows. */
function sets(rows: any[][], ids: string[]): number[][] {
  const at = new Map(ids.map((id, i) => [id, i]));
  const res: number[][] = ids.map(() => []);
  for (const [o, d] of rows.slice(1)) res[at.get(String(o))!].push(at.get(String(d))!);
  return res.map((s) => s.sort((a, b) => a - b));
}

describe('the built functions.js in a stand-in shared runtime', () => {
  it('is one classic script that associates exactly the ids functions.json lists', () => {
    // evaluated above with runInContext, which a script with import or export statements would fail
    const code = readFileSync(join(out, 'functions.js'), 'utf8');
    expect(code.trimStart().startsWith('(function')).toBe(true);
    expect([...associated.keys()].sort()).toEqual(metadata.functions.map((f) => f.id).sort());
  });

  it('describes every function, each argument, and gives an example', () => {
    for (const f of metadata.functions) {
      expect(f.description.length, f.id).toBeGreaterThan(30);
      for (const p of f.parameters) expect(p.description?.length ?? 0, `${f.id}(${p.name})`).toBeGreaterThan(15);
      const neighbours = f.parameters.find((p) => p.name === 'neighbours');
      if (neighbours) {
        // the matrix form and the size limit are said where the argument is described
        expect(neighbours.description, f.id).toMatch(/n × n/);
        expect(neighbours.description, f.id).toMatch(/5 MB/);
      }
    }
    // the sidebar's guide lists every function
    expect(CELL_FUNCTION_GUIDE.map((f) => f.name).sort()).toEqual(metadata.functions.map((f) => f.id).sort());
    for (const f of metadata.functions) expect(f.description, f.id).toMatch(new RegExp(`Example.*=SPILL\\.${f.id}\\(`));

    // the model argument names every model the registry fits, and EFFECTS every one with effects
    const modelArgument = (id: string) => metadata.functions.find((f) => f.id === id)!.parameters.find((p) => p.name === 'model')!.description!;
    for (const m of MODELS) expect(modelArgument('FIT'), m.cli).toContain(`"${m.cli}"`);
    for (const m of MODELS.filter((e) => e.impacts)) expect(modelArgument('EFFECTS'), m.cli).toContain(`"${m.cli}"`);
  });

  it('MORAN, LAG and GEARY by id give the engine’s figures, from a list of links and from the n × n matrix alike', async () => {
    const c = await columbus();
    const w = buildWeights({ ids: c.ids, geometries: c.layer.areas.map((a) => a.geometry!), coordinates: c.layer.coordinates }, { method: 'queen' }, { transform: 'row' });
    const engine = moranColumn(Float64Array.from(c.crime.slice(1).map((r) => Number(r[0]))), w);
    for (const nb of [c.links, c.matrix]) {
      const [row] = call('MORAN', c.crime, c.idRange, nb, true);
      expect(row[0]).toBeCloseTo(engine.I, 12);
      expect(row[2]).toBeCloseTo(engine.z, 10);
    }
    const a = call('LAG', c.crime, c.idRange, c.links).flat();
    call('LAG', c.crime, c.idRange, c.matrix).flat().forEach((x: number, i: number) => expect(x).toBeCloseTo(a[i], 12));
    expect(call('GEARY', c.crime, c.idRange, c.matrix)[0][0]).toBeCloseTo(call('GEARY', c.crime, c.idRange, c.links)[0][0], 12);
  });

  it('NEIGHBOURS by id: the 4 nearest by centroid equal the numpy reference', async () => {
    const c = await columbus();
    const rows = call('NEIGHBOURS', c.idRange, c.x, c.y, 'nearest', 4);
    expect(sets(rows, c.ids)).toEqual(golden.knn4.weights.neighbours);
  });

  it('TOUCHING by id reads the kept boundary file through Excel.run and gives the reference queen links', async () => {
    const c = await columbus();
    const rows = await call('TOUCHING', c.idRange);
    expect(rows).toHaveLength(237);
    expect(sets(rows, c.ids)).toEqual(golden.weights.neighbours);
  });

  it('FIT, EFFECTS and LMTESTS by id give the reference figures, from the list of links and the n × n matrix alike', async () => {
    const c = await columbus();
    for (const nb of [c.links, c.matrix]) {
      const fit = call('FIT', c.crime, c.regressors, c.idRange, nb, 'lag');
      const rho = fit.find((r: any[]) => String(r[0]).startsWith('ρ'));
      expect(Math.abs(rho[1] - golden.lag.rho)).toBeLessThan(1e-6);
      golden.lag.coefficients.forEach((k: { estimate: number }, i: number) => expect(Math.abs(fit[1 + i][1] - k.estimate) / Math.abs(k.estimate)).toBeLessThan(1e-6));
      expect(Math.abs(fit.find((r: any[]) => r[0] === 'log-likelihood')[1] - golden.lag.logLik)).toBeLessThan(1e-6);
      const effects = call('EFFECTS', c.crime, c.regressors, c.idRange, nb, 'lag', 'draws=100');
      for (const g of golden.impacts) expect(Math.abs(effects.find((r: any[]) => r[0] === g.name)[7] - g.total) / Math.abs(g.total)).toBeLessThan(1e-6);
      const tests = call('LMTESTS', c.crime, c.regressors, c.idRange, nb);
      expect(Math.abs(tests.find((r: any[]) => r[0] === 'Lagrange multiplier: lag')[1] - golden.ols.lm.lag.stat)).toBeLessThan(1e-6);
    }
    const error = call('FIT', c.crime, c.regressors, c.idRange, c.links, 'error');
    expect(Math.abs(error.find((r: any[]) => String(r[0]).startsWith('λ'))[1] - golden.error.lambda)).toBeLessThan(1e-6);
  });

  it('FIT by id with durbin, slx and lag-error gives the family reference’s figures (scripts/reference/family.py), from the list of links and the n × n matrix alike; "robust" gives lag-iv White’s', async () => {
    const c = await columbus();
    const family = JSON.parse(readFileSync(join(ROOT, 'test/golden/family.json'), 'utf8'));
    const close = (a: number, b: number, what: string) => expect(Math.abs(a - b) / Math.max(1, Math.abs(b)), `${what}: ${a} vs ${b}`).toBeLessThan(1e-6);
    for (const nb of [c.links, c.matrix]) {
      for (const [key, spelling] of [['durbin', 'durbin'], ['slx', 'slx'], ['lagError', 'lag-error']]) {
        const g = family[key];
        const fit = call('FIT', c.crime, c.regressors, c.idRange, nb, spelling);
        g.coefficients.forEach((k: { name: string; estimate: number; se: number }, i: number) => {
          expect(fit[1 + i][0]).toBe(k.name);
          close(fit[1 + i][1], k.estimate, `${key} ${k.name}`);
          close(fit[1 + i][2], k.se, `${key} ${k.name} se`);
        });
        if (g.rho !== undefined) close(fit.find((r: any[]) => String(r[0]).startsWith('ρ'))[1], g.rho, `${key} ρ`);
        if (g.lambda !== undefined) close(fit.find((r: any[]) => String(r[0]).startsWith('λ'))[1], g.lambda, `${key} λ`);
        close(fit.find((r: any[]) => r[0] === 'log-likelihood')[1], g.logLik, `${key} log-likelihood`);
      }
      const iv = call('FIT', c.crime, c.regressors, c.idRange, nb, 'lag-iv', 'robust');
      family.lagIV.coefficientsRobust.forEach((k: { se: number }, i: number) => close(iv[1 + i][2], k.se, 'robust se'));
    }
  });

  it('the help’s worked example on the demo sheet gives the figures of a run of the whole job (addin/shared/functions-guide.ts)', async () => {
    const samples = join(ROOT, 'sample-workbooks');
    const districts = { name: 'vell-basin-districts.geojson', bytes: new Uint8Array(readFileSync(join(samples, 'vell-basin-districts.geojson'))) };
    const table = { name: 'vell-basin.xlsx', bytes: new Uint8Array(readFileSync(join(samples, 'vell-basin.xlsx'))) };
    const sheet = await readWorkbook(table.bytes);
    const rows = sheet.find((s) => s.name === 'Districts')!.rows.slice(0, 151);
    const column = (c: number, width = 1) => rows.map((r) => r.slice(c, c + width));
    // the workbook after a run from the sidebar: the demo's boundary kept, its setup saved
    excel.xmlParts.length = 0;
    for (const xml of boundaryParts([districts])) excel.newPart(xml);
    excel.settings.set(SETUP_KEY, JSON.stringify({ version: 1, id: 'district_id', areas: { kind: 'file', names: [districts.name] } }));
    const k1 = await call('TOUCHING', column(0));
    const fit = call('FIT', column(2), column(3, 3), column(0), k1, 'lag');
    const run = await runAnalysis({ boundary: [districts], data: table, sheet: 'Districts', id: 'district_id', y: 'long_commute_pct', x: ['broadband_pct', 'rail_km', 'rent_index'],
      weights: { method: 'queen' }, transform: 'row', models: ['ols', 'lag'], impactDraws: 10, permutations: 0 });
    expect(k1.length - 1).toBe(run.weights.links);
    expect(Math.abs(fit.find((r: any[]) => String(r[0]).startsWith('ρ'))[1] - run.fits.lag!.parameter)).toBeLessThan(1e-6); // the search's own tolerance
    const tests = call('LMTESTS', column(2), column(3, 3), column(0), k1);
    expect(Math.abs(tests.find((r: any[]) => r[0] === 'Lagrange multiplier: lag')[1] - run.ols.lm.lag.stat)).toBeLessThan(1e-8);
    for (const step of WORKED_EXAMPLE) expect(step.formula).toMatch(/^=SPILL\.(TOUCHING|LMTESTS|FIT|EFFECTS)\(/);
  }, 60_000);

  it('bad input becomes a #VALUE! cell error whose message names the cell', async () => {
    const c = await columbus();
    const holed = c.crime.map((r) => [...r]);
    holed[4][0] = 'unknown';
    let caught: unknown;
    try { call('MORAN', holed, c.idRange, c.links); } catch (e) { caught = e; }
    expect(caught).toBeInstanceOf(CellError);
    expect((caught as CellError).code).toBe('#VALUE!');
    expect((caught as CellError).message).toMatch(/Cell 5 of the values range holds "unknown"/);
    await expect(call('TOUCHING', [['no such area']])).rejects.toMatchObject({ code: '#VALUE!' });
  });
});
