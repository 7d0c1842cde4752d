/**
 * The cell functions pick up the wider family through the registry (no change to the cell functions
 * themselves): SPILL.FIT and SPILL.EFFECTS on Columbus with each family key, against the independent
 * numpy/scipy reference (scripts/reference/family.py → test/golden/family.json), queen neighbours.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { effectsRows, fitRows } from '../addin/functions/model-logic.js';
import type { Grid } from '../addin/functions/logic.js';
import { CELL_FUNCTION_GUIDE } from '../addin/shared/functions-guide.js';
import { MODELS } from '../src/models/index.js';
import { columbusData, readGolden } from './helpers/columbus.js';

const ROOT = join(import.meta.dirname, '..');
const family = JSON.parse(readFileSync(join(ROOT, 'test/golden/family.json'), 'utf8'));
const golden = readGolden();

function near(actual: unknown, expected: number, tol = 1e-6) {
  expect(typeof actual).toBe('number');
  expect(Math.abs((actual as number) - expected) / Math.max(1, Math.abs(expected)), `${actual} vs ${expected}`).toBeLessThan(tol);
}

async function ranges() {
  const { y, x } = await columbusData();
  const names = Array.from(y, (_, i) => `C${i + 1}`);
  const ids: Grid = [['area'], ...names.map((n) => [n])];
  const yr: Grid = [['CRIME'], ...Array.from(y, (v) => [v])];
  const xr: Grid = [['INC', 'HOVAL'], ...Array.from(y, (_, i) => [x.columns[1][i], x.columns[2][i]])];
  const links: Grid = [['origin', 'neighbour', 'weight']];
  (golden.weights.neighbours as number[][]).forEach((nb, i) => nb.forEach((j) => links.push([names[i], names[j], 1])));
  return { ids, yr, xr, links };
}

describe('SPILL.FIT and SPILL.EFFECTS with the wider family (Columbus, queen)', () => {
  it('each family key, by its key or its command-line spelling, gives the reference’s coefficients and spatial parameters', async () => {
    const r = await ranges();
    for (const [key, spelling] of [['slx', 'slx'], ['durbin', 'durbin'], ['durbinError', 'durbin-error'], ['lagError', 'lag-error'], ['lagIV', 'lag-iv'], ['errorGM', 'error-gm']]) {
      const rows = fitRows(r.yr, r.xr, r.ids, r.links, spelling) as (string | number)[][];
      const g = family[key];
      g.coefficients.forEach((c: { name: string; estimate: number }, k: number) => {
        expect(rows[1 + k][0], key).toBe(c.name);
        near(rows[1 + k][1], c.estimate, key === 'lagIV' ? 1e-9 : 1e-6);
      });
      if (g.rho !== undefined) near(rows.find((x) => String(x[0]).startsWith('ρ'))![1], g.rho, 1e-6);
      if (g.lambda !== undefined) near(rows.find((x) => String(x[0]).startsWith('λ'))![1], g.lambda, 1e-6);
      const width = rows[0].length;
      for (const x of rows) expect(x).toHaveLength(width);
    }
  });

  it('the Durbin model’s effects equal the reference’s (I − ρW)⁻¹(Iβ + Wθ)', async () => {
    const r = await ranges();
    const rows = effectsRows(r.yr, r.xr, r.ids, r.links, 'durbin') as (string | number)[][];
    const inc = rows.find((x) => x[0] === 'INC')!;
    const header = rows[0].map(String);
    near(inc[header.findIndex((h) => /direct/i.test(h))], family.durbin.impacts[0].direct, 1e-6);
    near(inc[header.findIndex((h) => /indirect/i.test(h))], family.durbin.impacts[0].indirect, 1e-6);
  });

  it('the neighbours’ columns model’s effects are exact and say so (no simulated draws); the reference’s figures', async () => {
    const r = await ranges();
    const rows = effectsRows(r.yr, r.xr, r.ids, r.links, 'slx', 'draws=200, seed=3') as (string | number)[][];
    const inc = rows.find((x) => x[0] === 'INC')!;
    const g = family.slx.impacts[0];
    near(inc[1], g.direct, 1e-6);
    near(inc[2], g.directSe, 1e-6);
    near(inc[4], g.indirect, 1e-6);
    near(inc[5], g.indirectSe, 1e-6);
    near(inc[8], g.totalSe, 1e-6);
    expect(rows.at(-1)!.slice(0, 2)).toEqual(['standard errors from', 'exact formulas (no simulation)']);
    // the simulated ones still name their draws
    const durbin = effectsRows(r.yr, r.xr, r.ids, r.links, 'durbin', 'draws=200, seed=3') as (string | number)[][];
    expect(durbin.at(-1)![1]).toBe('200 simulated draws, seed 3');
  });

  it('durbin, slx and lag-error: every coefficient’s estimate, standard error, z or t and p, the spatial parameters with their SEs, log-likelihood and AIC as the reference', async () => {
    const r = await ranges();
    for (const [key, spelling] of [['durbin', 'durbin'], ['slx', 'slx'], ['lagError', 'lag-error']]) {
      const rows = fitRows(r.yr, r.xr, r.ids, r.links, spelling) as (string | number)[][];
      const g = family[key];
      g.coefficients.forEach((c: { name: string; estimate: number; se: number; stat: number; p: number }, k: number) => {
        const row = rows[1 + k];
        expect(row[0], key).toBe(c.name);
        near(row[1], c.estimate, 1e-6); near(row[2], c.se, 1e-6); near(row[3], c.stat, 1e-6);
        near(row[4], c.p, 1e-6 * Math.max(1, Math.abs(c.stat)));
      });
      const rho = rows.find((x) => String(x[0]).startsWith('ρ'));
      const lambda = rows.find((x) => String(x[0]).startsWith('λ'));
      if (g.rho !== undefined) { near(rho![1], g.rho, 1e-6); near(rho![2], g.rhoSe, 1e-6); } else expect(rho).toBeUndefined();
      if (g.lambda !== undefined) { near(lambda![1], g.lambda, 1e-6); near(lambda![2], g.lambdaSe, 1e-6); } else expect(lambda).toBeUndefined();
      near(rows.find((x) => x[0] === 'log-likelihood')![1], g.logLik, 1e-6);
      near(rows.find((x) => x[0] === 'AIC')![1], g.aic, 1e-6);
      expect(rows.find((x) => x[0] === 'standard errors'), key).toBeUndefined(); // classical, not asked about
    }
  });

  it('"robust" changes the lag model by instruments’ standard errors to White’s (the reference’s), and says so; the moments error model’s are robust either way', async () => {
    const r = await ranges();
    const plain = fitRows(r.yr, r.xr, r.ids, r.links, 'lag-iv') as (string | number)[][];
    const robust = fitRows(r.yr, r.xr, r.ids, r.links, 'lag-iv', 'robust') as (string | number)[][];
    family.lagIV.coefficients.forEach((c: { estimate: number; se: number }, k: number) => {
      near(plain[1 + k][2], c.se, 1e-9);
      near(robust[1 + k][1], c.estimate, 1e-9); // the same estimates
      near(robust[1 + k][2], family.lagIV.coefficientsRobust[k].se, 1e-9);
      expect(robust[1 + k][2]).not.toBe(plain[1 + k][2]);
    });
    near(plain.find((x) => String(x[0]).startsWith('ρ'))![2], family.lagIV.rhoSe, 1e-9);
    near(robust.find((x) => String(x[0]).startsWith('ρ'))![2], family.lagIV.rhoSeRobust, 1e-9);
    expect(plain.find((x) => x[0] === 'standard errors')).toBeUndefined();
    expect(robust.find((x) => x[0] === 'standard errors')![1]).toMatch(/^robust to unequal variance \(White 1980, HC0\)$/);
    // the moments estimator: the reference's (robust) standard errors with or without the option, and a row that says so
    for (const options of [undefined, 'robust']) {
      const gm = fitRows(r.yr, r.xr, r.ids, r.links, 'error-gm', options) as (string | number)[][];
      family.errorGM.coefficients.forEach((c: { se: number }, k: number) => near(gm[1 + k][2], c.se, 1e-6));
      near(gm.find((x) => String(x[0]).startsWith('λ'))![2], family.errorGM.lambdaSe, 1e-6);
      expect(gm.find((x) => x[0] === 'standard errors')![1]).toMatch(/robust to unequal variance \(Kelejian & Prucha 2010\)/);
    }
    // a model whose standard errors the option does not change says so rather than passing it by
    const lag = fitRows(r.yr, r.xr, r.ids, r.links, 'lag', 'robust') as (string | number)[][];
    expect(lag.find((x) => x[0] === 'standard errors')![1]).toMatch(/^classical: "robust" changes them for "ols", "slx", "lag-iv" only/);
    // and SPILL.EFFECTS draws the instruments model's effects from the robust covariance
    const e1 = effectsRows(r.yr, r.xr, r.ids, r.links, 'lag-iv', 'draws=400, seed=2') as (string | number)[][];
    const e2 = effectsRows(r.yr, r.xr, r.ids, r.links, 'lag-iv', 'draws=400, seed=2, robust') as (string | number)[][];
    const inc1 = e1.find((x) => x[0] === 'INC')!;
    const inc2 = e2.find((x) => x[0] === 'INC')!;
    near(inc2[1], family.lagIV.impacts[0].direct, 1e-9);
    expect(inc2[1]).toBe(inc1[1]);
    expect(inc2[2]).not.toBe(inc1[2]);
  });

  it('the models without a likelihood say so in the log-likelihood and AIC rows, not with a blank', async () => {
    const r = await ranges();
    for (const m of ['lag-iv', 'error-gm']) {
      const rows = fitRows(r.yr, r.xr, r.ids, r.links, m) as (string | number)[][];
      for (const label of ['log-likelihood', 'AIC']) expect(rows.find((x) => x[0] === label)![1], `${m} ${label}`).toMatch(/without a likelihood/);
    }
  });

  it('an unknown model or one without effects is answered with the command line’s spellings', async () => {
    const r = await ranges();
    expect(() => fitRows(r.yr, r.xr, r.ids, r.links, 'durbin error')).toThrow(/choose from "ols", "lag", "error", "slx", "durbin", "durbin-error", "lag-error", "lag-iv", "error-gm"\./);
    expect(() => effectsRows(r.yr, r.xr, r.ids, r.links, 'error-gm')).toThrow(/effects are given for "lag", "slx", "durbin", "durbin-error", "lag-error", "lag-iv"\./);
  });

  it('the sidebar’s guide, the help page and the README name every model SPILL.FIT takes and every one SPILL.EFFECTS takes', () => {
    const withEffects = MODELS.filter((m) => m.impacts).map((m) => `"${m.cli}"`);
    const fitGuide = CELL_FUNCTION_GUIDE.find((f) => f.name === 'FIT')!.gives;
    const effectsGuide = CELL_FUNCTION_GUIDE.find((f) => f.name === 'EFFECTS')!.gives;
    for (const m of MODELS) expect(fitGuide, m.cli).toContain(`"${m.cli}"`);
    for (const m of withEffects) expect(effectsGuide, m).toContain(m);
    const item = (text: string, call: string) => text.slice(text.indexOf(call), text.indexOf(call) + 1200);
    const help = readFileSync(join(ROOT, 'addin/help/index.html'), 'utf8').replace(/<\/?code>/g, '').replace(/\s+/g, ' ');
    const readme = readFileSync(join(ROOT, 'README.md'), 'utf8').replace(/`/g, '');
    for (const [text, where] of [[help, 'help page'], [readme, 'README']]) {
      const fit = item(text, '=SPILL.FIT(');
      for (const m of MODELS) expect(fit, `${where}: ${m.cli}`).toContain(`"${m.cli}"`);
      const effects = item(text, '=SPILL.EFFECTS(');
      for (const m of withEffects) expect(effects, `${where}: ${m}`).toContain(m);
    }
  });
});
