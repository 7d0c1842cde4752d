/**
 * Reading and writing a rectangle of cells in row blocks sized by bytes, one context.sync() per block,
 * so no request or response comes near Excel on the web's 5 MB ("Payload size limit best practices";
 * limits.ts). Small commands (widths, styles, pictures) are counted too and synced when they add up.
 */
import { InputError } from '../../src/errors.js';
import type { ContextLike, WorksheetLike } from './api.js';
import { BLOCK_BYTES, COMMAND_BYTES, READ_CELL_LIMIT, isPayloadLimit, jsonBytes, PAYLOAD_LIMIT_TEXT } from './limits.js';

/** Counts what is queued on a context and syncs before the next command would take it past the block size. */
export class RequestBudget {
  private bytes = 0;
  syncs = 0;
  constructor(private readonly context: ContextLike, private readonly limit = BLOCK_BYTES) {}
  /** Call before queuing a command of about `bytes`; syncs first when the queue is full. */
  async room(bytes: number): Promise<void> {
    const need = bytes + COMMAND_BYTES;
    if (this.bytes > 0 && this.bytes + need > this.limit) await this.flush();
    this.bytes += need;
  }
  async flush(): Promise<void> {
    if (this.bytes === 0) return;
    this.bytes = 0;
    this.syncs++;
    await this.context.sync();
  }
}

/**
 * Writes `values` (and their number formats, first, so text stays text) at 0-based (top, left), in
 * row blocks of at most the budget's size, each sent with whatever else the budget has room for.
 * Rows must all have the same length.
 */
export async function writeRows(
  budget: RequestBudget, ws: WorksheetLike, top: number, left: number,
  values: readonly unknown[][], formats: readonly unknown[][],
): Promise<void> {
  const cols = values[0]?.length ?? 0;
  if (!cols) return;
  let start = 0, bytes = 0;
  const flush = async (end: number) => {
    if (end <= start) return;
    await budget.room(bytes);
    const range = ws.getRangeByIndexes(top + start, left, end - start, cols);
    range.numberFormat = formats.slice(start, end) as unknown[][];
    range.values = values.slice(start, end) as unknown[][];
    start = end;
    bytes = 0;
  };
  for (let r = 0; r < values.length; r++) {
    const row = jsonBytes(values[r]) + jsonBytes(formats[r]) + 2;
    if (bytes > 0 && bytes + row > BLOCK_BYTES) await flush(r);
    bytes += row;
  }
  await flush(values.length);
}

/** A first guess of bytes per cell as JSON, before the first block says better. */
const GUESS_CELL_BYTES = 24;

/**
 * Reads the values of `rows` × `cols` cells at 0-based (top, left) in row blocks: the first sized by
 * a guess, the next by the largest row seen so far; a block Excel refuses as too large is read again
 * in halves. A single row too large to send is bad input, named by its sheet row.
 */
export async function readRows(context: ContextLike, ws: WorksheetLike, top: number, left: number, rows: number, cols: number): Promise<unknown[][]> {
  const out: unknown[][] = [];
  const cap = Math.max(1, Math.floor(READ_CELL_LIMIT / Math.max(1, cols)));
  let next = Math.max(1, Math.min(cap, Math.floor(BLOCK_BYTES / (Math.max(1, cols) * GUESS_CELL_BYTES))));
  let widest = 0;
  for (let r = 0; r < rows;) {
    const n = Math.min(next, rows - r);
    const range = ws.getRangeByIndexes(top + r, left, n, cols);
    range.load('values');
    try {
      await context.sync();
    } catch (e) {
      if (!isPayloadLimit(e)) throw e;
      if (n === 1) {
        throw new InputError(`Row ${top + r + 1} of the sheet holds more than Excel can send in one piece (${PAYLOAD_LIMIT_TEXT}). Shorten the long texts in that row, or move them to another sheet.`);
      }
      next = Math.ceil(n / 2);
      continue;
    }
    const block = range.values;
    for (const row of block) {
      out.push(row);
      widest = Math.max(widest, jsonBytes(row) + 1);
    }
    next = Math.max(1, Math.min(cap, Math.floor(BLOCK_BYTES / Math.max(widest, 1))));
    r += n;
  }
  return out;
}
