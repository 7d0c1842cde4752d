/**
 * End to end in a real browser (Debian's Chromium driven by playwright-core): the no-install page
 * opens the Vell Basin workbook and district boundaries, runs the plain regression and every spatial model (the default) in its worker,
 * and downloads the result workbook, which is read back with exceljs.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { PreviewServer } from 'vite';
import type { Browser, Page } from 'playwright-core';
import ExcelJS from 'exceljs';
import { buildAndServe, chromiumPresent, closeBoth, launchChromium, ROOT } from './helpers/browser.js';
import { MODELS } from '../src/models/index.js';

// The page.evaluate callbacks run in the browser; this file is type-checked without the DOM library.
/* eslint-disable @typescript-eslint/no-explicit-any */
declare const document: any;
type HTMLElement = any;

const XLSX = join(ROOT, 'sample-workbooks/vell-basin.xlsx');
const GEOJSON = join(ROOT, 'sample-workbooks/vell-basin-districts.geojson');
const TRUTH = join(ROOT, 'sample-workbooks/vell-basin-truth.json');
const ready = chromiumPresent && existsSync(XLSX) && existsSync(GEOJSON);

let out: string;
let server: PreviewServer;
let browser: Browser;
let page: Page;
let origin: string;
const foreignRequests: string[] = [];
const problems: string[] = [];

describe.skipIf(!ready)('the browser page, end to end', () => {
  beforeAll(async () => {
    out = mkdtempSync(join(tmpdir(), 'spillway-e2e-'));
    ({ server, origin } = await buildAndServe(out));
    browser = await launchChromium();
    const context = await browser.newContext({ acceptDownloads: true, viewport: { width: 360, height: 900 } });
    page = await context.newPage();
    page.on('request', (r) => { if (!r.url().startsWith(origin) && !/^(blob|data):/.test(r.url())) foreignRequests.push(r.url()); });
    page.on('console', (m) => { if (m.type() === 'error') problems.push(m.text()); });
    page.on('pageerror', (e) => problems.push(e.message));
  });

  afterAll(async () => {
    await closeBoth(browser, server);
    if (out) rmSync(out, { recursive: true, force: true });
  });

  it('serves the page with a Content-Security-Policy header that keeps every request on this machine', async () => {
    const res = await fetch(`${origin}/page/index.html`);
    const csp = res.headers.get('content-security-policy') ?? '';
    expect(csp).toContain("connect-src 'self'");
    expect(csp).toContain("default-src 'self'");
    expect(csp).not.toContain('unsafe-eval');
  });

  it('opens the workbook and the boundaries, runs the models (all ticked by default), and downloads a workbook with the results', async () => {
    await page.goto(`${origin}/page/index.html`);
    await page.setInputFiles('#data-file', XLSX);
    await page.getByText(/150 rows/).waitFor();
    expect(await page.inputValue('#id-column')).toBe('district_id');

    await page.setInputFiles('#boundary-file', GEOJSON);
    await page.getByText(/150 matched to rows by district_id/).waitFor();
    await page.getByText('Every row has exactly one area.').waitFor();
    await page.getByText(/Neighbours per area/).waitFor();

    await page.selectOption('#y-column', 'long_commute_pct');
    for (const x of ['broadband_pct', 'rail_km', 'rent_index']) await page.click(`#x-${x}`);
    // the models offered are the engine's registry, every one ticked by default (the plain regression is always fitted)
    const offered = await page.evaluate(() => [...document.querySelectorAll('fieldset.models fluent-checkbox')].map((b: any) => [b.id, b.checked]));
    expect(offered).toEqual(MODELS.filter((m) => !m.baseline).map((m) => [`model-${m.key}`, true]));
    await page.click('#compare');
    await page.click('#local-on');
    await page.selectOption('#local-of', 'clinic_wait_days');
    // readable at narrow width: nothing forces sideways scrolling at 320 px
    await page.setViewportSize({ width: 320, height: 900 });
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(320);

    const download = page.waitForEvent('download', { timeout: 45_000 });
    await page.click('#run');
    const file = await download;
    const saved = join(out, 'result.xlsx');
    await file.saveAs(saved);
    await page.getByText(/new sheets after your own/).waitFor();
    expect(await page.locator('.local-maps img').count()).toBe(2); // the group map and the p-value map
    // Fluent buttons are form-associated custom elements: the browser applies :disabled to them
    expect(await page.evaluate(() => [document.querySelector('#run')!.matches(':disabled'), document.querySelector('#cancel')!.matches(':disabled')])).toEqual([false, true]);

    const shots = process.env.SPILLWAY_SCREENSHOTS === '1' ? join(ROOT, 'docs/screenshots') : out;
    mkdirSync(shots, { recursive: true });
    await page.setViewportSize({ width: 360, height: 900 });
    await page.mouse.move(0, 0);
    await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
    await page.screenshot({ path: join(shots, 'browser-page-sidebar.png'), fullPage: true });

    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(readFileSync(saved) as unknown as ArrayBuffer);
    const names = wb.worksheets.map((w) => w.name);
    expect(names.slice(0, 2)).toEqual(['Districts', 'About this data']); // the analyst's own sheets come first, unchanged
    expect(names).toContain('Summary');
    expect(names).toContain('Neighbours');
    expect(names).toContain('Neighbour definitions compared');
    expect(names).toContain('Local patterns');
    const lagSheet = wb.worksheets.find((w) => /lag/i.test(w.name));
    expect(lagSheet, names.join(', ')).toBeDefined();
    // ρ read from the lag sheet: the row whose label names ρ (rho)
    let rho = NaN;
    lagSheet!.eachRow((row) => {
      const label = String(row.getCell(1).value ?? '');
      const v = row.getCell(2).value;
      if (Number.isNaN(rho) && /ρ|rho/i.test(label) && typeof v === 'number') rho = v;
    });
    // The sample outcome was simulated with ρ = 0.5 (sample-workbooks/vell-basin-truth.json); one draw of
    // 150 areas lands near it, not on it.
    const truth = JSON.parse(readFileSync(TRUTH, 'utf8')) as { rho?: number; parameters?: { rho?: number } };
    const trueRho = truth.rho ?? truth.parameters?.rho ?? 0.5;
    expect(Math.abs(rho - trueRho), `ρ = ${rho}`).toBeLessThan(0.2);
    const summary = wb.getWorksheet('Summary')!;
    expect(summary.getImages().length).toBeGreaterThanOrEqual(2); // maps drawn to PNG in the browser
    const districts = wb.getWorksheet('Districts')!;
    expect(districts.getCell('A1').value).toBe('district_id');
  }, 60_000);

  it('the keyboard reaches every step: Tab from the top arrives at Run', async () => {
    await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
    await page.focus('#open-data');
    let reached = false;
    for (let i = 0; i < 80 && !reached; i++) {
      await page.keyboard.press('Tab');
      reached = await page.evaluate(() => document.activeElement?.id === 'run');
    }
    expect(reached).toBe(true);
  });

  it('Cancel stops a run in the worker and nothing is downloaded', async () => {
    let downloaded = false;
    const onDownload = () => { downloaded = true; };
    page.on('download', onDownload);
    // both clicks in one task: Run enables Cancel before it first waits for the engine
    await page.evaluate(() => { document.querySelector('#run').click(); document.querySelector('#cancel').click(); });
    await page.getByText('Stopped. Nothing was written.').waitFor();
    await page.waitForTimeout(300);
    page.off('download', onDownload);
    expect(downloaded).toBe(false);
  });

  it('shows a repeated ID inline with the rows it is on (a CSV where row 3 repeats row 2’s ID)', async () => {
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(readFileSync(XLSX) as unknown as ArrayBuffer);
    const ws = wb.getWorksheet('Districts')!;
    const lines: string[] = [];
    ws.eachRow((row, n) => {
      const cells = (row.values as unknown[]).slice(1).map((v) => String(v ?? ''));
      if (n === 3) cells[0] = lines[1].split(',')[0];
      lines.push(cells.map((c) => (/[",]/.test(c) ? `"${c.replace(/"/g, '""')}"` : c)).join(','));
    });
    const csv = join(out, 'districts-with-a-repeat.csv');
    writeFileSync(csv, lines.join('\n') + '\n');
    const repeated = lines[1].split(',')[0];
    await page.setInputFiles('#data-file', csv);
    await page.getByText(new RegExp(`IDs on more than one row: ${repeated} on rows 2, 3`)).waitFor();
    // the run refuses it too, with a message naming the rows
    await page.click('#run');
    await page.locator('fluent-message-bar[intent="error"]').filter({ hasText: /rows? 2.*3|2 and 3/ }).first().waitFor();
    const shots = process.env.SPILLWAY_SCREENSHOTS === '1' ? join(ROOT, 'docs/screenshots') : out;
    await page.locator('section[aria-labelledby="step-2-title"]').screenshot({ path: join(shots, 'browser-page-repeated-id.png') });
  });

  it('finds the IDs under another name in the boundary file and says which property it took', async () => {
    const renamed = join(out, 'districts-renamed.geojson');
    writeFileSync(renamed, readFileSync(GEOJSON, 'utf8').replaceAll('"district_id":', '"map_code":'));
    await page.setInputFiles('#data-file', XLSX);
    await page.getByText(/"Districts": 150 rows/).waitFor(); // not the CSV of the test before, which also has 150
    await page.setInputFiles('#boundary-file', renamed);
    await page.getByText(/150 matched to rows by district_id \(called map_code in the boundary file\)/).waitFor();
    expect(await page.inputValue('#boundary-id')).toBe('map_code');
    await page.getByText(/Chosen by itself: the property holding the most of district_id's IDs/).waitFor();
  });

  it('builds neighbours from coordinate columns (the Vell Basin villages, 5 nearest)', async () => {
    const villages = join(ROOT, 'sample-workbooks/vell-basin-villages.xlsx');
    await page.setInputFiles('#data-file', villages);
    await page.getByText(/120 rows/).waitFor();
    expect(await page.inputValue('#id-column')).toBe('village_id');
    await page.click('#use-points');
    await page.selectOption('#x-column', 'x_m');
    await page.selectOption('#y-column', 'y_m');
    await page.selectOption('#method', 'knn');
    await page.getByText(/120 matched to rows by village_id/).waitFor();
    await page.getByText(/fewest 5, average 5\.0, most 5/).waitFor();
  });

  it('says when the coordinates were guessed, lets them be stated, and offers the tie-inclusive k-nearest rule', async () => {
    // a 5 × 6 lattice of 1-unit squares from (10, 40) without a crs member: guessed projected by its shapes
    const features = [];
    const lines = ['code,v,u'];
    for (let r = 0; r < 5; r++) for (let c = 0; c < 6; c++) {
      const a = 10 + c, b = 40 + r;
      features.push({ type: 'Feature', properties: { code: `C${r}${c}` }, geometry: { type: 'Polygon', coordinates: [[[a, b], [a + 1, b], [a + 1, b + 1], [a, b + 1], [a, b]]] } });
      lines.push(`C${r}${c},${(r * 7 + c * 3) % 5 + r},${c}`);
    }
    const lattice = join(out, 'lattice.geojson');
    const table = join(out, 'lattice.csv');
    writeFileSync(lattice, JSON.stringify({ type: 'FeatureCollection', features }));
    writeFileSync(table, lines.join('\n') + '\n');
    await page.goto(`${origin}/page/index.html`);
    await page.setInputFiles('#data-file', table);
    await page.getByText(/30 rows/).waitFor();
    await page.selectOption('#id-column', 'code');
    await page.setInputFiles('#boundary-file', lattice);
    await page.getByText(/30 areas in the file \(projected coordinates, guessed: the file does not say\)/).waitFor();
    await page.getByText(/This is a guess/).first().waitFor();
    await page.selectOption('#coordinates', 'geographic');
    await page.getByText(/30 areas in the file \(longitude\/latitude\); 30 matched/).waitFor();
    await page.selectOption('#method', 'knn');
    await page.getByText(/had more areas tied at the k-th nearest distance/).waitFor();
    await page.click('#ties-include');
    await page.getByText(/every area tied at the k-th distance included/).waitFor();
    expect(await page.getByText(/had more areas tied .*lowest row were taken/).count()).toBe(0);
  });

  it('builds a rate from two columns, models its smoothed form, withholds the flagged districts and writes the Rates sheet', async () => {
    await page.goto(`${origin}/page/index.html`);
    await page.evaluate(() => (globalThis as any).localStorage.clear()); // no setup carried over from the runs above
    await page.reload();
    await page.setInputFiles('#data-file', XLSX);
    await page.getByText(/"Districts": 150 rows/).waitFor();
    await page.setInputFiles('#boundary-file', GEOJSON);
    await page.getByText(/150 matched to rows by district_id/).waitFor();
    // a name the table already uses is refused inline
    await page.fill('#rate-name', 'population');
    await page.click('#rate-add');
    await page.getByText(/already has a column called population/).waitFor();
    await page.fill('#rate-name', 'falls_per_1000');
    await page.selectOption('#rate-events', 'fall_admissions');
    await page.selectOption('#rate-population', 'residents_70plus');
    await page.selectOption('#rate-per', '1000');
    await page.click('#rate-add');
    await page.getByText(/falls_per_1000 = fall_admissions per 1,000 residents_70plus/).waitFor();
    await page.selectOption('#rate-smoothing', 'local');
    await page.click('#rate-withhold');
    await page.selectOption('#y-column', 'falls_per_1000');
    await page.click('#x-broadband_pct');
    await page.click('#local-on');
    await page.selectOption('#local-of', 'rate:falls_per_1000');
    const shots = process.env.SPILLWAY_SCREENSHOTS === '1' ? join(ROOT, 'docs/screenshots') : out;
    await page.locator('#rate-builder').screenshot({ path: join(shots, 'browser-page-rate-builder.png') });

    const download = page.waitForEvent('download', { timeout: 45_000 });
    await page.click('#run');
    const saved = join(out, 'rates.xlsx');
    await (await download).saveAs(saved);
    await page.getByText(/new sheets after your own/).waitFor();
    expect(await page.locator('.rate-maps img').count()).toBe(1);

    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(readFileSync(saved) as unknown as ArrayBuffer);
    const rates = wb.getWorksheet('Rates')!;
    expect(rates, wb.worksheets.map((w) => w.name).join(', ')).toBeDefined();
    expect(rates.getImages().length).toBe(1);
    // the sample's eight very small new-build districts (vell-basin-truth.json) rest on few events: withheld
    const truth = JSON.parse(readFileSync(TRUTH, 'utf8')) as { rates_example: { small_districts: string[] } };
    const found = new Map<string, unknown[]>();
    rates.eachRow((row) => { const id = String(row.getCell(1).value ?? ''); if (/^VB-\d{3}$/.test(id)) found.set(id, (row.values as unknown[]).slice(1)); });
    expect(found.size).toBe(150);
    for (const id of truth.rates_example.small_districts) {
      const cells = found.get(id)!;
      expect(cells[8], id).toBe('yes, withheld');
      expect(cells[4] ?? null, id).toBeNull(); // the raw rate is blank
    }
    const record = wb.getWorksheet('How this was made')!;
    let withheld = '';
    record.eachRow((row) => { if (row.getCell(1).value === 'Flagged areas withheld in this workbook') withheld = String(row.getCell(2).value); });
    expect(withheld).toMatch(/^yes/);
  }, 60_000);

  it('sent nothing off this machine and logged no errors (CSP violations show as console errors)', () => {
    expect(foreignRequests).toEqual([]);
    expect(problems).toEqual([]);
  });
});
