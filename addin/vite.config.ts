/**
 * Builds and serves the add-in (task pane + cell functions) and the no-install browser page; the
 * cell functions' own script and metadata come from vite.functions.config.ts, run after this build.
 *   npm run build:addin   → dist-addin/
 *   npm run serve         → http://localhost:3000 (the browser page: no certificate, no sudo)
 *   npm run serve:excel   → https://localhost:3000 with the Office development certificate (mode "excel"; Excel
 *                           needs https, and the first time office-addin-dev-certs installs its certificate
 *                           authority, which may ask for an administrator's password)
 * Output paths the manifest names (taskpane/index.html, functions.js, functions.json, assets/icon-*.png)
 * carry no content hash so the manifest can point at them. The dev server answers every one of them
 * (functions.js too), with the headers a production host must send (README: "Deploying for your
 * organisation").
 */
import { defineConfig, type Plugin, type UserConfig } from 'vite';
import { fileURLToPath } from 'node:url';
import { dirname, resolve } from 'node:path';
import { functionMetadata, functionsScript } from './vite.functions.config.js';

const ROOT = dirname(fileURLToPath(import.meta.url));
const FUNCTIONS_ENTRY = resolve(ROOT, 'functions/register.ts');

/** The browser page sends nothing anywhere: every fetch, image and script comes from this origin. */
export const PAGE_CSP = [
  "default-src 'self'", "script-src 'self'", "style-src 'self'", "img-src 'self' data: blob:", "font-src 'self'",
  "connect-src 'self'", "worker-src 'self'", "object-src 'none'", "base-uri 'self'", "form-action 'none'",
].join('; ');

/**
 * Microsoft's hosts for Office.js: the current one, and the one its documentation announces as the new
 * CDN ("Referencing the Office JavaScript API library": https://officeapis.public.onecdn.static.microsoft/1/office.js,
 * part of the unified domain for Microsoft 365 apps and services). Office.js loads its own scripts,
 * makes requests and opens its own frames (its error frame among them) from the host it came from.
 */
export const OFFICE_JS_HOSTS = ['https://appsforoffice.microsoft.com', 'https://officeapis.public.onecdn.static.microsoft'] as const;

/** The task pane must also load Office.js from Microsoft's hosts (Office requires it), and nothing else from anywhere. */
export const TASKPANE_CSP = [
  "default-src 'self'", `script-src 'self' ${OFFICE_JS_HOSTS.join(' ')}`, "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:", "font-src 'self'", `connect-src 'self' ${OFFICE_JS_HOSTS.join(' ')}`, `frame-src ${OFFICE_JS_HOSTS.join(' ')}`,
  "worker-src 'self'", "object-src 'none'", "base-uri 'self'", "form-action 'none'",
].join('; ');

/**
 * Files Excel on the web fetches from its own origin (excel.officeapps.live.com and others), so they
 * need Access-Control-Allow-Origin: the cell functions' metadata (and their script, for hosts that
 * fetch it). Both are public and carry no credentials, so any origin may read them.
 */
export const CROSS_ORIGIN_PATHS = ['/functions.json', '/functions.js'] as const;

function allowCrossOrigin(url: string | undefined): boolean {
  const path = (url ?? '').split('?')[0];
  return (CROSS_ORIGIN_PATHS as readonly string[]).includes(path);
}

/** The dev server injects each CSS module as a <style> element; only there are inline styles let through. */
const DEV_PAGE_CSP = PAGE_CSP.replace("style-src 'self'", "style-src 'self' 'unsafe-inline'");

function cspFor(url: string, dev = false): string | undefined {
  if (url.startsWith('/page/') || url === '/page') return dev ? DEV_PAGE_CSP : PAGE_CSP;
  if (url.startsWith('/taskpane/') || url.startsWith('/help/')) return TASKPANE_CSP;
  return undefined;
}

/** functions.json in the dev server (the build writes it with functions.js: vite.functions.config.ts). */
function cellFunctionMetadata(): Plugin {
  return {
    name: 'spillway-cell-function-metadata',
    configureServer(server) {
      server.middlewares.use('/functions.json', (_req, res, next) => {
        functionMetadata().then((json) => { res.setHeader('Content-Type', 'application/json'); res.end(json); }, next);
      });
    },
  };
}

/**
 * functions.js in the dev server: the manifest's Script element names it, and the build has it, so the
 * dev server answers it too, as one self-contained classic script (bundled on first request, again
 * after a source file changes).
 */
function devFunctionsScript(): Plugin {
  const bundle = async (): Promise<string> => {
    const { build } = await import('vite');
    const result = await build({
      configFile: false, root: ROOT, logLevel: 'silent',
      resolve: { alias: [{ find: /^exceljs$/, replacement: 'exceljs/dist/exceljs.bare.js' }] },
      plugins: [noDynamicCode()],
      build: { write: false, minify: false, target: 'es2022', lib: { entry: FUNCTIONS_ENTRY, formats: ['iife'], name: 'spillwayFunctions', fileName: () => 'functions.js' } },
    });
    const output = (Array.isArray(result) ? result[0] : result) as { output: { code?: string }[] };
    return output.output[0].code ?? '';
  };
  return {
    name: 'spillway-dev-functions-script',
    apply: 'serve',
    configureServer(server) {
      let cached: Promise<string> | null = null;
      server.watcher.on('change', () => { cached = null; });
      server.middlewares.use('/functions.js', (_req, res, next) => {
        cached ??= bundle();
        cached.then((code) => { res.setHeader('Content-Type', 'text/javascript; charset=utf-8'); res.end(code); }, (e) => { cached = null; next(e); });
      });
    },
  };
}

/**
 * Content-Security-Policy as a response header too (the pages also carry it in a meta tag), and
 * Access-Control-Allow-Origin for the files Excel on the web fetches cross-origin.
 */
function securityHeaders(): Plugin {
  const use = (mw: { use: (fn: (req: { url?: string }, res: { setHeader(k: string, v: string): void }, next: () => void) => void) => void }, dev: boolean) =>
    mw.use((req, res, next) => {
      const csp = cspFor(req.url ?? '', dev);
      if (csp) res.setHeader('Content-Security-Policy', csp);
      res.setHeader('X-Content-Type-Options', 'nosniff');
      // a plain GET (no preflight), so the one header is all the browser needs
      if (allowCrossOrigin(req.url)) res.setHeader('Access-Control-Allow-Origin', '*');
      next();
    });
  return {
    name: 'spillway-security-headers',
    configureServer(server) { use(server.middlewares, true); },
    configurePreviewServer(server) { use(server.middlewares, false); },
    transformIndexHtml: {
      order: 'pre',
      handler(html, ctx) {
        return ctx.server ? html.replace(`content="${PAGE_CSP}"`, `content="${DEV_PAGE_CSP}"`) : html;
      },
    },
  };
}

/**
 * exceljs's browser build (we use the one without polyfills) keeps two dynamic-code fallbacks:
 * lodash's `Function('return this')()` global lookup (never reached in a browser, where `self`
 * exists) and a setImmediate shim that turns a string argument into code. We replace both with
 * plain code, then refuse any bundle that still builds code from strings, so the strict CSP
 * (no 'unsafe-eval') holds.
 */
const GLOBAL_LOOKUP = /Function\(\s*['"]return this['"]\s*\)\(\)/g;
const STRING_CALLBACK = /new Function\(\s*""\s*\+\s*(\w+)\s*\)/g;
const DYNAMIC_CODE = /(?<![\w$.])(?:new\s+)?Function\s*\(|(?<![\w$.])eval\s*\(/;

export function noDynamicCode(): Plugin {
  return {
    name: 'spillway-no-dynamic-code',
    transform(code, id) {
      if (!/exceljs[\\/]dist[\\/]exceljs\.bare(\.min)?\.js$/.test(id)) return null;
      const out = code
        .replace(GLOBAL_LOOKUP, 'globalThis')
        .replace(STRING_CALLBACK, '(function () { throw new TypeError("setImmediate needs a function"); })');
      return { code: out, map: null };
    },
    generateBundle(_options, bundle) {
      for (const [name, item] of Object.entries(bundle)) {
        if (item.type !== 'chunk') continue;
        const m = DYNAMIC_CODE.exec(item.code);
        if (m) {
          const at = item.code.slice(Math.max(0, m.index - 60), m.index + 60);
          this.error(`${name} builds code from a string (${JSON.stringify(at)}); the page's CSP forbids it.`);
        }
      }
    },
  };
}

/**
 * The files the dev server scans for libraries to pre-bundle before the first page is served: every
 * page, the cell functions and the engine worker (which no page imports statically). A library found
 * only later, when the worker first starts, would make the server re-bundle and reload the page,
 * losing the file the analyst had just chosen (test/e2e-dev-server.test.ts).
 */
export const SCANNED_ENTRIES = ['page/index.html', 'taskpane/index.html', 'help/index.html', 'functions/register.ts', 'shared/worker.ts'];

/** https with the Office development certificate, only when asked for (the Excel route); the page needs none. */
async function officeCertificate(): Promise<{ key: Buffer; cert: Buffer; ca: Buffer }> {
  try {
    const certs = await import('office-addin-dev-certs');
    return (await certs.getHttpsServerOptions()) as { key: Buffer; cert: Buffer; ca: Buffer };
  } catch (e) {
    throw new Error(`Could not set up the Office development certificate (${e instanceof Error ? e.message : String(e)}). ` +
      'Excel needs it; the browser page does not: `npm run serve` serves the page over plain http.');
  }
}

export default defineConfig(async ({ command, mode }): Promise<UserConfig> => {
  const https = command === 'serve' && mode === 'excel' ? await officeCertificate() : undefined;
  return {
    root: ROOT,
    base: '/',
    publicDir: resolve(ROOT, 'public'),
    logLevel: process.env.VITEST ? 'warn' : 'info',
    resolve: {
      alias: [{ find: /^exceljs$/, replacement: 'exceljs/dist/exceljs.bare.js' }],
    },
    plugins: [securityHeaders(), cellFunctionMetadata(), devFunctionsScript(), noDynamicCode(), functionsScript()],
    optimizeDeps: { entries: SCANNED_ENTRIES },
    worker: {
      format: 'es',
      plugins: () => [noDynamicCode()],
    },
    build: {
      outDir: process.env.SPILLWAY_ADDIN_OUT ?? resolve(ROOT, '..', 'dist-addin'),
      emptyOutDir: true,
      target: 'es2022',
      sourcemap: false,
      chunkSizeWarningLimit: 2500,
      rolldownOptions: {
        input: {
          taskpane: resolve(ROOT, 'taskpane/index.html'),
          page: resolve(ROOT, 'page/index.html'),
          help: resolve(ROOT, 'help/index.html'),
        },
        // functions.js is built on its own, as one classic script (functionsScript, vite.functions.config.ts)
        output: { entryFileNames: 'assets/[name]-[hash].js' },
      },
    },
    server: { port: 3000, strictPort: true, https, host: 'localhost' },
    preview: { port: 3000, strictPort: true, https, host: 'localhost' },
  };
});
