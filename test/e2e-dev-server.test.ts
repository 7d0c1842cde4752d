/**
 * The development server as `npm run serve` starts it: plain http on this computer (no certificate, no
 * administrator rights), and a first use from a cold dependency cache that the server does not
 * interrupt by re-bundling a late-found library and reloading the page (which lost the analyst's first
 * file choice). Debian's Chromium driven by playwright-core, as in the other browser checks.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createLogger, createServer, resolveConfig, type ViteDevServer } from 'vite';
import type { Browser, Page } from 'playwright-core';
import { chromiumPresent, launchChromium, ROOT } from './helpers/browser.js';

const CONFIG = join(ROOT, 'addin/vite.config.ts');
const XLSX = join(ROOT, 'sample-workbooks/vell-basin.xlsx');
const GEOJSON = join(ROOT, 'sample-workbooks/vell-basin-districts.geojson');

let cache: string;
let server: ViteDevServer;
let browser: Browser;
let page: Page;
const said: string[] = [];

describe.skipIf(!chromiumPresent || !existsSync(XLSX))('the development server (npm run serve)', () => {
  beforeAll(async () => {
    cache = mkdtempSync(join(tmpdir(), 'spillway-dev-cache-'));
    const logger = createLogger('info', { allowClearScreen: false });
    for (const level of ['info', 'warn', 'error'] as const) {
      logger[level] = (msg: string) => { said.push(msg); };
    }
    server = await createServer({ configFile: CONFIG, cacheDir: cache, customLogger: logger, server: { port: 0, strictPort: false, host: '127.0.0.1' } });
    await server.listen();
    browser = await launchChromium();
    page = await (await browser.newContext({ viewport: { width: 360, height: 900 } })).newPage();
  }, 60_000);

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (cache) rmSync(cache, { recursive: true, force: true });
  });

  it('serves plain http by default; only the Excel route (mode "excel") asks for the Office certificate', async () => {
    expect(server.config.server.https).toBeFalsy();
    expect(server.resolvedUrls!.local[0]).toMatch(/^http:\/\//);
    const preview = await resolveConfig({ configFile: CONFIG, logLevel: 'silent' }, 'serve', 'development');
    expect(preview.server.https).toBeFalsy();
  });

  it('keeps the page through a first use from a cold cache: no re-bundling, no reload, the chosen file stays', async () => {
    const origin = server.resolvedUrls!.local[0].replace(/\/$/, '');
    let loads = 0;
    page.on('load', () => { loads++; });
    await page.goto(`${origin}/page/index.html`);
    await page.setInputFiles('#data-file', XLSX);
    await page.getByText(/Sheet "Districts": 150 rows/).waitFor({ timeout: 60_000 });
    await page.setInputFiles('#boundary-file', GEOJSON);
    await page.getByText(/Neighbours per area/).waitFor({ timeout: 60_000 });
    await page.selectOption('#y-column', 'long_commute_pct');
    await page.click('#x-rail_km');
    await page.click('#run');
    await page.getByText(/Moran's I of the plain regression's residuals/).waitFor({ timeout: 90_000 });
    expect(loads).toBe(1);
    expect(await page.getByText('Opened vell-basin.xlsx.').count()).toBe(1);
    const late = said.filter((m) => /new dependencies|reloading|optimized dependencies changed/i.test(m));
    expect(late, said.join('\n')).toEqual([]);
  }, 150_000);
});
