/**
 * Starts the engine worker from code carried inside the page itself (the one-file page, which has no
 * files beside it): vite inlines the worker's bundle and starts it from a blob: URL. The one-file
 * build (vite.page.config.ts) puts this module in place of engine-worker.ts.
 */
import EngineWorker from './worker.ts?worker&inline';

export function startEngineWorker(): Worker {
  return new EngineWorker({ name: 'spillway-engine' });
}
