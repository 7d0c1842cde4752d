/**
 * The browser page as one file (issue 16 §3), built by `npm run build:page`'s configuration and opened
 * from disk (file://, no server) in Debian's Chromium (playwright-core) and, when installed, Debian's
 * Firefox (WebDriver BiDi, test/helpers/firefox-page-run.mjs). It runs Columbus — the table as CSV and
 * the shapefile's three parts — and the downloaded workbook is checked against the independent numpy
 * reference (test/golden/columbus.json). Its Content-Security-Policy is checked to refuse every request,
 * and the page after a run against axe-core's WCAG 2.1 AA rules (test/helpers/a11y.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createHash } from 'node:crypto';
import { spawnSync } from 'node:child_process';
import { build } from 'vite';
import type { Browser, Page } from 'playwright-core';
import { openDbf } from 'shapefile';
import { readWorkbook, type ReadSheet } from '../src/workbook/index.js';
import { chromiumPresent, launchChromium, ROOT } from './helpers/browser.js';
import { readGolden } from './helpers/columbus.js';
import { accessibilityProblems } from './helpers/a11y.js';

/* eslint-disable @typescript-eslint/no-explicit-any */
declare const document: any;

const golden = readGolden();
const FIREFOX = '/usr/bin/firefox-esr';
const COLUMBUS = join(ROOT, 'test/fixtures/columbus');
const SHAPEFILE = ['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((f) => join(COLUMBUS, f));

let out: string;
let html: string;
let pagePath: string;
let csv: string;

beforeAll(async () => {
  out = mkdtempSync(join(tmpdir(), 'spillway-one-file-'));
  await build({ configFile: join(ROOT, 'addin/vite.page.config.ts'), logLevel: 'warn', build: { outDir: out } });
  pagePath = join(out, 'spillway.html');
  html = readFileSync(pagePath, 'utf8');
  // the Columbus table as the CSV an analyst would export (shapefile library reading the .dbf)
  const source = await openDbf(join(COLUMBUS, 'columbus.dbf'));
  const lines = ['POLYID,CRIME,INC,HOVAL'];
  for (let r = await source.read(); !r.done; r = await source.read()) {
    const v = r.value as Record<string, number>;
    lines.push([v.POLYID, v.CRIME, v.INC, v.HOVAL].join(','));
  }
  csv = join(out, 'columbus.csv');
  writeFileSync(csv, lines.join('\n') + '\n');
}, 180_000);

afterAll(() => { if (out) rmSync(out, { recursive: true, force: true }); });

/** The lag model's sheet: ρ and the coefficients from their rows (label in column 1, estimate in column 2). */
function lagFigures(sheets: ReadSheet[]) {
  const sheet = sheets.find((s) => s.name === 'Spatial lag model');
  if (!sheet) throw new Error(`no lag sheet among ${sheets.map((s) => s.name).join(', ')}`);
  const first = (test: (label: string) => boolean) => sheet.rows.find((r) => typeof r[0] === 'string' && test(r[0]))?.[1] as number;
  return { rho: first((l) => l.startsWith('ρ')), constant: first((l) => l === 'constant'), inc: first((l) => l === 'INC'), hoval: first((l) => l === 'HOVAL') };
}

function checkAgainstReference(f: ReturnType<typeof lagFigures>) {
  const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
  const [c, inc, hoval] = golden.lag.coefficients.map((k: { estimate: number }) => k.estimate);
  expect(rel(f.rho, golden.lag.rho)).toBeLessThan(1e-6);
  expect(rel(f.constant, c)).toBeLessThan(1e-6);
  expect(rel(f.inc, inc)).toBeLessThan(1e-6);
  expect(rel(f.hoval, hoval)).toBeLessThan(1e-6);
}

describe('the one-file page', () => {
  it('is one HTML file: script, styles, worker and icon inside, nothing pointing elsewhere', () => {
    expect(html.length).toBeGreaterThan(500_000);
    expect(html).not.toMatch(/\s(?:src|href)="(?!data:)[^"#]/);
    expect(html.match(/<script\b/g)).toHaveLength(1);
    expect(html).not.toMatch(/(?<![\w$.])(?:new\s+)?Function\s*\(|(?<![\w$.])eval\s*\(/);
  });

  it('has a Content-Security-Policy that allows only its own inline script and style (by hash) and no request anywhere', () => {
    const csp = /http-equiv="Content-Security-Policy" content="([^"]+)"/.exec(html)![1];
    const directives = new Map(csp.split(';').map((d) => d.trim().split(/\s+/)).map(([k, ...v]) => [k, v]));
    expect(directives.get('default-src')).toEqual(["'none'"]);
    expect(directives.get('connect-src')).toEqual(["'none'"]);
    expect(csp).not.toMatch(/https?:|unsafe-|'self'|\*/);
    const hash = (text: string) => `'sha256-${createHash('sha256').update(text, 'utf8').digest('base64')}'`;
    const script = /<script type="module">([\s\S]*?)<\/script>/.exec(html)![1];
    const style = /<style>([\s\S]*?)<\/style>/.exec(html)![1];
    expect(directives.get('script-src')).toEqual([hash(script)]);
    expect(directives.get('style-src')).toEqual([hash(style)]);
  });
});

describe.skipIf(!chromiumPresent)('the one-file page from file:// in Chromium', () => {
  let browser: Browser;
  let page: Page;
  const requests: string[] = [];
  const problems: string[] = [];

  beforeAll(async () => {
    browser = await launchChromium();
    const context = await browser.newContext({ acceptDownloads: true });
    page = await context.newPage();
    page.on('request', (r) => requests.push(r.url()));
    page.on('console', (m) => { if (m.type() === 'error') problems.push(m.text()); });
    page.on('pageerror', (e) => problems.push(e.message));
  });
  afterAll(async () => { await browser?.close(); });

  it('runs Columbus (CSV table, shapefile in three parts) and downloads a workbook with the reference figures', async () => {
    await page.goto(`file://${pagePath}`);
    await page.setInputFiles('#data-file', csv);
    await page.getByText(/49 rows/).waitFor();
    await page.selectOption('#id-column', 'POLYID');
    await page.setInputFiles('#boundary-file', SHAPEFILE);
    await page.getByText(/49 matched to rows by POLYID/).waitFor();
    await page.selectOption('#y-column', 'CRIME');
    for (const x of ['INC', 'HOVAL']) await page.click(`#x-${x}`);
    const download = page.waitForEvent('download', { timeout: 60_000 });
    await page.click('#run');
    const file = await download;
    expect(file.suggestedFilename()).toBe('columbus with results.xlsx');
    const saved = join(out, 'chromium-result.xlsx');
    await file.saveAs(saved);
    const sheets = await readWorkbook(new Uint8Array(readFileSync(saved)));
    expect(sheets.map((s) => s.name)).toEqual(expect.arrayContaining(['Summary', 'Plain regression', 'Spatial lag model', 'Neighbours', 'How this was made']));
    checkAgainstReference(lagFigures(sheets));
    const neighbours = sheets.find((s) => s.name === 'Neighbours')!;
    expect(neighbours.rows.find((r) => r[0] === 'Links (each direction counted)')?.[1]).toBe(golden.weights.links);
    // the page as built into one file meets the same WCAG 2.1 AA rules as the served page, checked once after a run
    await page.getByText(/Moran's I of the plain regression's residuals/).waitFor();
    expect(await accessibilityProblems(page), 'the one-file page after a run').toBe('');
  }, 120_000);

  it('refuses a request to anywhere, as its policy says', async () => {
    const answer = await page.evaluate(() => fetch('http://127.0.0.1:9/probe').then(() => 'sent', () => 'refused'));
    expect(answer).toBe('refused');
    expect(problems.some((p) => /Content Security Policy/.test(p))).toBe(true);
    problems.length = 0;
  });

  it('asked nothing of any server: the only request was for the page itself (blob: and data: stay in the browser)', () => {
    const elsewhere = requests.filter((u) => u !== `file://${pagePath}` && !/^(blob|data):/.test(u));
    expect(elsewhere).toEqual([]);
    expect(problems).toEqual([]);
  });
});

describe.skipIf(!existsSync(FIREFOX))('the one-file page from file:// in Firefox', () => {
  it('runs Columbus and hands back a workbook with the reference figures, with no console errors', async () => {
    const r = spawnSync(process.execPath, ['--experimental-websocket', '--no-warnings', join(ROOT, 'test/helpers/firefox-page-run.mjs'), pagePath, 'POLYID', 'CRIME', 'INC,HOVAL', csv, ...SHAPEFILE], { encoding: 'utf8', timeout: 170_000 });
    expect(r.status, r.stderr).toBe(0);
    const answer = JSON.parse(r.stdout.trim().split('\n').pop()!);
    expect(answer.errors).toEqual([]);
    expect(answer.message).toMatch(/49 areas/);
    const sheets = await readWorkbook(new Uint8Array(Buffer.from(answer.workbook, 'base64')));
    checkAgainstReference(lagFigures(sheets));
  }, 180_000);
});
