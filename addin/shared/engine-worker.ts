/** Starts the engine worker from its own script file beside the page (the served page and the task pane). */
export function startEngineWorker(): Worker {
  return new Worker(new URL('./worker.ts', import.meta.url), { type: 'module', name: 'spillway-engine' });
}
