/**
 * A second thread for the sparse Cholesky factor: it factors one group of subtrees of each split
 * (split.ts) while this thread factors the other, and solves one block of right-hand sides while
 * this thread solves another. The two share the factor panels, the store of update matrices and
 * the solve blocks through SharedArrayBuffers and meet through Atomics (wait / notify), so the
 * engine's calls stay synchronous. The engine never starts a thread itself: the platform hands it
 * a `StartHelperThread` (the command line: a Node worker, src/cli/helper-thread.ts) that runs
 * `serveHelper` on the init it is given. Atomics.wait is not allowed on a browser page's main
 * thread, so there no helper is offered.
 */
import type { SymbolicFactor } from './symbolic.js';
import { Multifrontal, NotPositiveDefiniteError, type FactorSplit, type NumericFactor } from './frontal.js';
import { choleskySolveBlock } from './solve.js';
import { lanczosExtremes, type LanczosExtremes } from './extremes.js';
import type { CsrMatrix } from '../csr.js';

/** Starts a thread that calls `serveHelper(init)`; provided by the platform. */
export type StartHelperThread = (init: HelperInit) => void;

export interface HelperInit {
  control: SharedArrayBuffer;
  numbers: SharedArrayBuffer;
  sym: SymbolicFactor;
  values: Float64Array;
  /** the pattern of S (with `values`), for the Lanczos run behind the admissible range */
  rowPtr: Int32Array;
  colIdx: Int32Array;
  lanczosOut: SharedArrayBuffer;
  split: FactorSplit;
  store: SharedArrayBuffer;
  panels: [SharedArrayBuffer, SharedArrayBuffer];
  /** right-hand sides and solutions of the helper's solve block (n × block doubles each) */
  solveIn: SharedArrayBuffer;
  solveOut: SharedArrayBuffer;
  block: number;
}

// control words
const SEQ = 0, DONE = 1, KIND = 2, BUFFER = 3, STATUS = 4, COLUMN = 5, COLUMNS = 6, READY = 7;
const FACTOR = 1, SOLVE = 2, STOP = 3, LANCZOS = 4;
// READY: 0 starting, 1 serving, 2 given up on by this thread (the helper then ends at once)
const STARTING = 0, SERVING = 1, GIVEN_UP = 2;
/** Longest Lanczos run the helper can report. */
const LANCZOS_MAX = 300;
/** How long this thread waits for a helper that has not come up before going on alone (ms). */
const START_WAIT = 20000;
const OK = 0, NOT_POSITIVE = 1, FAILED = 2;

/** The helper's side: waits for work, does it, reports, forever. */
export function serveHelper(init: HelperInit): void {
  const ctrl = new Int32Array(init.control);
  const num = new Float64Array(init.numbers);
  const engine = new Multifrontal(init.sym, init.values);
  const store = new Float64Array(init.store);
  const factors: NumericFactor[] = init.panels.map((b) => ({ panels: new Float64Array(b), panelPtr: engine.panelStart }));
  const solveIn = new Float64Array(init.solveIn), solveOut = new Float64Array(init.solveOut);
  const work = new Float64Array(init.sym.n * init.block);
  const s: CsrMatrix = { n: init.sym.n, rowPtr: init.rowPtr, colIdx: init.colIdx, values: init.values };
  const lanczosOut = new Float64Array(init.lanczosOut);
  if (Atomics.compareExchange(ctrl, READY, STARTING, SERVING) === GIVEN_UP) return;
  Atomics.notify(ctrl, READY);
  let seen = 0;
  for (;;) {
    Atomics.wait(ctrl, SEQ, seen);
    seen = Atomics.load(ctrl, SEQ);
    if (ctrl[KIND] === STOP) return;
    let status = OK;
    try {
      const factor = factors[ctrl[BUFFER]];
      if (ctrl[KIND] === FACTOR) num[1] = engine.factorGroup(num[0], init.split, 1, store, factor);
      else if (ctrl[KIND] === LANCZOS) {
        const ex = lanczosExtremes(s, num[0], ctrl[COLUMNS], num[1], ctrl[BUFFER] === 1);
        lanczosOut.set([ex.min, ex.max, ex.minResidual, ex.maxResidual, ex.steps], 0);
        lanczosOut.set(ex.alpha!.subarray(0, ex.steps), 8);
        lanczosOut.set(ex.beta!.subarray(0, ex.steps), 8 + LANCZOS_MAX);
      } else if (ctrl[KIND] === SOLVE) {
        const r = ctrl[COLUMNS];
        choleskySolveBlock(init.sym, factor, solveIn.subarray(0, init.sym.n * r), r, solveOut, work);
      }
    } catch (e) {
      status = e instanceof NotPositiveDefiniteError ? NOT_POSITIVE : FAILED;
      if (e instanceof NotPositiveDefiniteError) ctrl[COLUMN] = e.column;
    }
    ctrl[STATUS] = status;
    Atomics.store(ctrl, DONE, seen);
    Atomics.notify(ctrl, DONE);
  }
}

/** This thread's side. */
export class HelperThread {
  readonly factors: [NumericFactor, NumericFactor];
  /** the helper's solve block: fill `input` (n × columns, interleaved), read `output` */
  readonly input: Float64Array;
  readonly output: Float64Array;
  private readonly ctrl: Int32Array;
  private readonly num: Float64Array;
  private readonly store: Float64Array;
  private seq = 0;
  private usable = true;
  /** why the helper could not be started, if it could not */
  startError: string | null = null;

  private readonly lanczosOut: Float64Array;

  constructor(private readonly engine: Multifrontal, private readonly split: FactorSplit, s: CsrMatrix, start: StartHelperThread, readonly block: number) {
    const values = s.values;
    const sym = engine.sym;
    const shared = (doubles: number) => new SharedArrayBuffer(8 * Math.max(1, doubles));
    const init: HelperInit = {
      control: new SharedArrayBuffer(4 * 8),
      numbers: shared(2),
      sym,
      values,
      split,
      store: shared(split.storeSize),
      panels: [shared(engine.panelTotal), shared(engine.panelTotal)],
      rowPtr: s.rowPtr,
      colIdx: s.colIdx,
      lanczosOut: shared(8 + 2 * LANCZOS_MAX),
      solveIn: shared(sym.n * block),
      solveOut: shared(sym.n * block),
      block,
    };
    this.lanczosOut = new Float64Array(init.lanczosOut);
    this.ctrl = new Int32Array(init.control);
    this.num = new Float64Array(init.numbers);
    this.store = new Float64Array(init.store);
    this.factors = [
      { panels: new Float64Array(init.panels[0]), panelPtr: engine.panelStart.slice() },
      { panels: new Float64Array(init.panels[1]), panelPtr: engine.panelStart.slice() },
    ];
    this.input = new Float64Array(init.solveIn);
    this.output = new Float64Array(init.solveOut);
    try {
      start(init);
    } catch (e) {
      this.usable = false;
      this.startError = e instanceof Error ? e.message : String(e);
    }
  }

  /** False when the helper never came up (then everything runs on this thread). */
  available(): boolean {
    if (!this.usable) return false;
    if (Atomics.load(this.ctrl, READY) === SERVING) return true;
    // a worker starts in well under a second; past a generous wait, go on alone
    const deadline = performance.now() + START_WAIT;
    while (Atomics.load(this.ctrl, READY) === STARTING && performance.now() < deadline) Atomics.wait(this.ctrl, READY, STARTING, 200);
    if (Atomics.compareExchange(this.ctrl, READY, STARTING, GIVEN_UP) !== SERVING) this.usable = false;
    return this.usable;
  }

  /**
   * Starts the Lanczos run behind the admissible range on the helper (it need not be up yet: the
   * request waits for it); the returned function waits for the result, null when this thread must
   * run it itself.
   */
  startLanczos(seed: number, steps: number, tolerance: number, needMax: boolean): () => LanczosExtremes | null {
    if (!this.usable || steps > LANCZOS_MAX) return () => null;
    this.post(LANCZOS, () => {
      this.num[0] = seed;
      this.num[1] = tolerance;
      this.ctrl[COLUMNS] = steps;
      this.ctrl[BUFFER] = needMax ? 1 : 0;
    });
    let result: LanczosExtremes | null | undefined;
    return () => {
      if (result !== undefined) return result;
      if (!this.available() || this.finish() !== OK) return (result = null);
      const out = this.lanczosOut;
      const used = out[4];
      result = {
        min: out[0], max: out[1], minResidual: out[2], maxResidual: out[3], steps: used,
        alpha: out.slice(8, 8 + used), beta: out.slice(8 + LANCZOS_MAX, 8 + LANCZOS_MAX + used),
      };
      return result;
    };
  }

  /** ln|I − ρS| with the factor written into factors[buffer]. */
  factor(rho: number, buffer: 0 | 1): number {
    if (!this.available()) return this.engine.factor(rho, this.factors[buffer]);
    const keep = this.factors[buffer];
    this.post(FACTOR, () => {
      this.num[0] = rho;
      this.ctrl[BUFFER] = buffer;
    });
    let mine = 0;
    let failure: unknown = null;
    try {
      mine = this.engine.factorGroup(rho, this.split, 0, this.store, keep);
    } catch (e) {
      failure = e;
    }
    const status = this.finish(); // the shared buffers are free again only once the helper is done
    if (failure) throw failure;
    if (status === NOT_POSITIVE) throw new NotPositiveDefiniteError(this.ctrl[COLUMN]);
    if (status === FAILED) {
      this.usable = false;
      return this.engine.factor(rho, keep);
    }
    return mine + this.num[1] + this.engine.factorTop(rho, this.split, this.store, keep);
  }

  /**
   * Solves `b` (r columns) into `x` here and, at the same time, the first `helperColumns` columns
   * of `input` into `output` on the helper, both with factors[buffer].
   */
  solveTwo(buffer: 0 | 1, b: Float64Array, r: number, x: Float64Array, work: Float64Array, helperColumns: number): void {
    const factor = this.factors[buffer];
    const n = this.engine.sym.n;
    if (!this.available()) {
      choleskySolveBlock(this.engine.sym, factor, b.subarray(0, n * r), r, x, work);
      choleskySolveBlock(this.engine.sym, factor, this.input.subarray(0, n * helperColumns), helperColumns, this.output, work);
      return;
    }
    this.post(SOLVE, () => {
      this.ctrl[BUFFER] = buffer;
      this.ctrl[COLUMNS] = helperColumns;
    });
    let failure: unknown = null;
    try {
      choleskySolveBlock(this.engine.sym, factor, b.subarray(0, n * r), r, x, work);
    } catch (e) {
      failure = e;
    }
    const status = this.finish();
    if (failure) throw failure;
    if (status !== OK) {
      this.usable = false;
      choleskySolveBlock(this.engine.sym, factor, this.input.subarray(0, n * helperColumns), helperColumns, this.output, work);
    }
  }

  /** Ends the helper (its thread then exits); everything after runs on this thread. */
  stop(): void {
    if (!this.usable) return;
    this.usable = false;
    this.post(STOP, () => {});
  }

  /**
   * One request at a time: the one before must be done before this one's parameters are written
   * (the helper reads them when it starts on a request). Only a stop may be posted while the
   * helper is still starting with a request outstanding: it then ends without answering it.
   */
  private post(kind: number, parameters: () => void): void {
    if (this.outstanding && Atomics.load(this.ctrl, READY) === SERVING) this.finish();
    this.outstanding = true;
    parameters();
    this.ctrl[KIND] = kind;
    this.seq++;
    Atomics.store(this.ctrl, SEQ, this.seq);
    Atomics.notify(this.ctrl, SEQ);
  }

  private finish(): number {
    while (Atomics.load(this.ctrl, DONE) !== this.seq) Atomics.wait(this.ctrl, DONE, Atomics.load(this.ctrl, DONE), 1000);
    this.outstanding = false;
    return this.ctrl[STATUS];
  }

  private outstanding = false;
}
