// The development server answers everything the manifest names, with the headers Office's hosts
// need: Excel on the web fetches functions.json from its own origin, so the metadata must carry
// Access-Control-Allow-Origin (Fetch standard, CORS protocol; Microsoft's own issue tracker shows the
// failure: OfficeDev/office-js#3970); the manifest's Script element names /functions.js; and the task
// pane's Content-Security-Policy (W3C CSP Level 3) allows Office.js's current and announced hosts
// ("Referencing the Office JavaScript API library") for scripts, requests and frames, and nothing else.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { AddressInfo } from 'node:net';
import { createServer, type ViteDevServer } from 'vite';
import { OFFICE_JS_HOSTS, TASKPANE_CSP } from '../addin/vite.config.js';

const ROOT = join(import.meta.dirname, '..');
const EXCEL_ON_THE_WEB = 'https://excel.officeapps.live.com';
let server: ViteDevServer;
let base: string;
const before = process.env.SPILLWAY_HTTP;

beforeAll(async () => {
  process.env.SPILLWAY_HTTP = '1';
  server = await createServer({ configFile: join(ROOT, 'addin/vite.config.ts'), logLevel: 'warn', server: { port: 0, strictPort: false, hmr: false } });
  await server.listen();
  base = `http://localhost:${(server.httpServer!.address() as AddressInfo).port}`;
}, 60_000);

afterAll(async () => {
  await server?.close();
  if (before === undefined) delete process.env.SPILLWAY_HTTP;
  else process.env.SPILLWAY_HTTP = before;
});

/** The directives of a policy, by name. */
function directives(csp: string): Map<string, string[]> {
  return new Map(csp.split(';').map((d) => d.trim().split(/\s+/)).filter((d) => d[0]).map(([name, ...values]) => [name, values]));
}

describe('the development server (npm run serve)', () => {
  it('sends the cell functions’ metadata to Excel on the web’s origin, with Access-Control-Allow-Origin', async () => {
    const res = await fetch(`${base}/functions.json`, { headers: { Origin: EXCEL_ON_THE_WEB } });
    expect(res.status).toBe(200);
    expect(res.headers.get('access-control-allow-origin')).toBe('*');
    expect(res.headers.get('content-type')).toMatch(/application\/json/);
    const meta = (await res.json()) as { functions: { id: string }[] };
    expect(meta.functions.map((f) => f.id)).toContain('MORAN');
  }, 60_000);

  it('serves /functions.js, which the manifest’s Script element names, as one classic script', async () => {
    const manifest = readFileSync(join(ROOT, 'manifest/manifest.xml'), 'utf8');
    expect(manifest).toMatch(/<bt:Url id="Functions.Script.Url" DefaultValue="https:\/\/localhost:3000\/functions\.js"\/>/);
    const res = await fetch(`${base}/functions.js`, { headers: { Origin: EXCEL_ON_THE_WEB } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/javascript/);
    expect(res.headers.get('access-control-allow-origin')).toBe('*');
    const code = await res.text();
    expect(code).toContain('CustomFunctions.associate');
    // a classic script: no module syntax at the top level
    expect(code).not.toMatch(/^\s*(import|export)\b/m);
  }, 120_000);

  it('serves the task pane with a policy that allows Office.js’s two hosts for scripts, requests and frames, and nothing else', async () => {
    const res = await fetch(`${base}/taskpane/index.html`);
    expect(res.status).toBe(200);
    const csp = res.headers.get('content-security-policy')!;
    expect(csp).toBe(TASKPANE_CSP);
    expect([...OFFICE_JS_HOSTS]).toEqual(['https://appsforoffice.microsoft.com', 'https://officeapis.public.onecdn.static.microsoft']);
    const d = directives(csp);
    expect(d.get('script-src')).toEqual(["'self'", ...OFFICE_JS_HOSTS]);
    expect(d.get('connect-src')).toEqual(["'self'", ...OFFICE_JS_HOSTS]);
    expect(d.get('frame-src')).toEqual([...OFFICE_JS_HOSTS]);
    // every other directive names no host at all
    for (const [name, values] of d) {
      if (['script-src', 'connect-src', 'frame-src'].includes(name)) continue;
      expect(values.filter((v) => /^https?:/.test(v)), name).toEqual([]);
    }
    expect(csp).not.toMatch(/unsafe-eval/);
    // and the page itself carries the same policy in its meta tag
    const html = readFileSync(join(ROOT, 'addin/taskpane/index.html'), 'utf8');
    expect(/http-equiv="Content-Security-Policy" content="([^"]+)"/.exec(html)?.[1]).toBe(TASKPANE_CSP);
    // Office.js comes from one of those hosts
    expect(OFFICE_JS_HOSTS.some((h) => html.includes(`<script src="${h}/`))).toBe(true);
  });

  it('sends no cross-origin permission for anything else', async () => {
    const res = await fetch(`${base}/taskpane/index.html`, { headers: { Origin: EXCEL_ON_THE_WEB } });
    expect(res.headers.get('access-control-allow-origin')).toBeNull();
  });
});
