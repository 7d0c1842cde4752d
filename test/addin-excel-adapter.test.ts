// The Excel adapter over the in-memory stand-in (test/helpers/fake-excel.ts). The stand-in follows
// Office.js's documented proxy rules — values readable only after load() and sync(), writes queued
// until sync() (recalled from memory of Microsoft's Office.js documentation); the numbers written
// come from the Columbus data (Anselin 1988) and are checked against test/golden (numpy reference).
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runAnalysis, type AnalysisResult } from '../src/pipeline/index.js';
import { buildReport, moranScatterData, type Report } from '../src/report/index.js';
import { ExcelAdapter, SETUP_KEY } from '../addin/excel/adapter.js';
import { sheetGrid } from '../addin/excel/report-grid.js';
import { FakeExcel, FakeOfficeError } from './helpers/fake-excel.js';
import type { ScatterPoints } from '../addin/shared/types.js';

const ROOT = join(import.meta.dirname, '..');
const COLUMBUS = join(ROOT, 'test/fixtures/columbus');
// The 8-byte PNG signature (PNG spec, section 5.2) stands in for a rendered picture.
const PNG_STUB = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

let result: AnalysisResult;
let report: Report;
let scatter: ScatterPoints;

beforeAll(async () => {
  const boundary = ['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(COLUMBUS, name))) }));
  result = await runAnalysis({
    boundary, id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row', models: ['ols', 'lag'],
    impactDraws: 50, permutations: 49,
  });
  report = buildReport(result, { renderPng: () => PNG_STUB });
  const d = moranScatterData(result.y, result.weights.edges);
  scatter = { valueName: 'CRIME', z: Array.from(d.z), lag: Array.from(d.lag), slope: d.slope };
});

describe('the Excel stand-in keeps Office.js proxy semantics', () => {
  it('a value is readable only after load and sync; before, it throws PropertyNotLoaded as Office does', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data', [['a', 'b'], [1, 2]]);
    await excel.run(async (ctx) => {
      const range = ctx.workbook.worksheets.getActiveWorksheet().getRange('A1:B2');
      expect(() => range.values).toThrow(FakeOfficeError);
      range.load('values');
      expect(() => range.values).toThrow(/call the load method.*context\.sync/);
      await ctx.sync();
      expect(range.values).toEqual([['a', 'b'], [1, 2]]);
    });
  });

  it('writes wait for sync, and a 2-D array of the wrong size fails the sync', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data');
    await excel.run(async (ctx) => {
      const ws = ctx.workbook.worksheets.getActiveWorksheet();
      ws.getRange('A1').values = [[5]];
      expect(excel.cell('Data', 'A1')).toBeUndefined();
      await ctx.sync();
      expect(excel.cell('Data', 'A1')?.value).toBe(5);
      ws.getRange('A1:B1').values = [[1]];
      await expect(ctx.sync()).rejects.toThrow(/doesn't match the size/);
    });
  });
});

describe('reading the active sheet', () => {
  it('finds the header and rows of the used range wherever they start, keeping sheet row numbers', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Districts', [
      ['code', 'rate', 'note'],
      ['A1', 3.5, 'x'],
      [null, null, null],
      ['A2', 4, null],
    ], { row: 2, col: 1 });
    const t = await new ExcelAdapter(excel.run).readActiveTable();
    expect(t.sheet).toBe('Districts');
    expect(t.headerRow).toBe(3);
    expect(t.firstColumn).toBe(2);
    expect(t.headers).toEqual(['code', 'rate', 'note']);
    expect(t.rows).toEqual([['A1', 3.5, 'x'], ['A2', 4, null]]);
    expect(t.rowNumbers).toEqual([4, 6]);
  });

  it('prefers a table on the sheet over the used range', async () => {
    const excel = new FakeExcel();
    const s = excel.addSheet('Data', [['title'], [], ['id', 'v'], ['a', 1], ['b', 2]]);
    s.tables.push({ name: 'Areas', row: 2, col: 0, rows: 3, cols: 2 });
    const t = await new ExcelAdapter(excel.run).readActiveTable();
    expect(t.headers).toEqual(['id', 'v']);
    expect(t.rowNumbers).toEqual([4, 5]);
  });

  it('says so when the sheet is empty', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Empty');
    await expect(new ExcelAdapter(excel.run).readActiveTable()).rejects.toThrow(/"Empty" is empty/);
  });
});

describe('writing the report (Columbus data, Anselin 1988)', () => {
  it('adds one sheet per report sheet with one sync each, values and number formats from the report model', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data');
    excel.addSheet('Summary'); // taken: the report's Summary becomes "Summary (2)"
    const adapter = new ExcelAdapter(excel.run);
    const names = await adapter.writeReport({ report, scatter });
    expect(names).toHaveLength(report.sheets.length);
    expect(names[0]).toBe('Summary (2)');
    expect(excel.sheetNames()).toEqual(['Data', 'Summary', ...names]);
    // first run lists the sheets; then exactly one sync per written sheet
    const writes = excel.syncsPerRun.slice(1, 1 + names.length);
    expect(writes.every((n) => n === 1)).toBe(true);

    // the neighbour sheet holds every link: 236 queen links (test/golden, independent numpy reference)
    const nbIndex = report.sheets.findIndex((s) => s.role === 'neighbours');
    const nbName = names[nbIndex];
    const grid = sheetGrid(report.sheets[nbIndex]);
    const header = grid.values.findIndex((r) => r[0] === 'Area ID');
    expect(header).toBeGreaterThan(0);
    const links = grid.values.slice(header + 1).filter((r) => typeof r[2] === 'number');
    expect(links).toHaveLength(236);
    expect(excel.cellAt(nbName, header + 1, 0)?.value).toBe(String(links[0][0]));
    // IDs are written as text; weights with four decimals
    expect(excel.cellAt(nbName, header + 1, 0)?.format).toBe('@');
    expect(excel.cellAt(nbName, header + 1, 2)?.format).toBe('0.0000');
  });

  it('inserts the maps as pictures and the Moran scatter as a chart whose points are on the sheet', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data');
    const names = await new ExcelAdapter(excel.run).writeReport({ report, scatter });
    const summary = excel.sheet(names[0])!;
    const maps = report.sheets[0].images!.filter((im) => im.name !== 'Moran scatter plot');
    expect(summary.shapes).toHaveLength(maps.length);
    expect(summary.shapes[0].altTextDescription).toBe(maps[0].alt);
    expect(summary.charts).toHaveLength(1);
    const chart = summary.charts[0];
    expect(chart.type).toBe('XYScatter');
    expect(chart.source.rows).toBe(scatter.z.length + 1);
    expect(chart.trendlines).toEqual(['Linear']);
    // With row-standardised weights the scatter's least-squares slope is Moran's I (Anselin 1996).
    expect(scatter.slope).toBeCloseTo(result.moranY.I, 10);
    const firstPoint = summary.cells.get(chart.source.row + 1, chart.source.col);
    expect(firstPoint?.value).toBeCloseTo(scatter.z[0], 12);
  });

  it('removes every sheet it added when a write fails, and names the sheet where it stopped', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data', [['keep me']]);
    const third = report.sheets[2].name;
    excel.failWhen = (c) => c.kind === 'values' && c.sheet === third;
    const adapter = new ExcelAdapter(excel.run);
    await expect(adapter.writeReport({ report, scatter })).rejects.toThrow(new RegExp(`stopped at the sheet "${third}".*removed again`));
    expect(excel.sheetNames()).toEqual(['Data']);
    expect(excel.cell('Data', 'A1')?.value).toBe('keep me');
  });

  it('also rolls back when the picture insert fails on the first sheet', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data');
    excel.failWhen = (c) => c.kind === 'addImage';
    await expect(new ExcelAdapter(excel.run).writeReport({ report, scatter })).rejects.toThrow(/Summary/);
    expect(excel.sheetNames()).toEqual(['Data']);
  });
});

describe('what the workbook keeps for the next run', () => {
  it('saves the setup in the document settings and reads it back', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data');
    const adapter = new ExcelAdapter(excel.run);
    expect(await adapter.loadSetup()).toBeNull();
    await adapter.saveSetup({ version: 1, id: 'POLYID', y: 'CRIME', x: ['INC'], weights: { method: 'knn', k: 4 } });
    expect(typeof excel.settings.get(SETUP_KEY)).toBe('string');
    expect(await adapter.loadSetup()).toMatchObject({ id: 'POLYID', weights: { method: 'knn', k: 4 } });
  });

  it('stores the boundary files in one custom XML part, replaces it on the next store, and gives the same bytes back', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data');
    const adapter = new ExcelAdapter(excel.run);
    expect(await adapter.loadBoundary()).toBeNull();
    const shp = new Uint8Array(readFileSync(join(COLUMBUS, 'columbus.shp')));
    const dbf = new Uint8Array(readFileSync(join(COLUMBUS, 'columbus.dbf')));
    await adapter.storeBoundary([{ name: 'old & first.geojson', bytes: new Uint8Array([1, 2, 3]) }]);
    await adapter.storeBoundary([{ name: 'columbus.shp', bytes: shp }, { name: 'columbus.dbf', bytes: dbf }]);
    expect(excel.xmlParts).toHaveLength(1);
    const back = await adapter.loadBoundary();
    expect(back!.map((f) => f.name)).toEqual(['columbus.shp', 'columbus.dbf']);
    expect(Buffer.from(back![0].bytes).equals(Buffer.from(shp))).toBe(true);
    expect(Buffer.from(back![1].bytes).equals(Buffer.from(dbf))).toBe(true);
  });
});

describe('writing the Rates sheet through Office.js (North Carolina counties, test/fixtures/sids, r-cran-spdata CC0)', () => {
  it('writes the same blocks as the .xlsx writer, with the side-by-side maps as one picture, and withheld cells empty', async () => {
    const { parseRateRecipe } = await import('../src/pipeline/index.js');
    const { scatterPoints } = await import('../src/report/index.js');
    const sids = join(ROOT, 'test/fixtures/sids');
    const boundary = ['sids.shp', 'sids.shx', 'sids.dbf'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(sids, name))) }));
    const r = await runAnalysis({
      boundary, id: 'FIPS', y: 'sids', x: ['NWBIR74'], weights: { method: 'queen' }, transform: 'row', models: ['ols'], permutations: 0,
      rates: { recipes: [parseRateRecipe('sids=SID74/BIR74', 1000)], smoothing: 'global', withholdFlagged: true },
    });
    const rep = buildReport(r, { renderPng: () => PNG_STUB });
    const d = scatterPoints(r);
    const excel = new FakeExcel();
    excel.addSheet('Data');
    const names = await new ExcelAdapter(excel.run).writeReport({ report: rep, scatter: { valueName: 'sids', z: Array.from(d.z), lag: Array.from(d.lag), slope: d.slope } });
    const index = rep.sheets.findIndex((s) => s.role === 'rates');
    expect(names[index]).toBe('Rates');
    const written = excel.sheet('Rates')!;
    expect(written.shapes).toHaveLength(1);
    expect(written.shapes[0].altTextDescription).toMatch(/raw rate and global empirical-Bayes rate, side by side/);
    const grid = sheetGrid(rep.sheets[index]);
    const header = grid.values.findIndex((row) => row[0] === 'Area ID');
    const flagged = r.rates![0].areas.map((a) => a.flagged);
    flagged.forEach((f, i) => {
      const raw = written.cells.get(header + 1 + i, 4)?.value;
      // empty: never written, or only formatted (Office reads a formatted empty cell as '')
      if (f) expect(raw ?? '').toBe('');
      else expect(raw).toBeCloseTo(r.rates![0].areas[i].rate, 12);
    });
    // the withheld areas' points are not on the chart's data either
    expect(d.z.length).toBe(flagged.filter((f) => !f).length);
  });
});

describe('the page set-up through Office.js (ExcelApi 1.9 pageLayout), as the .xlsx writer has it', () => {
  /** The printed set-up of every sheet of a results workbook written by the .xlsx writer, read from the file's own XML. */
  async function filePageSetups(): Promise<Map<string, { orientation: string; fitToWidth: string; fitToHeight: string; margins: Record<string, number>; titles?: string; breaksBefore: number[] }>> {
    const { writeResultsWorkbook } = await import('../src/workbook/index.js');
    const { unzipSync, strFromU8 } = await import('fflate');
    const files = unzipSync(await writeResultsWorkbook(report));
    const book = strFromU8(files['xl/workbook.xml']);
    const rels = strFromU8(files['xl/_rels/workbook.xml.rels']);
    const attr = (xml: string, name: string) => new RegExp(`\\b${name}="([^"]*)"`).exec(xml)?.[1];
    const out = new Map<string, { orientation: string; fitToWidth: string; fitToHeight: string; margins: Record<string, number>; titles?: string; breaksBefore: number[] }>();
    const sheets = [...book.matchAll(/<sheet\b[^>]*>/g)].map((m) => m[0]);
    sheets.forEach((tag, i) => {
      const name = attr(tag, 'name')!.replace(/&amp;/g, '&');
      const rid = attr(tag, 'r:id')!;
      const target = new RegExp(`<Relationship[^>]*Id="${rid}"[^>]*Target="([^"]+)"`).exec(rels)?.[1] ?? new RegExp(`<Relationship[^>]*Target="([^"]+)"[^>]*Id="${rid}"`).exec(rels)![1];
      const xml = strFromU8(files[`xl/${target.replace(/^\/?xl\//, '')}`]);
      const setup = /<pageSetup\b[^>]*>/.exec(xml)![0];
      const marginTag = /<pageMargins\b[^>]*>/.exec(xml)![0];
      const margins = Object.fromEntries(['left', 'right', 'top', 'bottom', 'header', 'footer'].map((k) => [k, Number(attr(marginTag, k))]));
      // a defined name _xlnm.Print_Titles scoped to this sheet (localSheetId is its 0-based position)
      const titles = new RegExp(`<definedName[^>]*name="_xlnm.Print_Titles"[^>]*localSheetId="${i}"[^>]*>([^<]*)<`).exec(book)?.[1]
        ?? new RegExp(`<definedName[^>]*localSheetId="${i}"[^>]*name="_xlnm.Print_Titles"[^>]*>([^<]*)<`).exec(book)?.[1];
      // <brk id="r"/> breaks after row r (ECMA-376 Part 1, 18.3.1.3), so before row r + 1
      const breaksBefore = [...(/<rowBreaks\b[\s\S]*?<\/rowBreaks>/.exec(xml)?.[0] ?? '').matchAll(/<brk\b[^>]*\bid="(\d+)"/g)].map((m) => Number(m[1]) + 1);
      out.set(name, { orientation: attr(setup, 'orientation') ?? 'portrait', fitToWidth: attr(setup, 'fitToWidth') ?? '1', fitToHeight: attr(setup, 'fitToHeight') ?? '1', margins, titles: titles?.replace(/^.*!/, ''), breaksBefore });
    });
    return out;
  }

  it('gives every results sheet the plan’s orientation, fit, margins, repeated headings and page breaks, the same as the .xlsx file', async () => {
    const { planSheet, PAGE_MARGINS } = await import('../src/report/layout.js');
    const excel = new FakeExcel();
    excel.addSheet('Data');
    const names = await new ExcelAdapter(excel.run, { isSetSupported: excel.isSetSupported }).writeReport({ report, scatter });
    const file = await filePageSetups();
    let titled = 0, broken = 0;
    report.sheets.forEach((sheet, i) => {
      const plan = planSheet(sheet).page;
      const page = excel.sheet(names[i])!.page;
      expect(page.orientation, sheet.name).toBe(plan.orientation === 'landscape' ? 'Landscape' : 'Portrait');
      expect(page.zoom, sheet.name).toEqual({ horizontalFitToPages: 1, verticalFitToPages: 0 });
      expect(page.margins, sheet.name).toEqual({ unit: 'Inches', ...PAGE_MARGINS });
      expect(page.printTitleRows, sheet.name).toBe(plan.titleRows ? `$${plan.titleRows.first}:$${plan.titleRows.last}` : undefined);
      expect(page.breaksBefore, sheet.name).toEqual(plan.breaksBefore.filter((r) => r > 1));
      // the .xlsx writer's file says the same
      const f = file.get(sheet.name)!;
      expect(f, sheet.name).toBeDefined();
      expect(f.orientation, sheet.name).toBe(plan.orientation);
      expect([f.fitToWidth, f.fitToHeight], sheet.name).toEqual(['1', '0']);
      expect(f.margins, sheet.name).toEqual({ ...PAGE_MARGINS });
      expect(f.titles, sheet.name).toBe(page.printTitleRows);
      expect(f.breaksBefore, sheet.name).toEqual(page.breaksBefore);
      if (plan.titleRows) titled++;
      if (page.breaksBefore.length) broken++;
    });
    // the check reaches both kinds: repeated headings (the 49-row By area table) and breaks kept before pictures
    expect(titled).toBeGreaterThan(0);
    expect(broken).toBeGreaterThan(0);
  });

  it('leaves the page set-up to Excel, quietly, where ExcelApi 1.9 is missing; the sheets are written the same', async () => {
    const excel = new FakeExcel();
    excel.excelApi = 8;
    excel.addSheet('Data');
    const names = await new ExcelAdapter(excel.run, { isSetSupported: excel.isSetSupported }).writeReport({ report, scatter });
    expect(names).toHaveLength(report.sheets.length);
    for (const n of names) expect(excel.sheet(n)!.page).toEqual({ breaksBefore: [] });
    // the stand-in has no page set-up at 1.8: asking for it there would have failed the write
    await expect(excel.run(async (ctx) => ctx.workbook.worksheets.getItemOrNullObject(names[0]).pageLayout)).rejects.toThrow(/ExcelApi 1\.9/);
  });
});
