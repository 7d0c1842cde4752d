/**
 * What the browser checks share: the add-in built once and served by vite's preview on a free
 * loopback port, and Debian's Chromium driven by playwright-core with background traffic off.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { build, preview, type PreviewServer } from 'vite';
import { chromium, type Browser } from 'playwright-core';

export const ROOT = join(import.meta.dirname, '..', '..');
export const CHROMIUM = '/usr/bin/chromium';
export const chromiumPresent = existsSync(CHROMIUM);

const configFile = join(ROOT, 'addin/vite.config.ts');

/** Builds the add-in (task pane, cell functions, help and browser page) into outDir. */
export async function buildAddin(outDir: string): Promise<void> {
  process.env.SPILLWAY_ADDIN_OUT = outDir;
  await build({ configFile, logLevel: 'error' });
}

/** Builds the add-in into outDir and serves it over plain http; returns the server and its origin. */
export async function buildAndServe(outDir: string): Promise<{ server: PreviewServer; origin: string }> {
  await buildAddin(outDir);
  const server = await preview({ configFile, logLevel: 'warn', preview: { port: 0, strictPort: false, host: '127.0.0.1' } });
  return { server, origin: server.resolvedUrls!.local[0].replace(/\/$/, '') };
}

export function launchChromium(): Promise<Browser> {
  return chromium.launch({
    executablePath: CHROMIUM,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
}

export async function closeBoth(browser: Browser | undefined, server: PreviewServer | undefined): Promise<void> {
  await browser?.close();
  await new Promise<void>((resolve) => (server ? server.httpServer.close(() => resolve()) : resolve()));
}
