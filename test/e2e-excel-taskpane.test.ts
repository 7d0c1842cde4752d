/**
 * The Excel task pane in a real browser, with Office.js replaced by the in-memory Excel stand-in
 * (test/helpers/fake-excel.ts, bundled for the browser): the pane reads the active sheet, runs the
 * job in its worker, draws the maps to PNG, and writes the result sheets, pictures and chart through
 * the adapter; the cell functions register in the same runtime. The request for Office.js is
 * answered by the test (page.route), so nothing leaves the machine. At each step the pane is checked
 * against the WCAG 2.1 AA rules of axe-core (test/helpers/a11y.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build, type PreviewServer } from 'vite';
import type { Browser, Page } from 'playwright-core';
import ExcelJS from 'exceljs';
import { buildAndServe, chromiumPresent, closeBoth, launchChromium, ROOT } from './helpers/browser.js';
import { BOUNDARY_NAMESPACE } from '../addin/excel/boundary-part.js';
import { accessibilityProblems } from './helpers/a11y.js';

/* eslint-disable @typescript-eslint/no-explicit-any */
declare const window: any;
declare const document: any;
declare const sessionStorage: any;

const XLSX = join(ROOT, 'sample-workbooks/vell-basin.xlsx');
const GEOJSON = join(ROOT, 'sample-workbooks/vell-basin-districts.geojson');
const ready = chromiumPresent && existsSync(XLSX) && existsSync(GEOJSON);

let out: string;
let server: PreviewServer;
let origin: string;
let browser: Browser;
let page: Page;
const problems: string[] = [];

/** Office.js stand-in: Office.onReady, Excel.run over the fake workbook, CustomFunctions.associate. */
async function officeStandIn(rows: unknown[][]): Promise<string> {
  const entry = join(out, 'office-stand-in.ts');
  writeFileSync(entry, `
    import { FakeExcel } from ${JSON.stringify(join(ROOT, 'test/helpers/fake-excel.ts'))};
    const excel = new FakeExcel();
    excel.addSheet('Districts', ${JSON.stringify(rows)});
    const associated: string[] = [];
    const w = window as any;
    // what a saved workbook would bring back: document settings and custom XML parts
    const seed = JSON.parse(sessionStorage.getItem('seed') ?? 'null');
    if (seed) {
      for (const [k, v] of seed.settings) excel.settings.set(k, v);
      for (const xml of seed.parts) excel.newPart(xml);
    }
    w.__excel = excel;
    w.__associated = associated;
    w.Excel = { run: excel.run };
    w.Office = {
      onReady: (cb: (info: unknown) => void) => Promise.resolve().then(() => cb({ host: 'Excel', platform: 'PC' })),
      // ExcelApi 1.11 is there: the pane asks Excel to hold its batches during a cell edit
      context: { requirements: { isSetSupported: (name: string, version: string) => name === 'ExcelApi' && Number(version.split('.')[1]) <= 11 } },
    };
    w.CustomFunctions = {
      associate: (id: string) => { associated.push(id); },
      Error: class extends Error { constructor(readonly code: string, message?: string) { super(message); } },
      ErrorCode: { invalidValue: '#VALUE!', notAvailable: '#N/A' },
    };
  `);
  const result = await build({
    configFile: false, logLevel: 'warn',
    build: { write: false, minify: false, lib: { entry, formats: ['iife'], name: 'officeStandIn', fileName: 'office' } },
  });
  const output = Array.isArray(result) ? result[0] : result;
  return (output as { output: { code?: string }[] }).output[0].code!;
}

describe.skipIf(!ready)('the Excel task pane over a stand-in for Office.js', () => {
  beforeAll(async () => {
    out = mkdtempSync(join(tmpdir(), 'spillway-pane-'));
    ({ server, origin } = await buildAndServe(join(out, 'dist')));

    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(readFileSync(XLSX) as unknown as ArrayBuffer);
    const rows: unknown[][] = [];
    wb.getWorksheet('Districts')!.eachRow((row) => rows.push((row.values as unknown[]).slice(1)));
    const standIn = await officeStandIn(rows);

    browser = await launchChromium();
    const context = await browser.newContext({ viewport: { width: 340, height: 900 } });
    await context.route('https://appsforoffice.microsoft.com/**', (route) => route.fulfill({ status: 200, contentType: 'text/javascript', body: standIn }));
    await context.route((url) => !url.href.startsWith(origin) && !url.href.startsWith('https://appsforoffice.microsoft.com/'), (route) => route.abort());
    page = await context.newPage();
    page.on('console', (m) => { if (m.type() === 'error') problems.push(m.text()); });
    page.on('pageerror', (e) => problems.push(e.message));
  });

  afterAll(async () => {
    await closeBoth(browser, server);
    if (out) rmSync(out, { recursive: true, force: true });
  });

  it('reads the active sheet, runs, and writes the report sheets, map pictures and a scatter chart into the workbook', async () => {
    await page.goto(`${origin}/taskpane/index.html`);
    await page.getByText(/Sheet "Districts": 150 rows/).waitFor();
    expect(await accessibilityProblems(page), 'the sheet read').toBe('');
    expect(await page.inputValue('#y-column')).toBe(''); // the outcome is the analyst's to choose
    // every function the metadata lists is registered in the pane's runtime
    const listed = (JSON.parse(readFileSync(join(out, 'dist', 'functions.json'), 'utf8')) as { functions: { id: string }[] }).functions.map((f) => f.id);
    expect([...(await page.evaluate(() => window.__associated))].sort()).toEqual([...listed].sort());

    await page.setInputFiles('#boundary-file', GEOJSON);
    await page.getByText(/150 matched to rows by district_id/).waitFor();
    await page.selectOption('#y-column', 'long_commute_pct');
    for (const x of ['broadband_pct', 'rail_km', 'rent_index']) await page.click(`#x-${x}`);
    expect(await accessibilityProblems(page), 'the areas matched and the model chosen').toBe('');
    await page.click('#run');
    await page.getByText(/The results are on \d+ new sheets/).waitFor({ timeout: 45_000 });
    await page.getByText(/Moran's I of the plain regression's residuals: -?\d\.\d{3} \(p/).waitFor();
    expect(await accessibilityProblems(page), 'the run done').toBe('');

    const state = await page.evaluate(() => {
      const x = window.__excel;
      const summary = x.sheet('Summary');
      return {
        names: x.sheetNames(),
        shapes: summary.shapes.map((s: any) => ({ name: s.name, png: String(s.base64).slice(0, 8) })),
        charts: summary.charts.map((c: any) => ({ type: c.type, rows: c.source.rows, trend: c.trendlines })),
        settings: [...x.settings.keys()],
        parts: x.xmlParts.length,
        active: x.active,
        delayed: x.runOptions.every((o: any) => o.delayForCellEdit === true),
      };
    });
    expect(state.names[0]).toBe('Districts');
    expect(state.names).toContain('Summary');
    expect(state.names).toContain('Neighbours');
    // PNG files start with the bytes 89 50 4E 47, "iVBORw0K" in base64 (PNG spec, section 5.2)
    expect(state.shapes.length).toBe(2);
    for (const s of state.shapes) expect(s.png).toBe('iVBORw0K');
    expect(state.charts).toEqual([{ type: 'XYScatter', rows: 151, trend: ['Linear'] }]);
    expect(state.settings).toEqual(['spillway.setup']);
    expect(state.parts).toBe(1); // the boundary file, kept in the workbook
    expect(state.active).toBe('Summary');
    expect(state.delayed).toBe(true); // every batch asked Excel to wait out a cell edit
    expect(problems).toEqual([]);
    if (process.env.SPILLWAY_SCREENSHOTS === '1') {
      await page.mouse.move(0, 0);
      await page.screenshot({ path: join(ROOT, 'docs/screenshots/excel-taskpane-sidebar.png'), fullPage: true });
    }
  }, 60_000);

  it('lists the cell functions with a worked example on the demo sheet', async () => {
    // reached and opened by keyboard: Tab from Run arrives at the guide's heading, Enter opens it
    await page.focus('#run');
    let reached = false;
    for (let i = 0; i < 40 && !reached; i++) {
      await page.keyboard.press('Tab');
      reached = await page.evaluate(() => document.activeElement?.matches('#functions-help summary') ?? false);
    }
    expect(reached).toBe(true);
    await page.keyboard.press('Enter');
    expect(await page.evaluate(() => document.querySelector('#functions-help').open)).toBe(true);
    await page.getByText(/=SPILL\.FIT\(C1:C151, D1:F151, A1:A151, K1#, "lag"\)/).waitFor();
    const listed = (JSON.parse(readFileSync(join(out, 'dist', 'functions.json'), 'utf8')) as { functions: { id: string }[] }).functions.length;
    expect(await page.locator('#functions-help .function-list li').count()).toBe(listed);
    expect(await accessibilityProblems(page), 'the cell functions guide open').toBe('');
    const shots = process.env.SPILLWAY_SCREENSHOTS === '1' ? join(ROOT, 'docs/screenshots') : out;
    await page.evaluate(() => document.activeElement?.blur());
    await page.locator('#functions-help').screenshot({ path: join(shots, 'excel-taskpane-cell-functions.png') });
    expect(problems).toEqual([]);
  });

  it('reopened, the pane finds the kept boundary file and the last setup in the workbook, and runs again without the file', async () => {
    await page.evaluate(() => {
      const x = window.__excel;
      sessionStorage.setItem('seed', JSON.stringify({ settings: [...x.settings.entries()], parts: x.xmlParts.map((p: any) => p.xml) }));
    });
    await page.reload();
    await page.getByText(/vell-basin-districts\.geojson \(kept in this workbook from an earlier run\)/).waitFor();
    await page.getByText(/150 matched to rows by district_id/).waitFor();
    for (const x of ['broadband_pct', 'rail_km', 'rent_index']) expect(await page.evaluate((id) => document.querySelector(id).checked, `#x-${x}`)).toBe(true);
    expect(await page.evaluate(() => document.querySelector('#model-lag').checked)).toBe(true);
    await page.click('#run');
    await page.getByText(/The results are on \d+ new sheets/).waitFor({ timeout: 45_000 });
    expect(problems).toEqual([]);
  }, 60_000);

  it('says plainly when the boundary file could not be kept in the workbook, after writing the results', async () => {
    await page.evaluate(() => sessionStorage.removeItem('seed'));
    await page.reload();
    await page.getByText(/Sheet "Districts": 150 rows/).waitFor();
    // Excel refuses to store the custom XML part
    await page.evaluate(() => { window.__excel.failWhen = (c: any) => c.kind === 'addXmlPart'; });
    await page.setInputFiles('#boundary-file', GEOJSON);
    await page.getByText(/150 matched to rows by district_id/).waitFor();
    await page.selectOption('#y-column', 'long_commute_pct');
    for (const x of ['broadband_pct', 'rail_km', 'rent_index']) await page.click(`#x-${x}`);
    await page.click('#run');
    await page.getByText(/The results are on \d+ new sheets/).waitFor({ timeout: 45_000 });
    await page.getByText(/The boundary file \(vell-basin-districts\.geojson\) was not kept in this workbook: Excel refused to store it/).waitFor();
    expect(await page.getByText(/Keep the file beside the workbook to run again/).count()).toBe(1);
    expect(await page.evaluate(() => window.__excel.xmlParts.length)).toBe(0);
    if (process.env.SPILLWAY_SHOT_DIR) await page.screenshot({ path: join(process.env.SPILLWAY_SHOT_DIR, 'boundary-not-kept.png'), fullPage: true });
    expect(problems).toEqual([]);
  }, 60_000);

  it('says plainly when the kept boundary file cannot be read at start-up, and the rest of the pane works', async () => {
    // a workbook whose kept boundary lost one of its two parts
    const damaged = `<boundaries xmlns="${BOUNDARY_NAMESPACE}" set="k1" part="1" parts="2"><file name="districts.shp" size="9" piece="1" pieces="2">AAAA</file></boundaries>`;
    await page.evaluate((xml) => sessionStorage.setItem('seed', JSON.stringify({ settings: [], parts: [xml] })), damaged);
    await page.reload();
    await page.getByText(/Sheet "Districts": 150 rows/).waitFor();
    const note = page.locator('#stored-boundary-note');
    await note.getByText(/The boundary file kept in this workbook is incomplete \(1 of 2 parts found\); open the original file again\. The table and the other settings work as before\./).waitFor();
    if (process.env.SPILLWAY_SHOT_DIR) await page.screenshot({ path: join(process.env.SPILLWAY_SHOT_DIR, 'kept-boundary-unreadable.png'), fullPage: true });
    expect(await accessibilityProblems(page), 'the kept boundary unreadable').toBe('');
    // opening the file again goes on as usual, and the note goes
    await page.setInputFiles('#boundary-file', GEOJSON);
    await page.getByText(/150 matched to rows by district_id/).waitFor();
    expect(await note.textContent()).toBe('');
    await page.evaluate(() => sessionStorage.removeItem('seed'));
    expect(problems).toEqual([]);
  }, 60_000);
});
