// Security floor. What is checked and against what:
// - built bundles (dist/ from `npm run build`, dist-addin/ from `npm run build:addin`) build no code
//   from strings (eval, new Function, Function(...)), so a Content-Security-Policy without
//   'unsafe-eval' holds (dist/ is built by `npm ci`; the add-in is built afresh into a temporary
//   folder for this file, so the scan always covers what the current sources build);
// - the built add-in and browser page name no http(s) address outside the add-in's own origin
//   (allow-list below, each entry with its reason);
// - every HTML page (sources under addin/, and built pages) carries a Content-Security-Policy;
// - the Office manifest asks for ReadWriteDocument and nothing else, and points only at the origin;
// - the lock file is committed, lockfileVersion ≥ 3, and pins what package.json names (the audit of
//   production dependencies is recorded in test/security-audit.md; this test needs no network);
// - the engine (src/ outside the command line and the workbook writer) never touches the file system;
// - the command line with --out reads only the files named and writes only the --out file.
import { afterAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { ROOT } from './helpers/cli.js';
import { buildAddin } from './helpers/browser.js';
import { gridFile, gridCsv } from './bad-inputs/make.js';

function walk(dir: string, keep: (p: string) => boolean = () => true): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    if (entry.isDirectory()) {
      if (entry.name !== 'node_modules') out.push(...walk(p, keep));
    } else if (keep(p)) out.push(p);
  }
  return out;
}

const DIST = process.env.SPILLWAY_DIST_OUT ?? join(ROOT, 'dist');
const builtHere = !process.env.SPILLWAY_ADDIN_OUT;
const ADDIN = process.env.SPILLWAY_ADDIN_OUT ?? mkdtempSync(join(tmpdir(), 'spillway-addin-scan-'));
if (builtHere) await buildAddin(ADDIN);
afterAll(() => { if (builtHere) rmSync(ADDIN, { recursive: true, force: true }); });
const TEXT = /\.(m?js|cjs|html|css|json|xml|svg|webmanifest)$/i;
/** Same pattern the add-in build refuses (addin/vite.config.ts): eval( and (new) Function( not as a property. */
const DYNAMIC_CODE = /(?<![\w$.])(?:new\s+)?Function\s*\(|(?<![\w$.])eval\s*\(/;

/**
 * Addresses a built page may contain, and why:
 * - https://localhost:3000: the add-in's own origin (manifest and dev server);
 * - https://appsforoffice.microsoft.com/lib/1/hosted/office.js: Office.js, which Office requires a
 *   task pane to load from Microsoft's host (allowed in the task pane and help pages only, and in
 *   their CSP; never in the browser page);
 *   The task pane's CSP names the bare origin https://appsforoffice.microsoft.com for the same reason,
 *   and the bare origin https://officeapis.public.onecdn.static.microsoft, the new host Microsoft
 *   announces for Office.js ("Referencing the Office JavaScript API library"), for scripts, requests
 *   and Office's own frames (addin/vite.config.ts, OFFICE_JS_HOSTS).
 * - XML namespace names (schemas.openxmlformats.org, schemas.microsoft.com, www.w3.org, purl.org):
 *   identifiers written inside .xlsx parts and SVG, never fetched.
 * - In script bundles only: licence notes and error-message links of the bundled libraries (the
 *   workbook writer and its zip, buffer and crypto shims, the CSV reader, the bundler's runtime) on
 *   github.com, raw.github.com, feross.org, stuartk.com, stuk.github.io and rolldown.rs — text shown
 *   to a developer, never requested (no script requests a literal address: checked below, and every
 *   page's CSP limits connections to its own origin).
 */
const NAMESPACE = /^https?:\/\/(schemas\.openxmlformats\.org|schemas\.microsoft\.com|www\.w3\.org|purl\.org)\//;
const OWN_ORIGIN = /^https:\/\/localhost:3000(\/|$)/;
const OFFICE_JS = /^https:\/\/(appsforoffice\.microsoft\.com(\/lib\/1\/hosted\/office\.js)?|officeapis\.public\.onecdn\.static\.microsoft(\/1\/office\.js)?)$/;
const LIBRARY_NOTES = /^https?:\/\/(github\.com|raw\.github\.com|feross\.org|stuartk\.com|stuk\.github\.io|rolldown\.rs)(\/|$)/;
/** A script asking for a literal address: fetch, XMLHttpRequest.open, sendBeacon, WebSocket, EventSource, import(). */
const LITERAL_REQUEST = /(?:fetch|\.open|sendBeacon|WebSocket|EventSource|import)\s*\(\s*(?:["'`][A-Z]+["'`]\s*,\s*)?["'`]https?:\/\//;

function addresses(text: string): string[] {
  return [...text.matchAll(/https?:\/\/[^\s"'`<>()\\]+/g)].map((m) => m[0].replace(/[.,;]+$/, ''));
}

function disallowed(file: string, text: string): string[] {
  const isPage = /(^|[\\/])page[\\/]/.test(relative(ADDIN, file)) || /page-[\w-]+\.js$/.test(file);
  const isScript = /\.m?js$/.test(file);
  return addresses(text).filter((a) => !(OWN_ORIGIN.test(a) || NAMESPACE.test(a) || (!isPage && OFFICE_JS.test(a)) || (isScript && LIBRARY_NOTES.test(a))));
}

describe('built bundles', () => {
  for (const [label, dir] of [['dist/ (npm run build)', DIST], ['the add-in build', ADDIN]] as const) {
    const present = existsSync(dir) && walk(dir, (p) => /\.m?js$/.test(p)).length > 0;
    if (!present) console.info(`security: ${label} is not built here, so its scan is skipped; build it to run the check.`);
    it.skipIf(!present)(`${label}: no code is built from strings`, () => {
      const offenders: string[] = [];
      for (const f of walk(dir, (p) => /\.m?js$/.test(p))) {
        const text = readFileSync(f, 'utf8');
        const m = DYNAMIC_CODE.exec(text);
        if (m) offenders.push(`${relative(ROOT, f)}: …${text.slice(Math.max(0, m.index - 40), m.index + 40)}…`);
      }
      expect(offenders).toEqual([]);
    });
  }

  it('the add-in build: no address outside the add-in\'s own origin (allow-list in this file)', () => {
    const offenders: string[] = [];
    for (const f of walk(ADDIN, (p) => TEXT.test(p))) {
      for (const a of disallowed(f, readFileSync(f, 'utf8'))) offenders.push(`${relative(ADDIN, f)}: ${a}`);
    }
    expect([...new Set(offenders)]).toEqual([]);
  });

  it('the add-in build: no script requests a literal address', () => {
    const offenders: string[] = [];
    for (const f of walk(ADDIN, (p) => /\.m?js$/.test(p))) {
      const m = LITERAL_REQUEST.exec(readFileSync(f, 'utf8'));
      if (m) offenders.push(`${relative(ADDIN, f)}: ${m[0]}`);
    }
    expect(offenders).toEqual([]);
  });

  it('the add-in build: every page carries a Content-Security-Policy without unsafe-eval', () => {
    const pages = walk(ADDIN, (p) => /\.html$/i.test(p));
    expect(pages.length).toBeGreaterThan(0);
    for (const p of pages) checkCsp(p);
  });
});

function checkCsp(path: string): void {
  const html = readFileSync(path, 'utf8');
  const meta = /<meta\s+http-equiv=["']Content-Security-Policy["']\s+content=(?:"([^"]*)"|'([^']*)')/i.exec(html);
  expect(meta, `${relative(ROOT, path)} has no Content-Security-Policy meta tag`).not.toBeNull();
  const csp = meta![1] ?? meta![2];
  expect(csp).toMatch(/default-src 'self'/);
  expect(csp).toMatch(/object-src 'none'/);
  expect(csp).not.toMatch(/unsafe-eval/);
  expect(csp).not.toMatch(/(^|\s)\*(\s|;|$)/);
  if (/(^|[\\/])page[\\/]/.test(relative(ROOT, path))) expect(csp).not.toMatch(/microsoft\.com|\.microsoft(\s|;|$)/);
}

describe('add-in sources', () => {
  const pages = existsSync(join(ROOT, 'addin')) ? walk(join(ROOT, 'addin'), (p) => /\.html$/i.test(p)) : [];
  it.skipIf(pages.length === 0)(`every HTML page under addin/ carries a Content-Security-Policy (${pages.length} found)`, () => {
    for (const p of pages) checkCsp(p);
  });

  const manifest = join(ROOT, 'manifest', 'manifest.xml');
  it.skipIf(!existsSync(manifest))('the manifest asks for ReadWriteDocument only and points only at the add-in origin', () => {
    const xml = readFileSync(manifest, 'utf8');
    const permissions = [...xml.matchAll(/<Permissions>\s*([^<]*?)\s*<\/Permissions>/g)].map((m) => m[1]);
    expect(permissions).toEqual(['ReadWriteDocument']);
    const urls = [...xml.matchAll(/DefaultValue="(https?:[^"]+)"/g)].map((m) => m[1]);
    expect(urls.length).toBeGreaterThan(0);
    for (const u of urls) expect(u).toMatch(OWN_ORIGIN);
    for (const a of addresses(xml)) expect(OWN_ORIGIN.test(a) || NAMESPACE.test(a), a).toBe(true);
  });
});

describe('dependencies', () => {
  it('the lock file is committed, lockfileVersion ≥ 3, and pins every dependency to the version package.json names', () => {
    const tracked = execFileSync('git', ['ls-files', 'package-lock.json'], { cwd: ROOT, encoding: 'utf8' }).trim();
    expect(tracked).toBe('package-lock.json');
    const lock = JSON.parse(readFileSync(join(ROOT, 'package-lock.json'), 'utf8'));
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'));
    expect(lock.lockfileVersion).toBeGreaterThanOrEqual(3);
    for (const [name, version] of Object.entries({ ...pkg.dependencies, ...pkg.devDependencies } as Record<string, string>)) {
      expect(version, `${name} should be pinned exactly`).toMatch(/^\d+\.\d+\.\d+(-[0-9A-Za-z.]+)?$/);
      expect(lock.packages[`node_modules/${name}`]?.version, name).toBe(version);
    }
  });

  it('the production audit is recorded with a reason for every exception', () => {
    const notes = readFileSync(join(ROOT, 'test', 'security-audit.md'), 'utf8');
    expect(notes).toMatch(/npm audit --omit=dev/);
    expect(notes).toMatch(/^## Exceptions/m);
  });
});

describe('file system', () => {
  it('the engine (src/ outside cli/ and workbook/write-file.ts) imports no file-system module', () => {
    const files = walk(join(ROOT, 'src'), (p) => /\.ts$/.test(p)).filter((p) => !/[\\/]src[\\/]cli[\\/]/.test(p) && !/write-file\.ts$/.test(p));
    const offenders = files.filter((f) => /from\s+['"](node:)?fs(\/promises)?['"]|require\(['"](node:)?fs/.test(readFileSync(f, 'utf8')));
    expect(offenders.map((f) => relative(ROOT, f))).toEqual([]);
  });

  it('the command line with --out reads only the files named and writes only the --out file', () => {
    const inputs = mkdtempSync(join(tmpdir(), 'spillway-in-'));
    const outDir = mkdtempSync(join(tmpdir(), 'spillway-out-'));
    const cwd = mkdtempSync(join(tmpdir(), 'spillway-cwd-'));
    const traceDir = mkdtempSync(join(tmpdir(), 'spillway-trace-'));
    try {
      writeFileSync(join(inputs, 'districts.geojson'), gridFile('districts.geojson', undefined, { props: gridCodes() }).bytes);
      writeFileSync(join(inputs, 'table.csv'), gridCsv().bytes);
      writeFileSync(join(inputs, 'unrelated.csv'), 'not to be read\n');
      const log = join(traceDir, 'trace.log');
      const preload = join(traceDir, 'trace.cjs');
      writeFileSync(preload, TRACE_PRELOAD);
      const snapshot = () => Object.fromEntries([inputs, outDir, cwd].flatMap((d) => walk(d).map((f) => [f, hash(f)])));
      const before = snapshot();
      const out = join(outDir, 'results.xlsx');
      const r = spawnSync(process.execPath, ['--require', preload, join(ROOT, 'bin', 'spillway.mjs'), 'fit', '--boundary', join(inputs, 'districts.geojson'),
        '--data', join(inputs, 'table.csv'), '--id', 'code', '--y', 'y', '--x', 'x1,x2', '--models', 'ols', '--permutations', '0', '--out', out], {
        cwd, encoding: 'utf8', timeout: 120_000,
        env: { ...process.env, SPILLWAY_FROM_SOURCE: '1', SPILLWAY_TRACE_LOG: log, SPILLWAY_TRACE_DIRS: [inputs, outDir, cwd].join('\n') },
      });
      expect(r.stderr).toBe('');
      expect(r.status).toBe(0);
      const after = snapshot();
      // the inputs are untouched, the working folder stays empty, and the only new file is the output
      expect(Object.keys(after).filter((f) => !(f in before))).toEqual([out]);
      for (const [f, h] of Object.entries(before)) expect(after[f], f).toBe(h);
      const touched = readFileSync(log, 'utf8').trim().split('\n').filter(Boolean).map((l) => JSON.parse(l) as { op: string; path: string });
      const reads = new Set(touched.filter((t) => t.op === 'read').map((t) => t.path));
      expect([...reads].filter((p) => p.startsWith(inputs)).sort()).toEqual([join(inputs, 'districts.geojson'), join(inputs, 'table.csv')].sort());
      const writes = touched.filter((t) => t.op === 'write').map((t) => t.path);
      for (const w of writes) expect(w === out || (w.startsWith(join(outDir, '.results.xlsx.')) && w.endsWith('.part')), w).toBe(true);
      // Running from the TypeScript sources, the loader (tsx) looks for a tsconfig.json in the working
      // folder; that look belongs to the development loader, not to the command line, and is allowed.
      const inCwd = touched.filter((t) => t.path.startsWith(cwd) && !(t.op === 'look' && t.path === join(cwd, 'tsconfig.json')));
      expect(inCwd).toEqual([]);
    } finally {
      for (const d of [inputs, outDir, cwd, traceDir]) rmSync(d, { recursive: true, force: true });
    }
  });
});

function gridCodes() {
  return Array.from({ length: 16 }, (_, i) => ({ code: `D${String(i + 1).padStart(2, '0')}` }));
}

function hash(f: string): string {
  return createHash('sha256').update(readFileSync(f)).digest('hex') + ':' + statSync(f).size;
}

/**
 * Loaded with `node --require` before the command line: wraps the fs functions that read or write
 * by path, logs those under the watched folders, and re-syncs the ES module views of node:fs so
 * `import { readFileSync } from 'node:fs'` sees the wrappers.
 */
const TRACE_PRELOAD = String.raw`
const fs = require('node:fs');
const path = require('node:path');
const { syncBuiltinESMExports } = require('node:module');
const log = process.env.SPILLWAY_TRACE_LOG;
const dirs = (process.env.SPILLWAY_TRACE_DIRS || '').split('\n').filter(Boolean);
const append = fs.appendFileSync.bind(fs);
const note = (op, p) => {
  if (typeof p !== 'string' && !(p instanceof URL)) return;
  const abs = path.resolve(String(p instanceof URL ? p.pathname : p));
  if (dirs.some((d) => abs === d || abs.startsWith(d + path.sep))) append(log, JSON.stringify({ op, path: abs }) + '\n');
};
const wrap = (obj, name, op) => {
  const orig = obj[name];
  if (typeof orig !== 'function') return;
  obj[name] = function (p, ...rest) {
    let kind = op;
    if (kind === 'open') { const flags = String(rest[0] ?? 'r'); kind = /[wax+]/.test(flags) ? 'write' : 'read'; }
    note(kind, p);
    return orig.call(this, p, ...rest);
  };
};
for (const n of ['readFileSync', 'readFile', 'createReadStream']) wrap(fs, n, 'read');
for (const n of ['statSync', 'existsSync', 'readdirSync', 'lstatSync', 'stat', 'lstat', 'readdir']) wrap(fs, n, 'look');
for (const n of ['writeFileSync', 'writeFile', 'appendFile', 'createWriteStream', 'mkdirSync', 'mkdir', 'rmSync', 'unlinkSync', 'unlink']) wrap(fs, n, 'write');
for (const n of ['openSync', 'open']) wrap(fs, n, 'open');
for (const n of ['readFile']) wrap(fs.promises, n, 'read');
for (const n of ['stat', 'lstat', 'readdir', 'access']) wrap(fs.promises, n, 'look');
for (const n of ['writeFile', 'appendFile', 'mkdir', 'rm', 'unlink']) wrap(fs.promises, n, 'write');
wrap(fs.promises, 'open', 'open');
const rename = fs.promises.rename;
fs.promises.rename = function (a, b) { note('write', a); note('write', b); return rename.call(this, a, b); };
const renameSync = fs.renameSync;
fs.renameSync = function (a, b) { note('write', a); note('write', b); return renameSync.call(this, a, b); };
syncBuiltinESMExports();
`;
