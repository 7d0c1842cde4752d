/**
 * Builds the cell functions on their own: `functions.js`, one self-contained classic script (no
 * imports, no chunks) that registers every SPILL function with CustomFunctions.associate when it runs,
 * and `functions.json`, the metadata custom-functions-metadata reads from the JSDoc of every file in
 * addin/functions/ that declares a @customfunction. The main build (vite.config.ts) runs this one
 * after its own, into the same folder; a test loads the script in Node as the shared runtime would.
 */
import { defineConfig, type Plugin, type UserConfig } from 'vite';
import { readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join, resolve } from 'node:path';

const ROOT = dirname(fileURLToPath(import.meta.url));
const FUNCTIONS_DIR = resolve(ROOT, 'functions');

/** The source files whose JSDoc declares cell functions, in name order. */
export function functionSources(): string[] {
  return readdirSync(FUNCTIONS_DIR)
    .filter((f) => f.endsWith('.ts') && readFileSync(join(FUNCTIONS_DIR, f), 'utf8').includes('@customfunction'))
    .sort()
    .map((f) => join(FUNCTIONS_DIR, f));
}

/** functions.json from the JSDoc (custom-functions-metadata). */
export async function functionMetadata(): Promise<string> {
  const { generateCustomFunctionsMetadata } = await import('custom-functions-metadata');
  const r = await generateCustomFunctionsMetadata(functionSources());
  if (r.errors.length) throw new Error(`cell function metadata: ${r.errors.join('; ')}`);
  return r.metadataJson;
}

const DYNAMIC_CODE = /(?<![\w$.])(?:new\s+)?Function\s*\(|(?<![\w$.])eval\s*\(/;

function metadataAndChecks(): Plugin {
  return {
    name: 'spillway-cell-functions',
    async generateBundle(_options, bundle) {
      for (const [name, item] of Object.entries(bundle)) {
        if (item.type === 'chunk' && DYNAMIC_CODE.test(item.code)) this.error(`${name} builds code from a string; the pages' CSP forbids it.`);
      }
      this.emitFile({ type: 'asset', fileName: 'functions.json', source: await functionMetadata() });
    },
  };
}

/** A plugin for the main build: builds the cell functions into the same folder once the rest is written. */
export function functionsScript(): Plugin {
  let outDir = '';
  return {
    name: 'spillway-functions-script',
    apply: 'build',
    configResolved(config) { outDir = config.build.outDir; },
    async closeBundle() {
      const { build } = await import('vite');
      await build({ configFile: fileURLToPath(import.meta.url), logLevel: 'warn', build: { outDir } });
    },
  };
}

export default defineConfig((): UserConfig => ({
  root: ROOT,
  publicDir: false,
  logLevel: process.env.VITEST ? 'warn' : 'info',
  plugins: [metadataAndChecks()],
  build: {
    outDir: process.env.SPILLWAY_ADDIN_OUT ?? resolve(ROOT, '..', 'dist-addin'),
    emptyOutDir: false,
    target: 'es2022',
    sourcemap: false,
    copyPublicDir: false,
    chunkSizeWarningLimit: 2500,
    lib: {
      entry: resolve(ROOT, 'functions/register.ts'),
      formats: ['iife'],
      name: 'SpillwayCellFunctions',
      fileName: () => 'functions.js',
    },
  },
}));
