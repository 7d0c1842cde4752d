/**
 * The command line's second thread for the sparse Cholesky factor: a Node worker that runs the
 * engine's `serveHelper` (src/linalg/sparse/helper-thread.ts). It is unreferenced, so it never
 * keeps the process alive; when it cannot start, the engine waits briefly and goes on alone.
 */
import { Worker } from 'node:worker_threads';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { HelperInit, StartHelperThread } from '../linalg/index.js';

export const startNodeHelper: StartHelperThread = (init: HelperInit): void => {
  const fromSource = fileURLToPath(import.meta.url).endsWith('.ts');
  const entry = new URL(`./helper-thread-entry.${fromSource ? 'ts' : 'js'}`, import.meta.url).href;
  // run from the TypeScript sources (tests, SPILLWAY_FROM_SOURCE), the worker registers tsx first
  const code = fromSource
    ? `import(${JSON.stringify(tsxApiUrl())}).then((m) => { m.register(); return import(${JSON.stringify(entry)}); })`
    : `import(${JSON.stringify(entry)})`;
  const worker = new Worker(code, { eval: true, workerData: init });
  worker.unref();
  worker.on('error', () => { /* the engine notices the helper never became ready and goes on alone */ });
};

/** tsx's ES-module API (its package exports name it; the CommonJS one cannot register hooks in a worker). */
function tsxApiUrl(): string {
  const manifest = createRequire(import.meta.url).resolve('tsx/package.json');
  const exportsMap = (JSON.parse(readFileSync(manifest, 'utf8')) as { exports: Record<string, { import: { default: string } }> }).exports;
  return pathToFileURL(join(dirname(manifest), exportsMap['./esm/api'].import.default)).href;
}
