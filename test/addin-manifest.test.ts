// The add-in manifest and build, checked against Microsoft's add-in manifest schema through the
// office-addin-manifest library (a general-purpose tool), the custom-functions-metadata output it
// generates, and W3C Content Security Policy Level 3 (no 'unsafe-eval': no code from strings).
import { beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { OfficeAddinManifest } from 'office-addin-manifest';
import { build } from 'vite';
import { PAGE_CSP, TASKPANE_CSP } from '../addin/vite.config.js';

const ROOT = join(import.meta.dirname, '..');
const MANIFEST = join(ROOT, 'manifest/manifest.xml');
const BASE = 'https://localhost:3000/';
let out: string;

beforeAll(async () => {
  out = mkdtempSync(join(tmpdir(), 'spillway-addin-'));
  process.env.SPILLWAY_ADDIN_OUT = out;
  await build({ configFile: join(ROOT, 'addin/vite.config.ts'), logLevel: 'warn' });
  return () => rmSync(out, { recursive: true, force: true });
});

describe('the add-in manifest (read offline with office-addin-manifest)', () => {
  it('names Spillway with its own id, asks only to read and write the document, and opens the task pane', async () => {
    const m = await OfficeAddinManifest.readManifestFile(MANIFEST);
    expect(m.manifestType).toBe('xml');
    expect(m.id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    expect(m.displayName).toBe('Spillway');
    expect(m.providerName).toBe('Spillway');
    expect(m.description).toMatch(/spatial/i);
    expect(m.permissions).toBe('ReadWriteDocument');
    expect(m.hosts).toEqual(['Workbook']);
    expect(m.officeAppType).toBe('TaskPaneApp');
    expect(m.defaultSettings?.sourceLocation).toBe(`${BASE}taskpane/index.html`);
    expect(m.iconUrl?.startsWith(BASE)).toBe(true);
  });

  const xml = readFileSync(MANIFEST, 'utf8');

  it('runs the task pane and the cell functions in one shared runtime (SharedRuntime 1.1)', () => {
    expect(xml).toMatch(/<Set Name="SharedRuntime" MinVersion="1.1"\/>/);
    expect(xml).toMatch(/<Set Name="CustomFunctionsRuntime" MinVersion="1.1"\/>/);
    expect(xml).toMatch(/<Runtime resid="Taskpane.Url" lifetime="long"\/>/);
    // the functions' page is the task pane's page: one runtime
    expect(xml).toMatch(/<Page>\s*<SourceLocation resid="Taskpane.Url"\/>\s*<\/Page>/);
    expect(xml).toMatch(/<bt:String id="Functions.Namespace" DefaultValue="SPILL"\/>/);
  });

  it('every file the manifest points to is in the build output', () => {
    const urls = [...xml.matchAll(/DefaultValue="(https:\/\/[^"]+)"/g)].map((m) => m[1]);
    expect(urls.length).toBeGreaterThan(6);
    for (const url of urls) {
      expect(url.startsWith(BASE), url).toBe(true);
      const file = join(out, url.slice(BASE.length));
      expect(existsSync(file), `${url} → ${file}`).toBe(true);
    }
  });

  it('functions.json lists the SPILL functions with help text for every argument', () => {
    const meta = JSON.parse(readFileSync(join(out, 'functions.json'), 'utf8')) as { functions: { id: string; description: string; parameters: { name: string; description?: string }[] }[] };
    expect(meta.functions.map((f) => f.id)).toEqual(expect.arrayContaining(['GEARY', 'GISTAR', 'LAG', 'LOCALMORAN', 'MORAN', 'MORANBYAREA', 'MORANPERM', 'NEIGHBOURS', 'TOUCHING']));
    for (const f of meta.functions) {
      expect(f.description.length, f.id).toBeGreaterThan(20);
      for (const p of f.parameters) expect(p.description?.length ?? 0, `${f.id}(${p.name})`).toBeGreaterThan(10);
    }
  });

  it('no built script makes code from strings (the pages’ CSP has no unsafe-eval)', () => {
    const scripts = [join(out, 'functions.js'), ...readdirSync(join(out, 'assets')).filter((f) => f.endsWith('.js')).map((f) => join(out, 'assets', f))];
    expect(scripts.length).toBeGreaterThan(3);
    for (const f of scripts) {
      const code = readFileSync(f, 'utf8');
      expect(code, f).not.toMatch(/(?<![\w$.])(?:new\s+)?Function\s*\(|(?<![\w$.])eval\s*\(/);
    }
  });

  it('the pages carry the same Content-Security-Policy in their meta tag as the server sends', () => {
    const meta = (file: string) => /http-equiv="Content-Security-Policy" content="([^"]+)"/.exec(readFileSync(join(out, file), 'utf8'))?.[1];
    expect(meta('page/index.html')).toBe(PAGE_CSP);
    expect(meta('taskpane/index.html')).toBe(TASKPANE_CSP);
    expect(PAGE_CSP).toContain("connect-src 'self'");
    expect(PAGE_CSP).not.toMatch(/unsafe|https?:/);
  });
});
