/**
 * Excel.run for the adapter, safe while the analyst is typing in a cell. "Delay execution while cell
 * is being edited": a batch sent while a cell is being edited fails at once with
 * InvalidOperationInCellEditMode unless Excel.run is given `{ delayForCellEdit: true }`, in which case
 * Excel holds the batch until the edit ends. Runs last seconds to minutes, so the analyst will type.
 *
 * Where the option is available (ExcelApi 1.11, "Excel JavaScript API requirement set 1.11") it is
 * used. Elsewhere a batch refused for a cell edit is sent again every second until the edit ends, for
 * up to five minutes, when that is safe: before any of its syncs went through (nothing was changed),
 * or at any point for a batch its caller marks as repeatable (reads, and deletes that check first).
 * A writing batch refused half-way is passed on for its caller to undo (the adapter rewrites the
 * sheet it was on).
 */
import type { ContextLike, ExcelRunner, OfficeExcelRun } from './api.js';
import { isCellEditError } from './limits.js';

export interface RunnerOptions {
  /** pause between attempts (tests pass a fast one) */
  wait?: (ms: number) => Promise<void>;
  retryEveryMs?: number;
  patienceMs?: number;
}

export const CELL_EDIT_MESSAGE = 'Excel is editing a cell. Press Enter or Esc to finish editing, then try again.';

/** Office's requirement check (Office.context.requirements.isSetSupported). */
export type IsSetSupported = (name: string, version: string) => boolean;

/** Whether this Excel has the ExcelApi requirement set `version`; no answer (or a failing check) is no. */
export function hasExcelApi(isSetSupported: IsSetSupported | undefined, version: string): boolean {
  try {
    return isSetSupported?.('ExcelApi', version) === true;
  } catch {
    return false;
  }
}

/** Whether this Excel can hold a batch until a cell edit ends. */
export function canDelayForCellEdit(isSetSupported: IsSetSupported | undefined): boolean {
  return hasExcelApi(isSetSupported, '1.11');
}

/**
 * `delayForCellEdit`: whether Excel can hold batches; a function is asked at each run (Office's
 * requirement check is ready only after Office.onReady).
 */
export function excelRunner(run: OfficeExcelRun, delayForCellEdit: boolean | (() => boolean), opts: RunnerOptions = {}): ExcelRunner {
  const canDelay = typeof delayForCellEdit === 'function' ? delayForCellEdit : () => delayForCellEdit;
  const wait = opts.wait ?? ((ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms)));
  const every = opts.retryEveryMs ?? 1000;
  const patience = opts.patienceMs ?? 5 * 60_000;
  return async <T>(batch: (context: ContextLike) => Promise<T>, how?: { repeatable?: boolean }): Promise<T> => {
    if (canDelay()) return run({ delayForCellEdit: true }, batch);
    let waited = 0;
    for (;;) {
      let progressed = false;
      try {
        return await run((context) => batch({
          workbook: context.workbook,
          sync: async () => { await context.sync(); progressed = true; },
        }));
      } catch (e) {
        if (!isCellEditError(e) || (progressed && !how?.repeatable)) throw e;
        if (waited >= patience) throw Object.assign(new Error(CELL_EDIT_MESSAGE), { code: 'InvalidOperationInCellEditMode' });
        await wait(every);
        waited += every;
      }
    }
  };
}
