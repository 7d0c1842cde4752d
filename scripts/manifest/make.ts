/**
 * A manifest for an organisation's own host (its web server, or any https address that serves the
 * built add-in), from manifest/manifest.xml (the development manifest, which points at
 * https://localhost:3000/). Checked with the same offline rules as the development manifest
 * (scripts/manifest/rules.ts) before it is written.
 *
 *   npm run manifest -- --host https://example.org/spillway [--out file] [--id GUID] [--version 1.2.0.0]
 *
 * The add-in id is derived from the host (a name-based UUID, RFC 9562 version 5), so the manifest for
 * one host keeps its id from one release to the next and differs from the development manifest's;
 * --id sets it outright.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { checkManifest } from './rules.js';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const DEV_MANIFEST = join(ROOT, 'manifest/manifest.xml');
export const DEV_BASE = 'https://localhost:3000/';
/** our namespace for name-based ids (itself a random UUID, fixed once) */
const ID_NAMESPACE = '3b0f6c2e-9a41-4f7d-8e15-6c2d9b7a4e10';

export interface MakeOptions { host: string; id?: string; version?: string }

/** The host as a base address ending in "/"; throws a plain message for anything Office would not accept. */
export function normaliseHost(host: string): string {
  let url: URL;
  try {
    url = new URL(host);
  } catch {
    throw new Error(`"${host}" is not an address. Give the https address the built add-in is served from, e.g. https://example.org/spillway`);
  }
  if (url.protocol !== 'https:') throw new Error(`Office loads add-ins only over https; "${host}" is not an https address.`);
  if (url.search || url.hash) throw new Error(`The host address must not carry a query or a fragment ("${host}").`);
  if (url.username || url.password) throw new Error('The host address must not carry a user name or password.');
  return url.href.endsWith('/') ? url.href : `${url.href}/`;
}

/** RFC 9562 version 5 UUID of `name` in our namespace. */
export function nameBasedId(name: string): string {
  const ns = Buffer.from(ID_NAMESPACE.replace(/-/g, ''), 'hex');
  const hash = createHash('sha1').update(Buffer.concat([ns, Buffer.from(name, 'utf8')])).digest();
  hash[6] = (hash[6] & 0x0f) | 0x50;
  hash[8] = (hash[8] & 0x3f) | 0x80;
  const h = hash.subarray(0, 16).toString('hex');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`;
}

/** The manifest for `host`, and the problems the offline rules find in it (none: ready to deploy). */
export function makeManifest(template: string, opts: MakeOptions, file?: (path: string) => Uint8Array | undefined): { xml: string; base: string; problems: string[] } {
  const base = normaliseHost(opts.host);
  if (!template.includes(DEV_BASE)) throw new Error(`The development manifest no longer points at ${DEV_BASE}; update scripts/manifest/make.ts.`);
  const escaped = base.replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;');
  let xml = template.split(DEV_BASE).join(escaped);
  const id = opts.id ?? nameBasedId(base);
  xml = xml.replace(/<Id>[^<]*<\/Id>/, `<Id>${id}</Id>`);
  if (opts.version) xml = xml.replace(/<Version>[^<]*<\/Version>/, `<Version>${opts.version}</Version>`);
  xml = xml.replace(/<!--[^]*?-->/, `<!-- Spillway add-in manifest for ${base.replace(/--/g, '- -')}: made by npm run manifest from manifest/manifest.xml. -->`);
  return { xml, base, problems: checkManifest(xml, { base, file }) };
}

/** Files of the built add-in (dist-addin/), or of its public folder when it is not built. */
export function builtFile(path: string): Uint8Array | undefined {
  for (const dir of [join(ROOT, 'dist-addin'), join(ROOT, 'addin/public')]) {
    const p = join(dir, path);
    if (existsSync(p)) return new Uint8Array(readFileSync(p));
  }
  return undefined;
}

function argsOf(argv: string[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (let i = 0; i < argv.length; i++) {
    const m = /^--(host|out|id|version)(?:=(.*))?$/.exec(argv[i]);
    if (!m) throw new Error(`Unknown argument "${argv[i]}". Use --host URL, and optionally --out FILE, --id GUID, --version N.N.N.N.`);
    out[m[1]] = m[2] ?? argv[++i] ?? '';
  }
  return out;
}

function main() {
  const args = argsOf(process.argv.slice(2));
  if (!args.host) throw new Error('Give the https address the built add-in is served from: npm run manifest -- --host https://example.org/spillway');
  const { xml, base, problems } = makeManifest(readFileSync(DEV_MANIFEST, 'utf8'), { host: args.host, id: args.id, version: args.version }, builtFile);
  if (problems.length) throw new Error(`The manifest for ${base} breaks the manifest rules:\n  ${problems.join('\n  ')}`);
  const out = resolve(args.out ?? join(ROOT, 'dist-addin/manifest.xml'));
  mkdirSync(dirname(out), { recursive: true });
  writeFileSync(out, xml);
  console.log(`Wrote ${out}, for an add-in served from ${base}.
Next: copy the contents of dist-addin/ (npm run build:addin) to ${base}, with the headers the README lists
under "Deploying for your organisation", then give this manifest to your Microsoft 365 administrator.`);
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  try {
    main();
  } catch (e) {
    console.error(e instanceof Error ? e.message : String(e));
    process.exit(1);
  }
}
