/**
 * An in-memory stand-in for the subset of the Excel JavaScript API in addin/excel/api.ts, keeping
 * Office.js's documented proxy semantics (learn.microsoft.com, "Application-specific API model"):
 * calls on proxies only queue commands; context.sync() runs the queue in order; a property is
 * readable only after load() and a sync, and reading it before throws PropertyNotLoaded, as Office
 * does; an *OrNullObject method gives an object whose isNullObject is known after the sync; a failing
 * command rejects sync() and the commands queued after it are not run (earlier ones stay applied,
 * Office batches are not transactions). Setting values whose size differs from the range's fails.
 *
 * It also keeps the limits Excel on the web enforces ("Resource limits and performance optimization
 * for Office Add-ins", Excel add-ins section; "Performance optimization using the Excel JavaScript
 * API", Payload size limit best practices):
 * - each request and each response is at most 5 MB (read here as 5,000,000 bytes, the stricter
 *   reading). A request is estimated as Office serialises it: the JSON of every value and number
 *   format set, every picture's base64 and every XML part, plus a fixed allowance per command; a
 *   response as the JSON of every property loaded. Over the limit, sync() rejects with
 *   RequestPayloadSizeLimitExceeded (nothing of the request is applied) or
 *   ResponsePayloadSizeLimitExceeded (nothing loaded is delivered);
 * - a range read (values or number formats) covers at most 5,000,000 cells. Office's error code for
 *   this case is not documented; the stand-in reports it as ResponsePayloadSizeLimitExceeded;
 * - cell-edit mode ("Delay execution while cell is being edited"): while the user edits a cell, a
 *   batch sent without `delayForCellEdit: true` fails with InvalidOperationInCellEditMode; one sent
 *   with it waits until the edit ends.
 */
/* eslint-disable @typescript-eslint/no-explicit-any */
import type { ContextLike, ExcelRunner, OfficeExcelRun } from '../../addin/excel/api.js';
import {
  COMMAND_BYTES, FakeOfficeError, REQUEST_LIMIT_BYTES, RESPONSE_LIMIT_BYTES, SheetProxy, Settings, XmlParts, delivery, notLoaded, parseAddress,
  type Command, type Rect,
} from './fake-excel-proxies.js';

export { COMMAND_BYTES, FakeOfficeError, READ_CELL_LIMIT, REQUEST_LIMIT_BYTES, RESPONSE_LIMIT_BYTES, parseAddress } from './fake-excel-proxies.js';

export interface FakeCell { value: any; format: any; bold?: boolean; italic?: boolean; size?: number; color?: string; fill?: string; wrap?: boolean; align?: string }

/** A sheet's cells, row by row (a row's cells in a plain array), so half a million rows stay small. */
export class CellStore {
  readonly rows = new Map<number, (FakeCell | undefined)[]>();
  get(row: number, col: number): FakeCell | undefined { return this.rows.get(row)?.[col]; }
  /** the cell, made blank first if it did not exist */
  at(row: number, col: number): FakeCell {
    let r = this.rows.get(row);
    if (!r) { r = []; this.rows.set(row, r); }
    return (r[col] ??= { value: '', format: 'General' });
  }
}

export interface FakeSheet {
  name: string;
  cells: CellStore;
  tables: { name: string; row: number; col: number; rows: number; cols: number }[];
  shapes: Record<string, any>[];
  charts: { type: string; source: { row: number; col: number; rows: number; cols: number }; seriesBy: string; props: Record<string, any>; trendlines: string[] }[];
  frozenRows: number;
  merges: string[];
  columnWidths: Map<number, number>;
  rowHeights: Map<number, number>;
  /** the printed page set-up (ExcelApi 1.9 pageLayout and horizontalPageBreaks); breaksBefore holds 1-based rows */
  page: { orientation?: string; zoom?: Record<string, number>; margins?: { unit: string } & Record<string, number | string>; printTitleRows?: string; printTitleColumns?: string; breaksBefore: number[] };
}

const blank = (v: any) => v === null || v === '' || v === undefined;

export class FakeExcel {
  readonly sheets = new Map<string, FakeSheet>();
  active = '';
  readonly settings = new Map<string, any>();
  readonly xmlParts: { id: string; xml: string }[] = [];
  /** syncs made by each Excel.run call, in order */
  readonly syncsPerRun: number[] = [];
  /** estimated bytes of every request and every response sent so far */
  readonly requestBytes: number[] = [];
  readonly responseBytes: number[] = [];
  /** run options of each Excel.run call */
  readonly runOptions: { delayForCellEdit?: boolean }[] = [];
  /** make a queued command fail, e.g. ({ kind, sheet }) => kind === 'addImage' */
  failWhen: ((c: { kind: string; sheet?: string }) => boolean) | null = null;
  /** called before each sync is processed with the number of syncs made so far (e.g. to start a cell edit) */
  beforeSync: ((syncs: number) => void) | null = null;
  /** the newest ExcelApi requirement set this Excel has, as its minor version (1.9 → 9); the page set-up needs 9 */
  excelApi = 17;
  /** Office.context.requirements.isSetSupported for this Excel */
  readonly isSetSupported = (name: string, version: string): boolean => name === 'ExcelApi' && Number(version.split('.')[1] ?? 0) <= this.excelApi;
  private nextPart = 1;
  private syncs = 0;
  private editing: { ended: Promise<void>; end: () => void } | null = null;

  addSheet(name: string, rows: any[][] = [], at = { row: 0, col: 0 }): FakeSheet {
    const sheet: FakeSheet = {
      name, cells: new CellStore(), tables: [], shapes: [], charts: [], frozenRows: 0, merges: [], columnWidths: new Map(), rowHeights: new Map(), page: { breaksBefore: [] },
    };
    rows.forEach((r, i) => r.forEach((v, j) => { if (!blank(v)) sheet.cells.at(at.row + i, at.col + j).value = v; }));
    this.sheets.set(name.toLowerCase(), sheet);
    if (!this.active) this.active = name;
    return sheet;
  }

  sheet(name: string): FakeSheet | undefined {
    return this.sheets.get(name.toLowerCase());
  }

  sheetNames(): string[] {
    return [...this.sheets.values()].map((s) => s.name);
  }

  cell(sheet: string, a1: string): FakeCell | undefined {
    const { row, col } = parseAddress(a1);
    return this.cellAt(sheet, row, col);
  }

  /** a cell by 0-based row and column */
  cellAt(sheet: string, row: number, col: number): FakeCell | undefined {
    return this.sheet(sheet)?.cells.get(row, col);
  }

  /** The user starts typing in a cell; batches without delayForCellEdit fail until endCellEdit(). */
  startCellEdit(): void {
    if (this.editing) return;
    let end = () => {};
    const ended = new Promise<void>((resolve) => { end = resolve; });
    this.editing = { ended, end };
  }

  endCellEdit(): void {
    const e = this.editing;
    this.editing = null;
    e?.end();
  }

  get cellEditing(): boolean { return this.editing !== null; }

  /**
   * Excel.run as Office offers it: run(batch) or run(options, batch), a fresh request context per
   * batch. Also usable where the adapter's ExcelRunner is expected (no options: no delay for a cell edit).
   */
  readonly run: OfficeExcelRun & ExcelRunner = (<T>(a: unknown, b?: unknown): Promise<T> => {
    const [options, batch] = typeof a === 'function'
      ? [{}, a as (c: ContextLike) => Promise<T>]
      : [(a ?? {}) as { delayForCellEdit?: boolean }, b as (c: ContextLike) => Promise<T>];
    this.runOptions.push({ ...options });
    const ctx = new Context(this, options.delayForCellEdit === true);
    this.syncsPerRun.push(0);
    const slot = this.syncsPerRun.length - 1;
    ctx.onSync = () => { this.syncsPerRun[slot]++; };
    return batch(ctx as unknown as ContextLike);
  }) as OfficeExcelRun & ExcelRunner;

  /** Before a request is processed: the cell-edit rule. */
  async gate(delay: boolean): Promise<void> {
    this.beforeSync?.(this.syncs);
    this.syncs++;
    while (this.editing) {
      if (!delay) {
        throw new FakeOfficeError('InvalidOperationInCellEditMode',
          "The operation isn't available while Excel is in Edit cell mode. Exit Edit mode by pressing Enter or Tab, or by selecting another cell, and try again.");
      }
      await this.editing.ended;
    }
  }

  usedRect(sheet: FakeSheet): Rect {
    let r0 = Infinity, c0 = Infinity, r1 = -1, c1 = -1;
    for (const [r, row] of sheet.cells.rows) {
      row.forEach((cell, c) => {
        if (!cell || blank(cell.value)) return;
        r0 = Math.min(r0, r); c0 = Math.min(c0, c); r1 = Math.max(r1, r); c1 = Math.max(c1, c);
      });
    }
    return r1 < 0 ? null : { sheet, row: r0, col: c0, rows: r1 - r0 + 1, cols: c1 - c0 + 1 };
  }

  newPart(xml: string) {
    const part = { id: `{part-${this.nextPart++}}`, xml };
    this.xmlParts.push(part);
    return part;
  }
}

export class Context {
  readonly queue: Command[] = [];
  onSync: () => void = () => {};
  readonly workbook: WorkbookProxy;
  constructor(readonly excel: FakeExcel, readonly delayForCellEdit: boolean) { this.workbook = new WorkbookProxy(this); }
  /** queues a command; `bytes` is what it adds to the request beyond the fixed allowance */
  enqueue(kind: string, run: Command['run'], sheet?: string, bytes = 0) { this.queue.push({ kind, sheet, run, bytes: COMMAND_BYTES + bytes }); }
  async sync(): Promise<void> {
    this.onSync();
    // a refused batch is gone: what was queued is not sent again by the next sync
    const commands = this.queue.splice(0);
    await this.excel.gate(this.delayForCellEdit);
    const request = commands.reduce((s, c) => s + c.bytes, COMMAND_BYTES);
    this.excel.requestBytes.push(request);
    if (request > REQUEST_LIMIT_BYTES) {
      throw new FakeOfficeError('RequestPayloadSizeLimitExceeded', `The request payload size (${request} bytes) has exceeded the limit of ${REQUEST_LIMIT_BYTES} bytes.`);
    }
    const deliveries: { bytes: number; deliver(): void }[] = [];
    for (const c of commands) {
      if (this.excel.failWhen?.({ kind: c.kind, sheet: c.sheet })) throw new FakeOfficeError('GeneralException', `The ${c.kind} request failed.`);
      const d = c.run();
      if (d) deliveries.push(d);
    }
    const response = deliveries.reduce((s, d) => s + d.bytes, 0);
    this.excel.responseBytes.push(response);
    if (response > RESPONSE_LIMIT_BYTES) {
      throw new FakeOfficeError('ResponsePayloadSizeLimitExceeded', `The response payload size (${response} bytes) has exceeded the limit of ${RESPONSE_LIMIT_BYTES} bytes.`);
    }
    for (const d of deliveries) d.deliver();
  }
}

class WorkbookProxy {
  readonly worksheets: SheetCollection;
  readonly settings: Settings;
  readonly customXmlParts: XmlParts;
  constructor(ctx: Context) {
    this.worksheets = new SheetCollection(ctx);
    this.settings = new Settings(ctx);
    this.customXmlParts = new XmlParts(ctx);
  }
}

class SheetCollection {
  private readonly loaded = new Map<string, any>();
  constructor(private readonly ctx: Context) {}
  get items(): SheetProxy[] {
    if (!this.loaded.has('items')) throw notLoaded('items');
    return this.loaded.get('items');
  }
  add(name?: string): SheetProxy {
    const x = this.ctx.excel;
    const chosen = name ?? `Sheet${x.sheets.size + 1}`;
    this.ctx.enqueue('addSheet', () => {
      if (x.sheet(chosen)) throw new FakeOfficeError('ItemAlreadyExists', `A sheet named ${chosen} already exists.`);
      x.addSheet(chosen);
    }, chosen, chosen.length);
    return new SheetProxy(this.ctx, () => x.sheet(chosen) ?? null, false, chosen);
  }
  getActiveWorksheet(): SheetProxy { return new SheetProxy(this.ctx, () => this.ctx.excel.sheet(this.ctx.excel.active) ?? null); }
  getItemOrNullObject(name: string): SheetProxy { return new SheetProxy(this.ctx, () => this.ctx.excel.sheet(name) ?? null, true, name); }
  load(names?: string | string[]) {
    const props = (Array.isArray(names) ? names : (names ?? '').split(',')).map((p) => p.trim().replace(/^items\//, '')).filter(Boolean);
    this.ctx.enqueue('load', () => {
      const items = [...this.ctx.excel.sheets.values()].map((s) => {
        const p = new SheetProxy(this.ctx, () => this.ctx.excel.sheet(s.name) ?? null);
        p.fill(props);
        return p;
      });
      return delivery(items.map((s) => s.name), () => this.loaded.set('items', items));
    });
    return this;
  }
}
