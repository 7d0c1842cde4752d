// The results workbook written two ways must match sheet for sheet (issue 16 §2): the sidebar's path
// (Office.js: report-grid.ts laid out by the adapter, here through the in-memory stand-in
// test/helpers/fake-excel.ts) and the command line's and browser page's path (exceljs, read back
// from the .xlsx bytes). Same report in, so the same sheet names, table headers and figures out.
// The data: the invented Vell Basin demo (sample-workbooks), all three models, local statistics
// and the neighbour-definition comparison, so every kind of sheet is written.
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runAnalysis } from '../src/pipeline/index.js';
import { buildReport, moranScatterData, type Cell, type Report } from '../src/report/index.js';
import { readWorkbook, writeResultsWorkbook, type ReadSheet } from '../src/workbook/index.js';
import { ExcelAdapter } from '../addin/excel/adapter.js';
import { sheetGrid } from '../addin/excel/report-grid.js';
import { FakeExcel } from './helpers/fake-excel.js';

const ROOT = join(import.meta.dirname, '..');
// The 8-byte PNG signature (PNG spec, section 5.2) stands in for a rendered picture in both paths.
const PNG_STUB = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

let report: Report;
let excelSheets: { name: string; values: Cell[][] }[];
let fileSheets: ReadSheet[];

/** The values of a stand-in sheet as rows of cells (null where empty), trailing empties dropped. */
function fakeValues(excel: FakeExcel, name: string): Cell[][] {
  const sheet = excel.sheet(name)!;
  const rows: Cell[][] = [];
  for (const [r, cells] of sheet.cells.rows) {
    cells.forEach((cell, c) => {
      if (!cell || cell.value === null || cell.value === '' || cell.value === undefined) return;
      (rows[r] ??= [])[c] = cell.value as Cell;
    });
  }
  return normalise(rows);
}

function normalise(rows: Cell[][]): Cell[][] {
  const out: Cell[][] = [];
  for (let r = 0; r < rows.length; r++) {
    const row = Array.from(rows[r] ?? [], (v) => (v === undefined || v === '' ? null : v));
    while (row.length && row[row.length - 1] === null) row.pop();
    out.push(row);
  }
  while (out.length && out[out.length - 1].length === 0) out.pop();
  return out;
}

beforeAll(async () => {
  const samples = join(ROOT, 'sample-workbooks');
  const result = await runAnalysis({
    boundary: [{ name: 'vell-basin-districts.geojson', bytes: new Uint8Array(readFileSync(join(samples, 'vell-basin-districts.geojson'))) }],
    data: { name: 'vell-basin.xlsx', bytes: new Uint8Array(readFileSync(join(samples, 'vell-basin.xlsx'))) },
    sheet: 'Districts', id: 'district_id', y: 'long_commute_pct', x: ['broadband_pct', 'rail_km', 'rent_index'],
    weights: { method: 'queen' }, transform: 'row', models: ['ols', 'lag', 'error'], compareWeights: 'suggested',
    local: { statistics: ['moran', 'gistar'], of: 'clinic_wait_days', permutations: 99 }, impactDraws: 100, permutations: 99,
  });
  report = buildReport(result, { renderPng: () => PNG_STUB });

  const excel = new FakeExcel();
  excel.addSheet('Districts', [['district_id'], ['VB-001']]);
  const d = moranScatterData(result.y, result.weights.edges);
  const names = await new ExcelAdapter(excel.run).writeReport({ report, scatter: { valueName: result.request.y, z: Array.from(d.z), lag: Array.from(d.lag), slope: d.slope } });
  excelSheets = names.map((name) => ({ name, values: fakeValues(excel, name) }));

  fileSheets = await readWorkbook(await writeResultsWorkbook(report));
}, 120_000);

describe('the Office.js path and the exceljs path write the same workbook', () => {
  it('the same sheets, in the same order', () => {
    expect(excelSheets.map((s) => s.name)).toEqual(fileSheets.map((s) => s.name));
    expect(fileSheets.map((s) => s.name)).toEqual(report.sheets.map((s) => s.name));
    expect(fileSheets.length).toBeGreaterThanOrEqual(9);
  });

  it('the same table headers and figures in the same cells on every sheet', () => {
    for (const sheet of excelSheets) {
      const file = fileSheets.find((s) => s.name === sheet.name)!;
      let values = sheet.values;
      const reportSheet = report.sheets.find((s) => s.name === sheet.name)!;
      if (reportSheet.role === 'overview') {
        // the sidebar also writes the Moran scatter's points to the right of the summary, for its native chart
        const width = sheetGrid(reportSheet).cols;
        values = normalise(values.map((r) => r.slice(0, width)));
      }
      const rows = normalise(file.rows);
      expect(values.length, sheet.name).toBe(rows.length);
      rows.forEach((row, r) => {
        expect(values[r], `${sheet.name}, row ${r + 1}`).toEqual(row);
      });
    }
  });

  it('the figures are numbers in both, not text (a model sheet checked cell by cell)', () => {
    const lag = fileSheets.find((s) => /lag/i.test(s.name))!;
    const fromExcel = excelSheets.find((s) => s.name === lag.name)!.values;
    const numbers = normalise(lag.rows).flatMap((row, r) => row.map((v, c) => ({ v, r, c }))).filter((x) => typeof x.v === 'number');
    expect(numbers.length).toBeGreaterThan(20);
    for (const { v, r, c } of numbers) expect(fromExcel[r][c]).toBe(v);
  });
});
