/**
 * End to end in a real browser (Debian's Chromium driven by playwright-core): the no-install page
 * opens the Vell Basin workbook and district boundaries, runs the plain regression and every spatial
 * model (the default) in its worker, and downloads the result workbook, which is read back with
 * exceljs. At every step the page is checked against the WCAG 2.1 AA rules of axe-core
 * (test/helpers/a11y.ts), and one run of the whole job uses the keyboard only, reading each stop's
 * name from Chromium's accessibility tree.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { PreviewServer } from 'vite';
import type { Browser, Page } from 'playwright-core';
import ExcelJS from 'exceljs';
import { buildAndServe, chromiumPresent, closeBoth, launchChromium, ROOT } from './helpers/browser.js';
import { accessibilityProblems, focusedAsRead } from './helpers/a11y.js';
import { readBoundary, representativePoints } from '../src/geo/index.js';
import { suggestBandDistance } from '../src/weights/index.js';
import { MODELS } from '../src/models/index.js';

// The page.evaluate callbacks run in the browser; this file is type-checked without the DOM library.
/* eslint-disable @typescript-eslint/no-explicit-any */
declare const document: any;
declare const localStorage: any;
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
let shots: string;

/** axe-core's WCAG 2.1 AA findings and repeated ids at this step: none expected. */
async function expectAccessible(step: string): Promise<void> {
  expect(await accessibilityProblems(page), `accessibility at "${step}"`).toBe('');
}

/** A full-page picture of this step (docs/screenshots/ with SPILLWAY_SCREENSHOTS=1, else the temporary folder). */
async function picture(name: string): Promise<void> {
  await page.mouse.move(0, 0);
  await page.screenshot({ path: join(shots, `${name}.png`), fullPage: true });
}

const SIDS = ['sids.shp', 'sids.shx', 'sids.dbf'].map((f) => join(ROOT, 'test/fixtures/sids', f));

/**
 * The North Carolina counties (test/fixtures/sids, r-cran-spdata, CC0) as a CSV of the kind a county
 * analyst keeps: counts of births and of sudden infant deaths and the rate per 1000 built from them.
 * `blankAt` leaves one county's non-white births empty (a missing value the run refuses).
 */
async function countiesCsv(path: string, blankAt?: number): Promise<void> {
  const layer = await readBoundary(SIDS.map((f) => ({ name: f.split('/').pop()!, bytes: new Uint8Array(readFileSync(f)) })));
  const lines = ['FIPS,NAME,BIR74,SID74,NWBIR74,sids_per_1000'];
  layer.areas.forEach((a, i) => {
    const p = a.properties as Record<string, string | number>;
    const rate = ((1000 * Number(p.SID74)) / Number(p.BIR74)).toFixed(2);
    lines.push([p.FIPS, `"${p.NAME}"`, p.BIR74, p.SID74, i === blankAt ? '' : p.NWBIR74, rate].join(','));
  });
  writeFileSync(path, lines.join('\n') + '\n');
}

describe.skipIf(!ready)('the browser page, end to end', () => {
  beforeAll(async () => {
    out = mkdtempSync(join(tmpdir(), 'spillway-e2e-'));
    shots = process.env.SPILLWAY_SCREENSHOTS === '1' ? join(ROOT, 'docs/screenshots') : out;
    mkdirSync(shots, { recursive: true });
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

  it('opens the workbook and the boundaries, runs the models (the lag and error models ticked by default), and downloads a workbook with the results', async () => {
    await page.goto(`${origin}/page/index.html`);
    await expectAccessible('the empty page');
    await picture('browser-page-start');
    await page.setInputFiles('#data-file', XLSX);
    await page.getByText(/Sheet "Districts": 150 rows/).waitFor();
    expect(await page.inputValue('#id-column')).toBe('district_id');
    // the outcome is the analyst's to choose: nothing is picked for them
    expect(await page.inputValue('#y-column')).toBe('');
    await expectAccessible('the data opened');

    await page.setInputFiles('#boundary-file', GEOJSON);
    await page.getByText(/150 matched to rows by district_id/).waitFor();
    await page.getByText('Every row has exactly one area.').waitFor();
    await page.getByText(/Neighbours per area/).waitFor();
    await expectAccessible('the areas matched');

    await page.selectOption('#y-column', 'long_commute_pct');
    for (const x of ['broadband_pct', 'rail_km', 'rent_index']) await page.click(`#x-${x}`);
    // the models offered are the engine's registry, ticked by default but for the wider family, which is
    // fitted on request (the plain regression is always fitted)
    const offered = await page.evaluate(() => [...document.querySelectorAll('fieldset.models input[type=checkbox]')].map((b: any) => [b.id, b.checked]));
    expect(offered).toEqual(MODELS.filter((m) => !m.baseline).map((m) => [`model-${m.key}`, !m.onRequest]));
    await page.click('#compare');
    await page.click('#local-on');
    await page.selectOption('#local-of', 'clinic_wait_days');
    // the tick boxes carry their names to a screen reader (playwright's aria snapshot of the step)
    const modelTree = await page.locator('section[aria-labelledby="step-4-title"]').ariaSnapshot();
    for (const name of ['broadband_pct', 'rail_km', 'rent_index', 'Standard errors robust to unequal spread', 'Leave out rows with missing values']) {
      expect(modelTree).toMatch(new RegExp(`checkbox "${name}"`));
    }
    // each tick box sits on a line of its own: no two share a row
    const rows = await page.evaluate(() => [...document.querySelectorAll('.check')].map((el: HTMLElement) => Math.round(el.getBoundingClientRect().top)));
    expect(new Set(rows).size).toBe(rows.length);
    await expectAccessible('the model chosen');
    await picture('browser-page-ready');
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
    // Fluent buttons are form-associated custom elements: the browser applies :disabled to them; Cancel shows only during a run
    expect(await page.evaluate(() => [document.querySelector('#run')!.matches(':disabled'), document.querySelector('#cancel')!.hidden])).toEqual([false, true]);
    // the done message: the residuals' Moran's I with its p-value, and the suggested model named
    const done = await page.locator('fluent-message-bar[intent="success"]').first().innerText();
    expect(done).toMatch(/Moran's I of the plain regression's residuals: -?\d\.\d{3} \(p (<|=) 0\.\d+\)/);
    expect(done).toMatch(/Suggested by the Lagrange-multiplier tests: the spatial (lag|error) model|Suggested model: the plain regression|both spatial models/);
    await expectAccessible('the run done');

    // each small map opens at its drawn size: a modal dialog with the same picture, closed by Escape, focus back on its button
    await page.setViewportSize({ width: 1100, height: 900 });
    await page.click('#local-map-full-1');
    const large = page.locator('dialog.map-full[open] img');
    await large.waitFor();
    const drawn = await large.evaluate((img: any) => [img.getBoundingClientRect().width, document.querySelector('.local-maps img')!.getBoundingClientRect().width]);
    expect(drawn[0]).toBeGreaterThan(drawn[1] * 1.5);
    await expectAccessible('a map at full size');
    await page.locator('dialog.map-full').screenshot({ path: join(shots, 'browser-page-map-full.png') });
    await page.keyboard.press('Escape');
    await page.locator('dialog.map-full').waitFor({ state: 'detached' });
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('local-map-full-1');

    await page.setViewportSize({ width: 360, height: 900 });
    await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
    await picture('browser-page-sidebar');

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

  it('saves the areas with their results as GeoJSON ("Save areas with results")', async () => {
    const download = page.waitForEvent('download', { timeout: 20_000 });
    await page.click('#save-areas');
    const file = await download;
    expect(file.suggestedFilename()).toBe('vell-basin areas with results.geojson');
    const saved = join(out, 'areas.geojson');
    await file.saveAs(saved);
    const fc = JSON.parse(readFileSync(saved, 'utf8'));
    expect(fc.type).toBe('FeatureCollection');
    expect(fc.features).toHaveLength(150);
    expect(Object.keys(fc.features[0].properties)).toEqual(expect.arrayContaining(['district_id', 'long_commute_pct', 'plain_regression_residual', 'spatial_lag_fitted', 'local_moran_group']));
    await page.getByText(/150 areas with their fitted values/).waitFor();
    await expectAccessible('the areas saved');
  });

  it('the whole job by keyboard alone: every stop on the way has a name in the screen-reader tree', async () => {
    // as a first-time user: no setup kept from the run before
    await page.evaluate(() => localStorage.clear());
    await page.goto(`${origin}/page/index.html`);
    const stops: { role: string; name: string; id: string; tag: string }[] = [];
    /** Tab until the control with this id has the focus, noting each stop as a screen reader reads it. */
    const tabTo = async (id: string) => {
      for (let i = 0; i < 60; i++) {
        await page.keyboard.press('Tab');
        const at = await focusedAsRead(page);
        stops.push(at);
        if (at.id === id) return;
      }
      throw new Error(`Tab never reached #${id}; stops: ${stops.map((st) => st.id || st.tag).join(' ')}`);
    };
    // the file dialog answered by the test; listened for from the start, so the browser is told to hand
    // it over before the first key press (a listener added just before could lose that race)
    const files: string[] = [];
    const onChooser = (chooser: { setFiles(f: string): Promise<void> }) => { void chooser.setFiles(files.shift()!); };
    page.on('filechooser', onChooser);
    await page.waitForTimeout(100);
    const openWith = async (file: string) => {
      files.push(file);
      await page.keyboard.press('Enter');
    };
    await tabTo('open-data');
    await openWith(XLSX);
    await page.getByText(/Sheet "Districts": 150 rows/).waitFor();
    await tabTo('open-boundary');
    await openWith(GEOJSON);
    await page.getByText('Every row has exactly one area.').waitFor();
    await tabTo('y-column');
    // a closed select moves to the next option with the arrow key; the step redraws and keeps the focus
    for (let i = 0; i < 6 && (await page.inputValue('#y-column')) !== 'long_commute_pct'; i++) await page.keyboard.press('ArrowDown');
    expect(await page.inputValue('#y-column')).toBe('long_commute_pct');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('y-column');
    for (const x of ['broadband_pct', 'rail_km', 'rent_index']) {
      await tabTo(`x-${x}`);
      await page.keyboard.press('Space');
      expect(await page.evaluate((id) => document.querySelector(id).checked, `#x-${x}`)).toBe(true);
    }
    await picture('browser-page-keyboard');
    await tabTo('run');
    const download = page.waitForEvent('download', { timeout: 45_000 });
    await page.keyboard.press('Enter');
    await download;
    await page.getByText(/Moran's I of the plain regression's residuals/).waitFor();
    // back on Run when it is done (Cancel, which had the focus during the run, is gone)
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('run');
    // "Save areas with results" after the run is a stop of its own and answers Enter
    await tabTo('save-areas');
    const areasFile = page.waitForEvent('download', { timeout: 20_000 });
    await page.keyboard.press('Enter');
    expect((await areasFile).suggestedFilename()).toBe('vell-basin areas with results.geojson');
    const unnamed = stops.filter((st) => !st.name.trim());
    expect(unnamed, JSON.stringify(unnamed)).toEqual([]);
    // no hidden file input is a stop of its own
    expect(stops.filter((st) => st.tag === 'INPUT' && /file/.test(st.id))).toEqual([]);
    expect(stops.some((st) => st.role === 'checkbox' && st.name === 'rail_km')).toBe(true);
    expect(stops.some((st) => st.role === 'combobox' && st.name === 'Outcome to explain')).toBe(true);
    page.off('filechooser', onChooser);
  }, 60_000);

  it('offers to re-run with the suggested model when it was not fitted, and the re-run fits it', async () => {
    // the Vell Basin outcome was simulated from a lag process (sample-workbooks/vell-basin-truth.json): the tests point to the lag model
    await page.click('#model-lag'); // untick it
    expect(await page.evaluate(() => document.querySelector('#model-lag').checked)).toBe(false);
    await page.click('#run');
    await page.getByText(/Suggested by the Lagrange-multiplier tests: the spatial lag model; not fitted in this run\./).waitFor({ timeout: 45_000 });
    await expectAccessible('the suggested model not fitted');
    await page.locator('section[aria-labelledby="step-6-title"]').screenshot({ path: join(shots, 'browser-page-suggested-model.png') });
    await page.click('#run-suggested');
    await page.getByText(/Suggested by the Lagrange-multiplier tests: the spatial lag model; fitted in this run\./).waitFor({ timeout: 45_000 });
    await page.getByText(/Spatial lag model: ρ = 0\.\d{3}/).waitFor();
    expect(await page.evaluate(() => document.querySelector('#model-lag').checked)).toBe(true);
    expect(await page.locator('#run-suggested').count()).toBe(0);
  }, 100_000);

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
    // a CSV is a file, not a sheet
    await page.getByText(/^File "districts-with-a-repeat\.csv": 150 rows/).waitFor();
    const error = page.locator('section[aria-labelledby="step-2-title"] fluent-message-bar[intent="error"]');
    await error.filter({ hasText: new RegExp(`IDs appear more than once: ${repeated} \\(rows 2, 3\\)`) }).waitFor();
    // said once: in the red box, not again in a list above it
    const mentions = async () => (await page.locator('main').innerText()).split(repeated).length - 1;
    expect(await mentions()).toBe(1);
    expect(await error.count()).toBe(1);
    await expectAccessible('a join that fails');
    // the run refuses it too, pointing to step 2 instead of repeating the rows
    await page.click('#run');
    await page.locator('section[aria-labelledby="step-6-title"] fluent-message-bar[intent="error"]').filter({ hasText: /fix the problems shown in step 2/ }).waitFor();
    expect(await mentions()).toBe(1);
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
    // another boundary file: its ID property is chosen afresh, not the last file's map_code (which it lacks)
    const again = join(out, 'districts-renamed-again.geojson');
    writeFileSync(again, readFileSync(GEOJSON, 'utf8').replaceAll('"district_id":', '"zone_ref":'));
    await page.setInputFiles('#boundary-file', again);
    await page.getByText(/150 matched to rows by district_id \(called zone_ref in the boundary file\)/).waitFor();
    expect(await page.inputValue('#boundary-id')).toBe('zone_ref');
    // an optional names column beside the IDs, none by default, the ID column not offered
    expect(await page.inputValue('#label-column')).toBe('');
    const labels = await page.locator('#label-column option').allTextContents();
    expect(labels[0]).toBe('(none)');
    expect(labels).not.toContain('district_id');
    // two or more steps away: "every area up to K steps away" is a tick box of its own
    await page.selectOption('#method', 'queen');
    expect(await page.locator('#cumulative').count()).toBe(0);
    await page.fill('#order', '2');
    await page.locator('#order').dispatchEvent('change');
    await page.locator('label[for="cumulative"]').filter({ hasText: 'Every area up to 2 steps away (otherwise exactly 2 steps away)' }).waitFor();
    await expectAccessible('neighbours two steps away');
    await page.fill('#order', '1');
    await page.locator('#order').dispatchEvent('change');
    expect(await page.locator('#cumulative').count()).toBe(0);
  });

  it('builds neighbours from coordinate columns (the Vell Basin villages, 5 nearest)', async () => {
    const villages = join(ROOT, 'sample-workbooks/vell-basin-villages.xlsx');
    await page.setInputFiles('#data-file', villages);
    await page.getByText(/120 rows/).waitFor();
    expect(await page.inputValue('#id-column')).toBe('village_id');
    await page.click('#use-points');
    await page.selectOption('#across-column', 'x_m');
    await page.selectOption('#up-column', 'y_m');
    await page.selectOption('#method', 'knn');
    await page.getByText(/120 matched to rows by village_id/).waitFor();
    await page.getByText(/fewest 5, average 5\.0, most 5/).waitFor();
    // the coordinate columns have ids of their own: the outcome's label still points at the outcome
    expect(await page.evaluate(() => document.querySelector('label[for="y-column"]')?.textContent)).toBe('Outcome to explain');
    await expectAccessible('areas from coordinate columns');
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
    // a distance band starts from the data, in kilometres on longitude/latitude: the squares' centres are
    // 1° apart, each area's nearest is its east or west neighbour, and the longest such step is on the
    // southern row, at 40.5°: 2 × 6371.0088 km × asin(cos 40.5° × sin 0.5°) = 84.55 km (haversine, by hand),
    // rounded up to two figures, 85 km
    await page.selectOption('#method', 'band');
    await page.getByText(/Every area has a neighbour from 84\.6 km; 85 km is that rounded up/).waitFor();
    expect(await page.inputValue('#distance')).toBe('85');
    expect(await page.evaluate(() => document.querySelector('label[for="distance"]')?.textContent)).toBe('Distance in kilometres (great-circle)');
    await page.getByText(/distance band: areas within 85 km/).waitFor();
    await expectAccessible('a distance band');
  });

  it('the county data: no outcome guessed, the rate’s own counts warned of, the band suggested as the engine computes it', async () => {
    const csv = join(out, 'nc-counties.csv');
    await countiesCsv(csv);
    await page.goto(`${origin}/page/index.html`);
    await page.setInputFiles('#data-file', csv);
    await page.getByText(/File "nc-counties\.csv": 100 rows/).waitFor();
    expect(await page.inputValue('#y-column')).toBe('');
    await page.selectOption('#id-column', 'FIPS');
    await page.setInputFiles('#boundary-file', SIDS);
    await page.getByText(/100 matched to rows by FIPS/).waitFor();
    await page.selectOption('#y-column', 'sids_per_1000');
    await page.click('#x-NWBIR74');
    expect(await page.locator('.rate-parts fluent-message-bar').count()).toBe(0);
    await page.click('#x-BIR74');
    await page.getByText(/BIR74 looks like the denominator of the rate sids_per_1000 \(sids_per_1000 = 1000 × SID74 \/ BIR74 in \d+ of 100 rows\)/).waitFor();
    await page.click('#x-SID74');
    await page.getByText(/SID74 looks like the numerator of the rate sids_per_1000/).waitFor();
    await expectAccessible('the rate warnings');
    await page.locator('section[aria-labelledby="step-4-title"]').screenshot({ path: join(shots, 'browser-page-rate-warning.png') });
    await page.click('#x-SID74');
    await page.click('#x-BIR74');
    expect(await page.locator('.rate-parts fluent-message-bar').count()).toBe(0);

    // the band the sidebar suggests is the engine's, on the same areas (checked in Node here)
    await page.selectOption('#method', 'band');
    await page.getByText(/is that rounded up/).waitFor();
    const layer = await readBoundary(SIDS.map((f) => ({ name: f.split('/').pop()!, bytes: new Uint8Array(readFileSync(f)) })));
    const expected = suggestBandDistance({ ids: layer.areas.map((_, i) => String(i)), geometries: layer.areas.map((a) => a.geometry!), coordinates: layer.coordinates, points: representativePoints(layer.areas.map((a) => a.geometry!)) })!;
    expect(await page.inputValue('#distance')).toBe(String(expected.distance));
    expect(expected.unit).toBe('km');
    await page.getByText(new RegExp(`distance band: areas within ${expected.distance} km`)).waitFor();
  });

  it('a run that fails shows its error once and leaves the progress bar empty (a blank count in one county)', async () => {
    const csv = join(out, 'nc-counties-blank.csv');
    await countiesCsv(csv, 4); // the fifth county: sheet row 6
    await page.setInputFiles('#data-file', csv);
    await page.getByText(/File "nc-counties-blank\.csv": 100 rows/).waitFor();
    await page.getByText(/100 matched to rows by FIPS/).waitFor();
    expect(await page.inputValue('#y-column')).toBe('sids_per_1000'); // kept from the choice before: the same column is there
    await page.click('#x-NWBIR74');
    await page.click('#run');
    const error = page.locator('section[aria-labelledby="step-6-title"] fluent-message-bar[intent="error"]');
    await error.waitFor({ timeout: 45_000 });
    const text = await error.innerText();
    expect(text).toMatch(/NWBIR74/);
    expect(text).toMatch(/row 6\b/);
    expect(await page.getByText(text.trim().slice(0, 40)).count()).toBe(1);
    expect(await page.evaluate(() => document.querySelector('#progress').value)).toBe(0);
    expect(await page.locator('#stage, .stage').first().innerText()).toBe('');
    await expectAccessible('a failed run');
  }, 60_000);

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
    expect(await page.inputValue('#y-column')).toBe(''); // a new rate is offered, not chosen
    await page.selectOption('#y-column', 'falls_per_1000');
    // the rate's own counts as explanatory columns: known from the recipe, and said
    await page.click('#x-residents_70plus');
    await page.getByText(/residents_70plus looks like the denominator of the rate falls_per_1000 \(falls_per_1000 is built as fall_admissions per 1,000 residents_70plus\)/).waitFor();
    await expectAccessible('the rate builder');
    await page.click('#x-residents_70plus');
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

  it('IDs that differ only by leading zeros: refused until "match 01001 with 1001" is ticked (by keyboard), then matched, run, recorded and kept in the setup', async () => {
    // a 5 × 4 lattice whose boundary file writes its codes with leading zeros ("001"…"020") and whose
    // table writes them as plain numbers (1…20), as a county file and a spreadsheet often do
    const features = [];
    const lines = ['code,v,u'];
    for (let i = 0; i < 20; i++) {
      const a = i % 5, b = Math.floor(i / 4);
      const x = i % 5, y = Math.floor(i / 5);
      features.push({ type: 'Feature', properties: { code: String(i + 1).padStart(3, '0') }, geometry: { type: 'Polygon', coordinates: [[[x, y], [x + 1, y], [x + 1, y + 1], [x, y + 1], [x, y]]] } });
      lines.push(`${i + 1},${(a * 3 + b) % 7},${a + b}`);
    }
    const padded = join(out, 'padded.geojson');
    const table = join(out, 'unpadded.csv');
    writeFileSync(padded, JSON.stringify({ type: 'FeatureCollection', features }));
    writeFileSync(table, lines.join('\n') + '\n');
    await page.goto(`${origin}/page/index.html`);
    await page.evaluate(() => localStorage.clear()); // no setup carried over from the runs above
    await page.reload();
    await page.setInputFiles('#data-file', table);
    await page.getByText(/File "unpadded\.csv": 20 rows/).waitFor();
    await page.selectOption('#id-column', 'code');
    await page.setInputFiles('#boundary-file', padded);
    await page.locator('section[aria-labelledby="step-2-title"] fluent-message-bar[intent="error"]').filter({ hasText: /match 01001 with 1001/ }).waitFor();
    expect(await page.evaluate(() => document.querySelector('#ids-leading-zeros').checked)).toBe(false);
    await expectAccessible('IDs with leading zeros, refused');

    // by keyboard: the tick box follows the boundary file's ID choice, reads as a named check box, and Space ticks it
    await page.focus('#boundary-id');
    await page.keyboard.press('Tab');
    const at = await focusedAsRead(page);
    expect(at.id).toBe('ids-leading-zeros');
    expect(at.role).toBe('checkbox');
    expect(at.name).toMatch(/^Match 01001 with 1001/);
    await page.keyboard.press('Space');
    await page.getByText(/20 matched to rows by code/).waitFor();
    await page.getByText(/matched ignoring leading zeros, as asked/).waitFor();
    expect(await page.evaluate(() => document.querySelector('#ids-leading-zeros').checked)).toBe(true);
    // the step redrew around it: the focus is still on the tick box
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('ids-leading-zeros');
    await expectAccessible('IDs with leading zeros, matched as asked');
    await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
    await page.locator('section[aria-labelledby="step-2-title"]').screenshot({ path: join(shots, 'browser-page-leading-zeros.png') });

    // the run request carries the choice: the workbook's record says so
    await page.selectOption('#y-column', 'v');
    await page.click('#x-u');
    const download = page.waitForEvent('download', { timeout: 45_000 });
    await page.click('#run');
    const saved = join(out, 'zeros.xlsx');
    await (await download).saveAs(saved);
    await page.getByText(/Moran's I of the plain regression's residuals/).waitFor();
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(readFileSync(saved) as unknown as ArrayBuffer);
    let recorded = '';
    wb.getWorksheet('How this was made')!.eachRow((row) => { if (row.getCell(1).value === 'IDs matched ignoring leading zeros') recorded = String(row.getCell(2).value); });
    expect(recorded).toMatch(/^yes, as asked/);

    // the saved setup keeps it: opened again, the same files match at once with the box ticked
    const setup = await page.evaluate(() => JSON.parse(localStorage.getItem('spillway.setup') ?? 'null'));
    expect(setup.idsIgnoreLeadingZeros).toBe(true);
    await page.reload();
    await page.setInputFiles('#data-file', table);
    await page.getByText(/File "unpadded\.csv": 20 rows/).waitFor();
    expect(await page.inputValue('#id-column')).toBe('code');
    await page.setInputFiles('#boundary-file', padded);
    await page.getByText(/20 matched to rows by code/).waitFor();
    expect(await page.evaluate(() => document.querySelector('#ids-leading-zeros').checked)).toBe(true);
  }, 60_000);

  it('sent nothing off this machine and logged no errors (CSP violations show as console errors)', () => {
    expect(foreignRequests).toEqual([]);
    expect(problems).toEqual([]);
  });
});
