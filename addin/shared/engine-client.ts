/** Talks to the engine worker: one call per job, progress callbacks, and cancel (which ends the worker). */
import type { EngineAnswer, EngineError, EngineJob, WorkerMessage } from './engine-protocol.js';
import { startEngineWorker } from './engine-worker.js';

export class EngineFailure extends Error {
  constructor(readonly detail: EngineError) {
    super(detail.message);
    this.name = 'EngineFailure';
  }
}

export class Cancelled extends Error {
  constructor() {
    super('Stopped.');
    this.name = 'Cancelled';
  }
}

type Pending = { resolve: (a: EngineAnswer) => void; reject: (e: Error) => void; onProgress?: (fraction: number, stage: string) => void };

export class EngineClient {
  private worker: Worker | null = null;
  private next = 1;
  private readonly pending = new Map<number, Pending>();

  private spawn(): Worker {
    const w = startEngineWorker();
    w.onmessage = (e: MessageEvent<WorkerMessage>) => {
      const m = e.data;
      const p = this.pending.get(m.id);
      if (!p) return;
      if (m.kind === 'progress') { p.onProgress?.(m.fraction, m.stage); return; }
      this.pending.delete(m.id);
      if (m.kind === 'done') p.resolve(m.answer);
      else p.reject(new EngineFailure(m.error));
    };
    w.onerror = (e) => {
      const error = new EngineFailure({ message: `The engine stopped unexpectedly: ${e.message || 'unknown error'}`, input: false });
      for (const p of this.pending.values()) p.reject(error);
      this.pending.clear();
      this.worker = null;
    };
    return w;
  }

  call<K extends EngineAnswer['op']>(job: EngineJob & { op: K }, onProgress?: Pending['onProgress']): Promise<Extract<EngineAnswer, { op: K }>> {
    this.worker ??= this.spawn();
    const id = this.next++;
    return new Promise((resolve, reject) => {
      this.pending.set(id, { resolve: resolve as (a: EngineAnswer) => void, reject, onProgress });
      this.worker!.postMessage({ id, job });
    });
  }

  /** Ends whatever the engine is doing; every open call fails with Cancelled. */
  cancel(): void {
    this.worker?.terminate();
    this.worker = null;
    for (const p of this.pending.values()) p.reject(new Cancelled());
    this.pending.clear();
  }
}
