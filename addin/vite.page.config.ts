/**
 * `npm run build:page`: the browser page as ONE self-contained HTML file (dist-page/spillway.html)
 * that opens from disk (file://) with no server: its script, its styles, the engine worker (inlined
 * by vite and started from a blob: URL) and its icon are all inside the file. The page needs no fonts
 * of its own (it uses the system's). Its Content-Security-Policy allows the page's own inline script
 * and style by their SHA-256 hashes and nothing from anywhere else: every network request is refused
 * (connect-src 'none'; no http(s) source anywhere in the policy).
 * The served page (vite.config.ts) stays as it is.
 */
import { defineConfig, type Plugin, type UserConfig } from 'vite';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, resolve } from 'node:path';
import { noDynamicCode } from './vite.config.js';

const ROOT = dirname(fileURLToPath(import.meta.url));
export const PAGE_FILE = 'spillway.html';

const sha256 = (text: string) => `'sha256-${createHash('sha256').update(text, 'utf8').digest('base64')}'`;

/** The one-file page's policy, given the hashes of its inline script and style. */
export function oneFileCsp(scriptHash: string, styleHash: string): string {
  return [
    "default-src 'none'", `script-src ${scriptHash}`, `style-src ${styleHash}`, 'img-src data: blob:', 'font-src data:',
    "connect-src 'none'", 'worker-src blob:', "object-src 'none'", "base-uri 'none'", "form-action 'none'",
  ].join('; ');
}

/**
 * Text safe inside <script> or <style>: no "</script" (or "</style") that would end the element early,
 * and no "<!--" that would change how the browser finds its end. In the minified script these occur
 * only inside string, template or regular-expression literals, where \x3C is the same "<".
 */
function safeInside(tag: 'script' | 'style', text: string): string {
  if (tag === 'style') return text.replace(/<\/(style)/gi, '\\3C/$1');
  return text.replace(/<(\/script|!--)/gi, '\\x3C$1');
}

function oneFile(): Plugin {
  return {
    name: 'spillway-one-file-page',
    enforce: 'post',
    generateBundle(_options, bundle) {
      const html = Object.values(bundle).find((b) => b.type === 'asset' && b.fileName.endsWith('.html'));
      if (!html || html.type !== 'asset') this.error('the page HTML is missing from the bundle');
      const chunks = Object.values(bundle).filter((b) => b.type === 'chunk');
      if (chunks.length !== 1) this.error(`the one-file page must be one script; the build made ${chunks.length}: ${chunks.map((c) => c.fileName).join(', ')}`);
      const script = chunks[0].type === 'chunk' ? chunks[0].code : '';
      const css = Object.values(bundle).filter((b) => b.type === 'asset' && b.fileName.endsWith('.css')).map((b) => (b.type === 'asset' ? String(b.source) : '')).join('\n');
      const icon = `data:image/png;base64,${readFileSync(resolve(ROOT, 'public/assets/icon-32.png')).toString('base64')}`;
      const scriptText = safeInside('script', script);
      const styleText = safeInside('style', css);
      let page = String(html.source)
        .replace(/<script type="module"[^>]*src="[^"]*"[^>]*><\/script>\s*/g, '')
        .replace(/<link rel="stylesheet"[^>]*>\s*/g, '')
        .replace(/<link rel="modulepreload"[^>]*>\s*/g, '')
        .replace(/<link rel="icon" href="[^"]*"/, `<link rel="icon" href="${icon}"`)
        .replace(/<meta http-equiv="Content-Security-Policy" content="[^"]*"\s*\/?>/, `<meta http-equiv="Content-Security-Policy" content="${oneFileCsp(sha256(scriptText), sha256(styleText))}" />`);
      if (!page.includes(`content="default-src 'none'`)) this.error('the page has no Content-Security-Policy meta tag to replace');
      page = page.replace('</head>', () => `<style>${styleText}</style>\n</head>`).replace('</body>', () => `<script type="module">${scriptText}</script>\n</body>`);
      if (/\s(?:src|href)="(?!data:)[^"#]/.test(page)) this.error('the one-file page still points at another file');
      for (const name of Object.keys(bundle)) delete bundle[name];
      this.emitFile({ type: 'asset', fileName: PAGE_FILE, source: page });
    },
  };
}

export default defineConfig((): UserConfig => ({
  root: ROOT,
  base: './',
  publicDir: false,
  logLevel: process.env.VITEST ? 'warn' : 'info',
  resolve: {
    alias: [
      { find: /^exceljs$/, replacement: 'exceljs/dist/exceljs.bare.js' },
      // the engine worker comes from inside the page, not from a file beside it
      { find: /^\.\/engine-worker\.js$/, replacement: resolve(ROOT, 'shared/engine-worker-inline.ts') },
    ],
  },
  plugins: [noDynamicCode(), oneFile()],
  worker: {
    // a classic worker: started from a blob: URL, it imports nothing
    format: 'iife',
    plugins: () => [noDynamicCode()],
  },
  build: {
    outDir: process.env.SPILLWAY_PAGE_OUT ?? resolve(ROOT, '..', 'dist-page'),
    emptyOutDir: true,
    target: 'es2022',
    sourcemap: false,
    modulePreload: false,
    cssCodeSplit: false,
    assetsInlineLimit: () => true,
    chunkSizeWarningLimit: 5000,
    rolldownOptions: {
      // the worker's bundling is slow by nature here; no timing report in the build's output
      checks: { pluginTimings: false },
      input: { page: resolve(ROOT, 'page/index.html') },
      output: { codeSplitting: false },
    },
  },
}));
