// The join's options and messages from the command line, on invented areas (a 4 × 4 grid of unit
// squares whose IDs, names and values are written here, so every expected match is known by
// construction): IDs that differ only by leading zeros refuse by default and name the option that
// matches them; with it they match and the run records it; the label column travels into the JSON
// and the workbook; a near column name is suggested.
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readWorkbook } from '../src/workbook/index.js';
import { readFileSync } from 'node:fs';
import { runCli, STACK_LINE } from './helpers/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'spillway-join-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const side = 4;
const names = ['Alder', 'Birch', 'Cedar', 'Dunmore', 'Elm Row', 'Fenwick', 'Gorse', 'Hollin', 'Ivybank', 'Juniper', 'Kestle', 'Larch', 'Mossend', 'Nethers', 'Oakfold', 'Pinecroft'];
const features = Array.from({ length: side * side }, (_, i) => {
  const x = i % side, y = Math.floor(i / side);
  return { type: 'Feature', properties: { code: String(i + 1).padStart(3, '0') }, geometry: { type: 'Polygon', coordinates: [[[x, y], [x + 1, y], [x + 1, y + 1], [x, y + 1], [x, y]]] } };
});
writeFileSync(join(dir, 'areas.geojson'), JSON.stringify({ type: 'FeatureCollection', features }));
// the table writes the codes as plain numbers: 1 for "001"
const rows = names.map((n, i) => `${i + 1},${n},${(10 + ((i * 7) % 5) + (i % side) * 0.8).toFixed(2)},${(3 + Math.cos(i)).toFixed(3)}`);
writeFileSync(join(dir, 'table.csv'), ['code,name,rate,income', ...rows].join('\n'));

const base = ['fit', '--boundary', join(dir, 'areas.geojson'), '--data', join(dir, 'table.csv'), '--id', 'code', '--y', 'rate', '--x', 'income',
  '--coordinates', 'projected', '--weights', 'rook', '--models', 'ols,lag', '--draws', '20', '--permutations', '0'];

describe('joins and messages on the command line', () => {
  it('refuses IDs differing only by leading zeros, naming --ids-ignore-leading-zeros', () => {
    const r = runCli(base);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/1 vs 001/);
    expect(r.stderr).toMatch(/--ids-ignore-leading-zeros/);
    expect(r.stderr).not.toMatch(STACK_LINE);
  });

  it('with the option, matches them, records it in the JSON and the run record, and carries the label column', () => {
    const out = join(dir, 'results.xlsx');
    const r = runCli([...base, '--ids-ignore-leading-zeros', '--label', 'name', '--local', 'moran', '--json', '--per-area', '--out', out]);
    expect(r.stderr.replace(/spillway: note: .*\n/g, '')).toBe('');
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.n).toBe(16);
    expect(json.question).toMatchObject({ id: 'code', idsIgnoreLeadingZeros: true, label: 'name' });
    expect(json.warnings.join(' ')).toMatch(/16 ID\(s\) were matched ignoring leading zeros, as asked .*1 with 001/);
    expect(json.areas[4]).toMatchObject({ id: '5', label: 'Elm Row', row: 6 });
    expect(json.local.moran.areas[15]).toMatchObject({ id: '16', label: 'Pinecroft' });
    return readWorkbook(new Uint8Array(readFileSync(out))).then((sheets) => {
      const record = sheets.find((s) => s.name === 'How this was made')!;
      expect(record.rows.find((row) => row[0] === 'IDs matched ignoring leading zeros')?.[1]).toMatch(/^yes/);
      expect(record.rows.find((row) => row[0] === 'Label column')?.[1]).toBe('name');
      const byArea = sheets.find((s) => s.name === 'By area')!;
      const header = byArea.rows.findIndex((row) => row[0] === 'Area ID');
      expect(byArea.rows[header].slice(0, 3)).toEqual(['Area ID', 'name', 'Table row']);
      expect(byArea.rows[header + 1].slice(0, 3)).toEqual(['1', 'Alder', 2]);
      const local = sheets.find((s) => s.name === 'Local patterns')!;
      expect(local.rows.some((row) => row[0] === '16' && row[1] === 'Pinecroft')).toBe(true);
    });
  });

  it('suggests the near column name for the ID, the label and the model columns', () => {
    expect(runCli([...base.map((a) => (a === 'code' ? 'Code' : a)), '--ids-ignore-leading-zeros']).stderr)
      .toMatch(/table\.csv has no column "Code" to join by; did you mean "code"\?/);
    expect(runCli([...base, '--ids-ignore-leading-zeros', '--label', 'Name']).stderr).toMatch(/There is no column "Name" in table\.csv .*did you mean "name"\? Its columns are "code", "name", "rate", "income"\./);
    expect(runCli([...base.map((a) => (a === 'income' ? 'incme' : a)), '--ids-ignore-leading-zeros']).stderr).toMatch(/no column "incme" .*did you mean "income"\?/);
  });

  it('calls a text column "not numeric"', () => {
    const r = runCli([...base.map((a) => (a === 'income' ? 'name' : a)), '--ids-ignore-leading-zeros', '--drop-missing']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/Column "name" is not numeric: it holds text in every row \(for example row 2 \("Alder"\)\)/);
  });
});
