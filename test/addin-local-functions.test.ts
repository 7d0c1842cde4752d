// The local-statistics cell functions (LOCALMORAN, GISTAR) on Columbus: the statistic and z against the
// independent numpy reference (test/golden/local.json, scripts/reference/local.py) with the queen links
// of test/golden/columbus.json (numpy reference, shared-vertex rule); the groups against the signs rule.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { giStarRows, localMoranRows } from '../addin/functions/local-logic.js';
import type { Grid } from '../addin/functions/logic.js';
import { columbusData, readGolden } from './helpers/columbus.js';

const local = JSON.parse(readFileSync(new URL('./golden/local.json', import.meta.url), 'utf8')).columbus;
const golden = readGolden();

async function ranges() {
  const { y } = await columbusData();
  const ids: Grid = [['ID'], ...Array.from(y, (_, i) => [`A${i + 1}`])];
  const values: Grid = [['CRIME'], ...Array.from(y, (v) => [v])];
  const links: Grid = [['origin', 'neighbour', 'weight']];
  (golden.weights.neighbours as number[][]).forEach((nb, i) => nb.forEach((j) => links.push([`A${i + 1}`, `A${j + 1}`, 1])));
  return { ids, values, links };
}

describe('LOCALMORAN and GISTAR cell functions on Columbus', () => {
  it('LOCALMORAN spills statistic, z, p and group per area; statistic and z match the reference to 1e-8', async () => {
    const { ids, values, links } = await ranges();
    const rows = localMoranRows(values, ids, links, { rowStandardise: true, permutations: 999, seed: 5 });
    expect(rows).toHaveLength(49);
    rows.forEach((r, i) => {
      expect(Math.abs((r[0] as number) - local.moran.value[i])).toBeLessThan(1e-8 * Math.max(1, Math.abs(local.moran.value[i])));
      expect(Math.abs((r[1] as number) - local.moran.z[i])).toBeLessThan(1e-8 * Math.max(1, Math.abs(local.moran.z[i])));
      expect(r[2] as number).toBeGreaterThan(0);
      expect(['high among high', 'low among low', 'high among low', 'low among high', 'not significant']).toContain(r[3]);
    });
  });

  it('GISTAR spills z, p and finding; z matches the reference to 1e-8', async () => {
    const { ids, values, links } = await ranges();
    const rows = giStarRows(values, ids, links, { permutations: 0 });
    rows.forEach((r, i) => {
      expect(Math.abs((r[0] as number) - local.gistar.z[i])).toBeLessThan(1e-8 * Math.max(1, Math.abs(local.gistar.z[i])));
      if (r[2] === 'cluster of high values') expect(r[0] as number).toBeGreaterThan(0);
      if (r[2] === 'cluster of low values') expect(r[0] as number).toBeLessThan(0);
    });
  });

  it('refuses a bad control or level with a plain message', async () => {
    const { ids, values, links } = await ranges();
    expect(() => localMoranRows(values, ids, links, { control: 'holm' })).toThrow(/"fdr", "bonferroni" or "none"/);
    expect(() => giStarRows(values, ids, links, { level: 2 })).toThrow(/between 0 and 1/);
  });
});
