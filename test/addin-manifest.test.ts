// The add-in manifest and the build it points at. What is checked, and against what:
// - the fields office-addin-manifest (Microsoft's general-purpose tool) reads from the manifest
//   offline: id, names, permissions, host, task pane page. That library's schema validation is an
//   online service, so it is not used here;
// - the rules of Microsoft's manifest schema (OfficeAppManifestV1_1.xsd, TaskPaneAppVersionOverrides
//   V1_0.xsd) and reference pages, checked offline by scripts/manifest/rules.ts: element order and
//   required children, value types (GUID id, version, culture name, string lengths 125/250, URL
//   length 2048), https URLs under the add-in's host, resource ids (unique, at most 32 characters, each
//   resid naming a resource of the right kind), unique control ids, the 16/32/80 pixel icons and the
//   pixel size of every icon file (read from its PNG header). Each rule is shown to catch a manifest
//   broken on purpose. It is not a full schema validation;
// - that every URL in the manifest names a file of the build; the functions.json that
//   custom-functions-metadata generates; W3C Content Security Policy Level 3 (no 'unsafe-eval': no
//   code from strings);
// - the manifest for an organisation's own host (npm run manifest -- --host URL) passes the same rules.
import { beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { OfficeAddinManifest } from 'office-addin-manifest';
import { build } from 'vite';
import { PAGE_CSP, TASKPANE_CSP } from '../addin/vite.config.js';
import { checkManifest, pngSize } from '../scripts/manifest/rules.js';
import { makeManifest, nameBasedId, normaliseHost } from '../scripts/manifest/make.js';

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

describe('the add-in manifest, as office-addin-manifest reads it offline', () => {
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
    expect(meta.functions.map((f) => f.id)).toEqual(expect.arrayContaining(['GEARY', 'GISTAR', 'LAG', 'LOCALMORAN', 'MORAN', 'MORANBYAREA', 'MORANPERM', 'NEIGHBOURS', 'TOUCHING', 'FIT', 'EFFECTS', 'LMTESTS', 'RATEGLOBAL', 'RATELOCAL', 'RATEMORAN']));
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

/** The PNG files under addin/public, as the manifest's icon URLs name them. */
const publicFile = (path: string) => {
  const p = join(ROOT, 'addin/public', path);
  return existsSync(p) ? new Uint8Array(readFileSync(p)) : undefined;
};

describe('the manifest schema’s rules, checked offline (scripts/manifest/rules.ts)', () => {
  const xml = readFileSync(MANIFEST, 'utf8');
  const check = (text: string) => checkManifest(text, { base: BASE, file: publicFile });

  it('the development manifest breaks none of them', () => {
    expect(check(xml)).toEqual([]);
  });

  // each rule, shown to catch a manifest broken on purpose
  const broken: [string, (m: string) => string, RegExp][] = [
    ['an element out of order', (m) => m.replace(/(<Version>[^<]*<\/Version>)\s*(<ProviderName>[^<]*<\/ProviderName>)/, '$2$1'), /<Version> is out of order in <OfficeApp>: it must come before <ProviderName>/],
    ['a required child missing', (m) => m.replace(/<Permissions>[^<]*<\/Permissions>/, ''), /<OfficeApp> must contain <Permissions>/],
    ['a required child missing deeper down', (m) => m.replace(/<Supertip>[\s\S]*?<\/Supertip>/, ''), /<Control> must contain <Supertip>/],
    ['an element where none belongs', (m) => m.replace('<Hosts>', '<Colour>blue</Colour><Hosts>'), /<Colour> is not a valid child of <OfficeApp>/],
    ['an id that is not a GUID', (m) => m.replace(/<Id>[^<]*<\/Id>/, '<Id>spillway-1</Id>'), /the add-in id must be a GUID/],
    ['a version with five parts', (m) => m.replace(/<Version>[^<]*<\/Version>/, '<Version>1.2.3.4.5</Version>'), /the version must have one to four parts/],
    ['a display name over 125 characters', (m) => m.replace('<DisplayName DefaultValue="Spillway"/>', `<DisplayName DefaultValue="${'S'.repeat(126)}"/>`), /the display name must have 1 to 125 characters \(it has 126\)/],
    ['a long string over 250 characters', (m) => m.replace(/(id="OpenPane.Tip" DefaultValue=")[^"]*/, `$1${'t'.repeat(251)}`), /resource "OpenPane.Tip" must have 1 to 250 characters/],
    ['a plain http address', (m) => m.replace('https://localhost:3000/help/index.html"/>\n  <Hosts>', 'http://localhost:3000/help/index.html"/>\n  <Hosts>'), /the support address must be an https address/],
    ['an address on another host', (m) => m.replace('<SupportUrl DefaultValue="https://localhost:3000/', '<SupportUrl DefaultValue="https://elsewhere.example/'), /the support address is not under https:\/\/localhost:3000\//],
    ['an icon without its 80 pixel image', (m) => m.replace('<bt:Image size="80" resid="Icon.80"/>', ''), /<Icon> must have a 80 × 80 image/],
    ['an icon file of the wrong size', (m) => m.replace('<bt:Image size="16" resid="Icon.16"/>', '<bt:Image size="16" resid="Icon.32"/>'), /assets\/icon-32\.png is 32 × 32 pixels; it must be 16 × 16/],
    ['a main icon of the wrong size', (m) => m.replace('<IconUrl DefaultValue="https://localhost:3000/assets/icon-32.png"/>', '<IconUrl DefaultValue="https://localhost:3000/assets/icon-64.png"/>'), /icon-64\.png is 64 × 64 pixels; it must be 32 × 32/],
    ['a resid naming nothing', (m) => m.replace('<Label resid="Group.Label"/>', '<Label resid="Group.Title"/>'), /resid "Group.Title" names no resource/],
    ['a resid naming the wrong kind of resource', (m) => m.replace('<Label resid="Group.Label"/>', '<Label resid="Help.Url"/>'), /resid "Help.Url" must name a short string, not a URL/],
    ['a resource id used twice', (m) => m.replace('<bt:String id="Group.Label"', '<bt:String id="Functions.Namespace"'), /the resource id "Functions.Namespace" is used twice/],
    ['a resource id over 32 characters', (m) => m.split('Help.Url').join('Help.Url.For.The.Spillway.Sidebar.Steps'), /the resource id "Help.Url.For.The.Spillway.Sidebar.Steps" is longer than 32 characters/],
    ['a control id used twice', (m) => m.replace('<Group id="Spillway.Group">', '<Group id="Spillway.OpenPane">'), /the id "Spillway.OpenPane" is used twice/],
    ['permissions not in the schema', (m) => m.replace('<Permissions>ReadWriteDocument</Permissions>', '<Permissions>Everything</Permissions>'), /permissions must be one of Restricted/],
    ['a manifest that is not well-formed', (m) => m.replace('</Hosts>', '</Host>'), /not well-formed XML/],
  ];
  it.each(broken)('catches %s', (_what, breakIt, expected) => {
    const changed = breakIt(xml);
    expect(changed).not.toBe(xml);
    expect(check(changed).join('\n')).toMatch(expected);
  });

  it('reads the pixel size from the PNG header (PNG specification, IHDR chunk)', () => {
    for (const size of [16, 32, 64, 80]) expect(pngSize(publicFile(`assets/icon-${size}.png`)!)).toEqual({ width: size, height: size });
    expect(pngSize(new TextEncoder().encode('not a picture at all, just text'))).toBeNull();
  });
});

describe('a manifest for an organisation\'s own host (npm run manifest -- --host URL)', () => {
  const xml = readFileSync(MANIFEST, 'utf8');
  const HOST = 'https://example.org/spillway';

  it('points every address at the host, keeps one id per host (not the development one), and passes the same rules', async () => {
    const made = makeManifest(xml, { host: HOST }, publicFile);
    expect(made.base).toBe('https://example.org/spillway/');
    expect(made.problems).toEqual([]);
    expect(made.xml).not.toContain('localhost');
    const urls = [...made.xml.matchAll(/DefaultValue="(https:\/\/[^"]+)"/g)].map((m) => m[1]);
    expect(urls.length).toBeGreaterThan(6);
    for (const url of urls) expect(url.startsWith(made.base), url).toBe(true);
    const id = /<Id>([^<]+)<\/Id>/.exec(made.xml)![1];
    expect(id).toBe(nameBasedId(made.base));
    expect(id).toBe(makeManifest(xml, { host: `${HOST}/` }, publicFile).xml.match(/<Id>([^<]+)<\/Id>/)![1]);
    expect(id).not.toBe(/<Id>([^<]+)<\/Id>/.exec(xml)![1]);
    // version 5 name-based UUID (RFC 9562): version nibble 5, variant bits 10
    expect(id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-5[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    // and office-addin-manifest reads it as the same add-in, at the new host
    const dir = mkdtempSync(join(tmpdir(), 'spillway-manifest-'));
    try {
      writeFileSync(join(dir, 'manifest.xml'), made.xml);
      const m = await OfficeAddinManifest.readManifestFile(join(dir, 'manifest.xml'));
      expect(m.id).toBe(id);
      expect(m.displayName).toBe('Spillway');
      expect(m.defaultSettings?.sourceLocation).toBe(`${HOST}/taskpane/index.html`);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('takes a given id and version, and refuses what Office would not load', () => {
    const made = makeManifest(xml, { host: HOST, id: '0b5a4f7e-2c1d-4e3f-9a8b-7c6d5e4f3a2b', version: '1.2.0.0' }, publicFile);
    expect(made.xml).toContain('<Id>0b5a4f7e-2c1d-4e3f-9a8b-7c6d5e4f3a2b</Id>');
    expect(made.xml).toContain('<Version>1.2.0.0</Version>');
    expect(makeManifest(xml, { host: HOST, id: 'not-a-guid' }, publicFile).problems.join()).toMatch(/GUID/);
    expect(() => normaliseHost('http://example.org/spillway')).toThrow(/only over https/);
    expect(() => normaliseHost('example.org')).toThrow(/is not an address/);
    expect(() => normaliseHost('https://example.org/spillway?x=1')).toThrow(/query/);
    expect(normaliseHost('https://Example.org/spillway')).toBe('https://example.org/spillway/');
  });

  it('runs from the command line, writes the manifest, and stops with a plain message on a bad host', () => {
    const dir = mkdtempSync(join(tmpdir(), 'spillway-manifest-'));
    try {
      const out = join(dir, 'organisation.xml');
      const ok = spawnSync(process.execPath, ['--import', 'tsx', join(ROOT, 'scripts/manifest/make.ts'), '--host', HOST, '--out', out], { cwd: ROOT, encoding: 'utf8' });
      expect(ok.status, ok.stderr).toBe(0);
      expect(ok.stdout).toMatch(/Wrote .*organisation\.xml, for an add-in served from https:\/\/example\.org\/spillway\//);
      expect(readFileSync(out, 'utf8')).toContain(`${HOST}/functions.json`);
      const bad = spawnSync(process.execPath, ['--import', 'tsx', join(ROOT, 'scripts/manifest/make.ts'), '--host', 'http://example.org'], { cwd: ROOT, encoding: 'utf8' });
      expect(bad.status).toBe(1);
      expect(bad.stderr.trim()).toBe('Office loads add-ins only over https; "http://example.org" is not an https address.');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 60_000);
});
