// The written workbook reads on screen and prints on paper, checked on the file itself (read back with
// exceljs, a general-purpose library) for the demo run, the Columbus data (Anselin 1988) and a run
// with a label column: every text cell longer than its column (or its merged cells) wraps, so no
// sheet relies on shrinking to fit; every results sheet has a page set-up (one page wide, an
// orientation, the headings of a long table repeated on each page); every table row has as many
// cells as its header; pictures do not straddle a page break the sheet sets.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { unzipSync } from 'fflate';
import { runAnalysis, type AnalysisResult } from '../src/pipeline/index.js';
import { buildReport, LONG_TABLE_ROWS, type Report } from '../src/report/index.js';
import { renderPng } from '../src/report/render-png.js';
import { writeResultsWorkbook } from '../src/workbook/index.js';
import { ROOT } from './helpers/cli.js';

const sample = (name: string) => ({ name, bytes: new Uint8Array(readFileSync(join(ROOT, 'sample-workbooks', name))) });
const columbus = ['columbus.shp', 'columbus.dbf', 'columbus.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(ROOT, 'test/fixtures/columbus', name))) }));

function colIndex(letters: string): number {
  let n = 0;
  for (const ch of letters) n = n * 26 + ch.charCodeAt(0) - 64;
  return n;
}

/** Column widths the sheet sets (Excel's default 8.43 characters where it sets none). */
function widthOf(ws: ExcelJS.Worksheet, col: number): number {
  return ws.getColumn(col).width ?? 8.43;
}

async function check(result: AnalysisResult): Promise<{ report: Report; sheets: ExcelJS.Worksheet[]; breaks: Set<number>[] }> {
  const report = buildReport(result, { renderPng });
  const bytes = await writeResultsWorkbook(report);
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load(bytes as unknown as ArrayBuffer);
  // manual page breaks, read from each sheet's XML (a new workbook's sheets are sheet1.xml, sheet2.xml, ... in order)
  const parts = unzipSync(bytes);
  const breaks = report.sheets.map((_, k) => {
    const xml = new TextDecoder().decode(parts[`xl/worksheets/sheet${k + 1}.xml`]);
    return new Set([...xml.matchAll(/<brk id="(\d+)"/g)].map((m) => Number(m[1])));
  });
  const sheets = report.sheets.map((s) => wb.getWorksheet(s.name)!);
  report.sheets.forEach((sheet, k) => {
    const ws = sheets[k];
    expect(ws, sheet.name).toBeDefined();

    // every table row has as many cells as its header
    for (const b of sheet.blocks) if (b.kind === 'table') for (const row of b.rows) expect(row.length, `${sheet.name}: ${b.title}`).toBe(b.columns.length);

    // a page set-up on every results sheet
    const page = ws.pageSetup;
    expect(page.fitToPage, sheet.name).toBe(true);
    expect(page.fitToWidth, sheet.name).toBe(1);
    expect(page.fitToHeight, sheet.name).toBe(0);
    expect(['portrait', 'landscape'], sheet.name).toContain(page.orientation);
    const long = sheet.blocks.some((b) => b.kind === 'table' && b.rows.length > LONG_TABLE_ROWS);
    if (long) expect(page.printTitlesRow, sheet.name).toMatch(/^\d+:\d+$/);

    // every text cell longer than its column (or its merged cells) wraps
    const merged = new Map<string, number>();
    for (const range of (ws.model as { merges?: string[] }).merges ?? []) {
      const m = /^([A-Z]+)(\d+):([A-Z]+)(\d+)$/.exec(range)!;
      let width = 0;
      for (let c = colIndex(m[1]); c <= colIndex(m[3]); c++) width += widthOf(ws, c);
      merged.set(`${m[1]}${m[2]}`, width);
    }
    let checked = 0;
    ws.eachRow((row) => row.eachCell((cell) => {
      if (typeof cell.value !== 'string') return;
      if (cell.isMerged && cell.master.address !== cell.address) return;
      const width = merged.get(cell.address) ?? widthOf(ws, Number(cell.col));
      if (cell.value.length > width) {
        checked++;
        expect(cell.alignment?.wrapText, `${sheet.name}!${cell.address} (${cell.value.length} characters in ${width}): "${cell.value.slice(0, 40)}…"`).toBe(true);
      }
    }));
    if (sheet.blocks.some((b) => b.kind === 'paragraph')) expect(checked, sheet.name).toBeGreaterThan(0);
  });
  return { report, sheets, breaks };
}

describe('the written workbook reads on screen and prints on paper', () => {
  it('the demo run (districts, all three models, the other definitions, local patterns)', async () => {
    const r = await runAnalysis({
      boundary: [sample('vell-basin-districts.geojson')], data: sample('vell-basin.xlsx'), sheet: 'Districts', id: 'district_id', label: 'district_name',
      y: 'long_commute_pct', x: ['broadband_pct', 'rail_km', 'rent_index'], weights: { method: 'queen' }, transform: 'row', models: ['ols', 'lag', 'error'],
      compareWeights: 'suggested', local: { statistics: ['moran', 'gistar'], of: 'clinic_wait_days', permutations: 99 }, impactDraws: 100, permutations: 99,
    });
    const { report, breaks } = await check(r);
    // the label column sits beside the IDs on the per-area sheets
    const byArea = report.sheets.find((s) => s.role === 'areas')!;
    const table = byArea.blocks[0];
    expect(table.kind === 'table' && table.columns.slice(0, 3).map((c) => c.header)).toEqual(['Area ID', 'district_name', 'Table row']);
    expect(table.kind === 'table' && table.rows[0].slice(0, 2)).toEqual(['VB-001', 'Rothenbrook']);
    // pictures: each starts at a page break the sheet sets, or on the first page
    let pictures = 0;
    report.sheets.forEach((s, k) => {
      for (const im of s.images ?? []) {
        pictures++;
        expect(breaks[k].has(im.anchor.row - 2), `${s.name}: ${im.name}`).toBe(true);
      }
    });
    expect(pictures).toBe(5);
  });

  it('the Columbus neighbourhoods with an edge of every kind of sheet', async () => {
    const r = await runAnalysis({
      boundary: columbus, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
      models: ['ols', 'lag', 'error'], robust: true, compareWeights: [{ method: 'knn', k: 4 }], permutations: 99, impactDraws: 100,
    });
    await check(r);
  });
});
