// The model cell functions (issue 16 §1): SPILL.FIT, SPILL.EFFECTS and SPILL.LMTESTS on Columbus
// (Anselin 1988), checked against the independent numpy/scipy reference (test/golden/columbus.json,
// scripts/reference/columbus.py): queen and 4-nearest neighbours, row-standardised; the n × n matrix
// form against the list of links; and the identity total = direct + indirect.
import { describe, expect, it } from 'vitest';
import { effectsRows, fitRows, lmTestRows } from '../addin/functions/model-logic.js';
import { neighbourRowsFromPoints } from '../addin/functions/neighbour-logic.js';
import type { Grid } from '../addin/functions/logic.js';
import { readBoundary, representativePoints } from '../src/geo/index.js';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { columbusData, readGolden } from './helpers/columbus.js';

const ROOT = join(import.meta.dirname, '..');
const golden = readGolden();

/** Relative agreement (absolute below 1). */
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
  const nbs = golden.weights.neighbours as number[][];
  // binary links: the functions rescale each area's weights to sum to 1 by default
  const links: Grid = [['origin', 'neighbour', 'weight']];
  nbs.forEach((nb, i) => nb.forEach((j) => links.push([names[i], names[j], 1])));
  const matrix: Grid = [['', ...names], ...names.map((n, i) => [n, ...names.map((_, j) => (nbs[i].includes(j) ? 1 : 0))])];
  return { names, ids, yr, xr, links, matrix };
}

const row = (rows: (string | number)[][], label: string | RegExp) => rows.find((r) => (typeof label === 'string' ? r[0] === label : label.test(String(r[0]))))!;

describe('SPILL.FIT on Columbus, queen neighbours', () => {
  it('the lag model: coefficients, ρ, log-likelihood and AIC equal the reference', async () => {
    const r = await ranges();
    const rows = fitRows(r.yr, r.xr, r.ids, r.links, 'lag');
    expect(rows[0]).toEqual(['term', 'estimate', 'standard error', 'z', 'p']);
    expect(rows.map((x) => x[0])).toEqual(['term', 'constant', 'INC', 'HOVAL', 'ρ (spillover of the outcome)', 'areas', 'log-likelihood', 'AIC']);
    golden.lag.coefficients.forEach((c: { name: string; estimate: number; se: number; stat: number; p: number }, k: number) => {
      near(rows[1 + k][1], c.estimate);
      near(rows[1 + k][2], c.se, 1e-5);
      near(rows[1 + k][3], c.stat, 1e-5);
      near(rows[1 + k][4], c.p, 1e-5);
    });
    near(row(rows, /^ρ/)[1], golden.lag.rho);
    near(row(rows, /^ρ/)[2], golden.lag.rhoSe, 1e-5);
    expect(row(rows, 'areas')[1]).toBe(49);
    near(row(rows, 'log-likelihood')[1], golden.lag.logLik, 1e-8);
    near(row(rows, 'AIC')[1], golden.lag.aic, 1e-8);
    // every row as wide as the header, so the spill is a rectangle
    for (const x of rows) expect(x).toHaveLength(5);
  });

  it('the error model and the plain regression equal the reference too; the plain regression reports t', async () => {
    const r = await ranges();
    const err = fitRows(r.yr, r.xr, r.ids, r.links, 'error');
    near(row(err, /^λ/)[1], golden.error.lambda);
    near(row(err, /^λ/)[2], golden.error.lambdaSe, 1e-5);
    golden.error.coefficients.forEach((c: { estimate: number }, k: number) => near(err[1 + k][1], c.estimate));
    near(row(err, 'log-likelihood')[1], golden.error.logLik, 1e-8);
    const ols = fitRows(r.yr, r.xr, r.ids, r.links, 'OLS');
    expect(ols[0][3]).toBe('t');
    golden.ols.coefficients.forEach((c: { estimate: number; se: number; stat: number }, k: number) => {
      near(ols[1 + k][1], c.estimate, 1e-9);
      near(ols[1 + k][2], c.se, 1e-9);
      near(ols[1 + k][3], c.stat, 1e-9);
    });
    near(row(ols, 'AIC')[1], golden.ols.aic, 1e-9);
    expect(ols.some((x) => /^ρ|^λ/.test(String(x[0])))).toBe(false);
  });

  it('an n × n matrix headed by the IDs gives the same table as the list of links', async () => {
    const r = await ranges();
    const a = fitRows(r.yr, r.xr, r.ids, r.links, 'lag');
    const b = fitRows(r.yr, r.xr, r.ids, r.matrix, 'lag');
    a.forEach((x, i) => x.forEach((v, j) => (typeof v === 'number' ? expect(b[i][j] as number).toBeCloseTo(v, 9) : expect(b[i][j]).toBe(v))));
  });

  it('whole columns with blank rows at the end give the same table', async () => {
    const r = await ranges();
    const pad = (g: Grid, width: number) => [...g, ...Array.from({ length: 500 }, () => Array.from({ length: width }, () => null))];
    const a = fitRows(r.yr, r.xr, r.ids, r.links, 'error');
    expect(fitRows(pad(r.yr, 1), pad(r.xr, 2), pad(r.ids, 1), pad(r.links, 3), 'error')).toEqual(a);
  });
});

describe('SPILL.FIT with 4 nearest neighbours built by SPILL.NEIGHBOURS', () => {
  it('equals the reference’s 4-nearest lag model', async () => {
    const layer = await readBoundary(['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(ROOT, 'test/fixtures/columbus', name))) })));
    const pts = representativePoints(layer.areas.map((a) => a.geometry!));
    const r = await ranges();
    const nb = neighbourRowsFromPoints(r.ids, [['x'], ...Array.from(pts.x, (v) => [v])], [['y'], ...Array.from(pts.y, (v) => [v])], 'nearest', 4);
    const rows = fitRows(r.yr, r.xr, r.ids, nb, 'lag');
    near(row(rows, /^ρ/)[1], golden.knn4.lag.rho);
    near(row(rows, 'log-likelihood')[1], golden.knn4.lag.logLik, 1e-8);
  });
});

describe('SPILL.EFFECTS and SPILL.LMTESTS on Columbus', () => {
  it('direct, indirect and total effects equal the reference; total = direct + indirect; repeatable with a seed', async () => {
    const r = await ranges();
    const rows = effectsRows(r.yr, r.xr, r.ids, r.links, 'lag', 'draws=200, seed=3');
    expect(rows[0]).toEqual(['term', 'direct', 'direct SE', 'direct p', 'indirect', 'indirect SE', 'indirect p', 'total', 'total SE', 'total p']);
    for (const g of golden.impacts as { name: string; direct: number; indirect: number; total: number }[]) {
      const e = row(rows, g.name);
      near(e[1], g.direct);
      near(e[4], g.indirect);
      near(e[7], g.total);
      expect(e[7] as number).toBeCloseTo((e[1] as number) + (e[4] as number), 12);
      for (const k of [2, 5, 8]) expect(e[k] as number).toBeGreaterThan(0);
    }
    expect(row(rows, 'standard errors from')[1]).toBe('200 simulated draws, seed 3');
    expect(effectsRows(r.yr, r.xr, r.ids, r.links, 'lag', 'draws=200, seed=3')).toEqual(rows);
  });

  it('the Lagrange-multiplier tests and Moran’s I of the residuals equal the reference, with the suggestion', async () => {
    const r = await ranges();
    const rows = lmTestRows(r.yr, r.xr, r.ids, r.links);
    near(row(rows, "Moran's I of the residuals")[1], golden.ols.moran.I, 1e-9);
    near(row(rows, "Moran's I of the residuals")[3], golden.ols.moran.p, 1e-7);
    const lm = golden.ols.lm;
    for (const [label, g] of [['Lagrange multiplier: error', lm.error], ['Lagrange multiplier: lag', lm.lag], ['robust Lagrange multiplier: error', lm.robustError],
      ['robust Lagrange multiplier: lag', lm.robustLag], ['Lagrange multiplier: lag and error together', lm.joint]] as const) {
      near(row(rows, label)[1], g.stat, 1e-8);
      expect(row(rows, label)[2]).toBe(g.df);
      near(row(rows, label)[3], g.p, 1e-7);
    }
    // both LM tests are significant at 5% (p 0.003 and 0.023), neither robust form is (0.053, 0.83):
    // the decision rule (src/models/recommend.ts) then follows the larger robust statistic, the lag's
    expect(String(row(rows, 'suggestion')[1])).toMatch(/lag/);
  });
});

describe('bad input becomes a message that names the cell or the choice', () => {
  it('a blank explanatory cell, an unknown model, a model without effects, an unknown option', async () => {
    const r = await ranges();
    const holed = r.xr.map((x) => [...x]);
    holed[7][1] = null;
    expect(() => fitRows(r.yr, holed, r.ids, r.links)).toThrow(/Row 8, column 2 \(HOVAL\) of the explanatory range is empty/);
    // the registry's keys, the wider family among them (durbin is one of them now)
    expect(() => fitRows(r.yr, r.xr, r.ids, r.links, 'hexagon')).toThrow(/model "hexagon" is not one Spillway fits; choose from "ols", "lag", "error", "slx", "durbin"/);
    expect(() => effectsRows(r.yr, r.xr, r.ids, r.links, 'error')).toThrow(/no separate direct and indirect effects/);
    expect(() => fitRows(r.yr, r.xr, r.ids, r.links, 'lag', 'robustly')).toThrow(/option "robustly" is not one this function knows/);
    const constant = r.xr.map((x, i) => (i === 0 ? x : [x[0], 5]));
    expect(() => fitRows(r.yr, constant, r.ids, r.links)).toThrow(/HOVAL has the same value \(5\) for every area/);
    expect(() => fitRows(r.yr.slice(0, 5), r.xr.slice(0, 5), r.ids.slice(0, 5), r.links)).toThrow(/origin ID C1 is not|not one of the areas|needs at least/);
  });
});
