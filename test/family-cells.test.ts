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
});
