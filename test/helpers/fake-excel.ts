/**
 * An in-memory stand-in for the subset of the Excel JavaScript API in addin/excel/api.ts, keeping
 * Office.js's documented proxy semantics (learn.microsoft.com, "Application-specific API model"):
 * calls on proxies only queue commands; context.sync() runs the queue in order; a property is
 * readable only after load() and a sync, and reading it before throws PropertyNotLoaded, as Office
 * does; an *OrNullObject method gives an object whose isNullObject is known after the sync; a failing
 * command rejects sync() and the commands queued after it are not run (earlier ones stay applied,
 * Office batches are not transactions). Setting values whose size differs from the range's fails.
 */
/* eslint-disable @typescript-eslint/no-explicit-any */
import type { ContextLike, ExcelRunner } from '../../addin/excel/api.js';

export class FakeOfficeError extends Error {
  constructor(readonly code: string, message: string) {
    super(message);
    this.name = 'RichApi.Error';
  }
}

export interface FakeCell { value: any; format: any; bold?: boolean; italic?: boolean; size?: number; color?: string; fill?: string; wrap?: boolean; align?: string }
export interface FakeSheet {
  name: string;
  cells: Map<string, FakeCell>;
  tables: { name: string; row: number; col: number; rows: number; cols: number }[];
  shapes: Record<string, any>[];
  charts: { type: string; source: { row: number; col: number; rows: number; cols: number }; seriesBy: string; props: Record<string, any>; trendlines: string[] }[];
  frozenRows: number;
  merges: string[];
  columnWidths: Map<number, number>;
  rowHeights: Map<number, number>;
}

interface Command { kind: string; sheet?: string; run(): void }
type Rect = { sheet: FakeSheet; row: number; col: number; rows: number; cols: number } | null;

const key = (r: number, c: number) => `${r},${c}`;

function colIndex(letters: string): number {
  let n = 0;
  for (const ch of letters.toUpperCase()) n = n * 26 + (ch.charCodeAt(0) - 64);
  return n - 1;
}

function parseAddress(a: string): { row: number; col: number; rows: number; cols: number } {
  const m = /^([A-Z]+)(\d+)(?::([A-Z]+)(\d+))?$/i.exec(a.replace(/^.*!/, '').replace(/\$/g, ''));
  if (!m) throw new FakeOfficeError('InvalidArgument', `The address ${a} is not valid.`);
  const row = Number(m[2]) - 1, col = colIndex(m[1]);
  const row2 = m[4] ? Number(m[4]) - 1 : row, col2 = m[3] ? colIndex(m[3]) : col;
  return { row, col, rows: row2 - row + 1, cols: col2 - col + 1 };
}

function notLoaded(prop: string): FakeOfficeError {
  return new FakeOfficeError('PropertyNotLoaded',
    `The property '${prop}' is not available. Before reading the property's value, call the load method on the containing object and call "context.sync()" on the associated request context.`);
}

export class FakeExcel {
  readonly sheets = new Map<string, FakeSheet>();
  active = '';
  readonly settings = new Map<string, any>();
  readonly xmlParts: { id: string; xml: string }[] = [];
  /** syncs made by each Excel.run call, in order */
  readonly syncsPerRun: number[] = [];
  /** make a queued command fail, e.g. ({ kind, sheet }) => kind === 'addImage' */
  failWhen: ((c: { kind: string; sheet?: string }) => boolean) | null = null;
  private nextPart = 1;

  addSheet(name: string, rows: any[][] = [], at = { row: 0, col: 0 }): FakeSheet {
    const sheet: FakeSheet = {
      name, cells: new Map(), tables: [], shapes: [], charts: [], frozenRows: 0, merges: [], columnWidths: new Map(), rowHeights: new Map(),
    };
    rows.forEach((r, i) => r.forEach((v, j) => { if (v !== null && v !== '') sheet.cells.set(key(at.row + i, at.col + j), { value: v, format: 'General' }); }));
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
    return this.sheet(sheet)?.cells.get(key(row, col));
  }

  /** Excel.run: a fresh request context per batch. */
  readonly run: ExcelRunner = async <T>(batch: (context: ContextLike) => Promise<T>): Promise<T> => {
    const ctx = new Context(this);
    this.syncsPerRun.push(0);
    const slot = this.syncsPerRun.length - 1;
    ctx.onSync = () => { this.syncsPerRun[slot]++; };
    return batch(ctx as unknown as ContextLike);
  };

  usedRect(sheet: FakeSheet): Rect {
    let r0 = Infinity, c0 = Infinity, r1 = -1, c1 = -1;
    for (const [k, cell] of sheet.cells) {
      if (cell.value === null || cell.value === '' || cell.value === undefined) continue;
      const [r, c] = k.split(',').map(Number);
      r0 = Math.min(r0, r); c0 = Math.min(c0, c); r1 = Math.max(r1, r); c1 = Math.max(c1, c);
    }
    return r1 < 0 ? null : { sheet, row: r0, col: c0, rows: r1 - r0 + 1, cols: c1 - c0 + 1 };
  }

  newPart(xml: string) {
    const part = { id: `{part-${this.nextPart++}}`, xml };
    this.xmlParts.push(part);
    return part;
  }
}

class Context {
  readonly queue: Command[] = [];
  onSync: () => void = () => {};
  readonly workbook: WorkbookProxy;
  constructor(readonly excel: FakeExcel) { this.workbook = new WorkbookProxy(this); }
  enqueue(kind: string, run: () => void, sheet?: string) { this.queue.push({ kind, sheet, run }); }
  async sync(): Promise<void> {
    this.onSync();
    const commands = this.queue.splice(0);
    for (const c of commands) {
      if (this.excel.failWhen?.({ kind: c.kind, sheet: c.sheet })) throw new FakeOfficeError('GeneralException', `The ${c.kind} request failed.`);
      c.run();
    }
  }
}

/** Base for proxies: loaded values live here only after load() + sync(). */
class ClientObject {
  protected readonly loaded = new Map<string, any>();
  constructor(protected readonly ctx: Context) {}
  protected get<T>(prop: string): T {
    if (!this.loaded.has(prop)) throw notLoaded(prop);
    return this.loaded.get(prop) as T;
  }
  protected props(names?: string | string[]): string[] {
    return (Array.isArray(names) ? names : (names ?? '').split(',')).map((s) => s.trim()).filter(Boolean);
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

class SheetCollection extends ClientObject {
  get items(): SheetProxy[] { return this.get('items'); }
  add(name?: string): SheetProxy {
    const x = this.ctx.excel;
    const chosen = name ?? `Sheet${x.sheets.size + 1}`;
    this.ctx.enqueue('addSheet', () => {
      if (x.sheet(chosen)) throw new FakeOfficeError('ItemAlreadyExists', `A sheet named ${chosen} already exists.`);
      x.addSheet(chosen);
    }, chosen);
    return new SheetProxy(this.ctx, () => x.sheet(chosen) ?? null, false, chosen);
  }
  getActiveWorksheet(): SheetProxy { return new SheetProxy(this.ctx, () => this.ctx.excel.sheet(this.ctx.excel.active) ?? null); }
  getItemOrNullObject(name: string): SheetProxy { return new SheetProxy(this.ctx, () => this.ctx.excel.sheet(name) ?? null, true, name); }
  load(names?: string | string[]) {
    const props = this.props(names).map((p) => p.replace(/^items\//, ''));
    this.ctx.enqueue('load', () => {
      this.loaded.set('items', [...this.ctx.excel.sheets.values()].map((s) => {
        const p = new SheetProxy(this.ctx, () => this.ctx.excel.sheet(s.name) ?? null);
        p.fill(props);
        return p;
      }));
    });
    return this;
  }
}

class SheetProxy extends ClientObject {
  constructor(ctx: Context, private readonly resolve: () => FakeSheet | null, private readonly nullable = false, private readonly hint?: string) {
    super(ctx);
    if (nullable) ctx.enqueue('resolve', () => this.loaded.set('isNullObject', resolve() === null));
  }
  target(): FakeSheet {
    const s = this.resolve();
    if (!s) throw new FakeOfficeError('ItemNotFound', 'The requested resource does not exist.');
    return s;
  }
  fill(props: string[]) { const s = this.target(); if (props.includes('name')) this.loaded.set('name', s.name); }
  get name(): string { return this.get('name'); }
  get isNullObject(): boolean { return this.nullable ? this.get('isNullObject') : false; }
  load(names?: string | string[]) { const props = this.props(names); this.ctx.enqueue('load', () => this.fill(props)); return this; }
  private tableCollection?: object;
  get tables(): any {
    this.tableCollection ??= this.makeTables();
    return this.tableCollection;
  }
  private makeTables() {
    const self = this, ctx = this.ctx;
    const loaded = new Map<string, any>();
    return {
      get items() { if (!loaded.has('items')) throw notLoaded('items'); return loaded.get('items'); },
      load() {
        ctx.enqueue('load', () => loaded.set('items', self.target().tables.map((t) => ({
          name: t.name,
          getRange: () => new RangeProxy(ctx, () => ({ sheet: self.target(), row: t.row, col: t.col, rows: t.rows, cols: t.cols })),
        }))));
      },
    };
  }
  get freezePanes() { return { freezeRows: (n = 1) => this.ctx.enqueue('freeze', () => { this.target().frozenRows = n; }, this.name_()) }; }
  get shapes() {
    return {
      addImage: (base64: string) => {
        const shape: Record<string, any> = { base64 };
        this.ctx.enqueue('addImage', () => {
          if (!/^[A-Za-z0-9+/]+=*$/.test(base64) || base64.startsWith('data:')) throw new FakeOfficeError('InvalidArgument', 'The image is not base64.');
          this.target().shapes.push(shape);
        }, this.name_());
        return writeOnly(this.ctx, 'shape', shape, this.name_(), '', ['name', 'altTextDescription', 'top', 'left', 'width', 'height']);
      },
    };
  }
  get charts() {
    return {
      add: (type: string, source: RangeProxy, seriesBy: string) => {
        const chart = { type, source: { row: 0, col: 0, rows: 0, cols: 0 }, seriesBy, props: {} as Record<string, any>, trendlines: [] as string[] };
        this.ctx.enqueue('addChart', () => {
          const r = source.rect();
          chart.source = { row: r.row, col: r.col, rows: r.rows, cols: r.cols };
          this.target().charts.push(chart);
        }, this.name_());
        const sheet = this.name_();
        const obj = (prefix: string, props: string[]) => writeOnly(this.ctx, 'chart', chart.props, sheet, prefix, props);
        const series = {
          trendlines: { add: (t = 'Linear') => this.ctx.enqueue('trendline', () => { chart.trendlines.push(t); }, sheet) },
        };
        Object.defineProperties(series, Object.getOwnPropertyDescriptors(obj('series0.', ['markerSize'])));
        const p = Object.assign(obj('', ['name', 'top', 'left', 'width', 'height']), {
          title: obj('title.', ['text']),
          legend: obj('legend.', ['visible']),
          axes: { categoryAxis: { title: obj('categoryAxis.title.', ['text']) }, valueAxis: { title: obj('valueAxis.title.', ['text']) } },
          series: { getItemAt: () => series },
        });
        return p;
      },
    };
  }
  /** the sheet's name as far as this proxy knows it, for failure rules */
  private name_(): string | undefined { return this.hint ?? this.resolve()?.name; }
  getRange(a1?: string): RangeProxy {
    return new RangeProxy(this.ctx, () => {
      const s = this.target();
      if (!a1) return this.ctx.excel.usedRect(s) ?? { sheet: s, row: 0, col: 0, rows: 1, cols: 1 };
      return { sheet: s, ...parseAddress(a1) };
    }, false, this.name_());
  }
  getRangeByIndexes(row: number, col: number, rows: number, cols: number): RangeProxy {
    return new RangeProxy(this.ctx, () => ({ sheet: this.target(), row, col, rows, cols }), false, this.name_());
  }
  getUsedRangeOrNullObject(): RangeProxy { return new RangeProxy(this.ctx, () => this.ctx.excel.usedRect(this.target()), true, this.name_()); }
  activate() { this.ctx.enqueue('activate', () => { this.ctx.excel.active = this.target().name; }); }
  delete() { this.ctx.enqueue('deleteSheet', () => { const s = this.target(); this.ctx.excel.sheets.delete(s.name.toLowerCase()); }); }
}

/** An object whose listed properties can be set (queued until sync) but not read without a load. */
function writeOnly(ctx: Context, kind: string, target: Record<string, any>, sheet: string | undefined, prefix: string, props: string[]): any {
  const o = {};
  for (const prop of props) {
    Object.defineProperty(o, prop, {
      enumerable: true,
      set(value) { ctx.enqueue(kind, () => { target[prefix + prop] = value; }, sheet); },
      get() { throw notLoaded(prefix + prop); },
    });
  }
  return o;
}

class RangeProxy extends ClientObject {
  readonly format: any;
  constructor(ctx: Context, private readonly resolve: () => Rect, private readonly nullable = false, private readonly sheetHint?: string) {
    super(ctx);
    if (nullable) ctx.enqueue('resolve', () => this.loaded.set('isNullObject', resolve() === null));
    const each = (apply: (c: FakeCell) => void) => () => {
      const r = this.rect();
      for (let i = 0; i < r.rows; i++) for (let j = 0; j < r.cols; j++) apply(this.cellAt(r, i, j));
    };
    const sheetName = () => sheetHint;
    const style = (field: keyof FakeCell) => ({ set: (v: any) => ctx.enqueue('format', each((c) => { (c as any)[field] = v; }), sheetName()) });
    const font = Object.defineProperties({}, { bold: style('bold'), italic: style('italic'), size: style('size'), color: style('color') });
    const fill = Object.defineProperties({}, { color: style('fill') });
    this.format = Object.defineProperties({ font, fill }, {
      wrapText: style('wrap'),
      verticalAlignment: { set: () => ctx.enqueue('format', () => {}, sheetName()) },
      horizontalAlignment: { set: (v: string) => ctx.enqueue('format', each((c) => { c.align = v; }), sheetName()) },
      indentLevel: { set: () => ctx.enqueue('format', () => {}, sheetName()) },
      columnWidth: { set: (w: number) => ctx.enqueue('format', () => { const r = this.rect(); for (let j = 0; j < r.cols; j++) r.sheet.columnWidths.set(r.col + j, w); }, sheetName()) },
      rowHeight: { set: (h: number) => ctx.enqueue('format', () => { const r = this.rect(); for (let i = 0; i < r.rows; i++) r.sheet.rowHeights.set(r.row + i, h); }, sheetName()) },
    });
  }
  rect(): NonNullable<Rect> {
    const r = this.resolve();
    if (!r) throw new FakeOfficeError('ItemNotFound', 'The range does not exist.');
    return r;
  }
  private cellAt(r: NonNullable<Rect>, i: number, j: number): FakeCell {
    const k = key(r.row + i, r.col + j);
    let c = r.sheet.cells.get(k);
    if (!c) { c = { value: '', format: 'General' }; r.sheet.cells.set(k, c); }
    return c;
  }
  private sheetName(): string | undefined { return this.sheetHint; }
  private setGrid(field: 'value' | 'format', grid: any[][]) {
    this.ctx.enqueue(field === 'value' ? 'values' : 'numberFormat', () => {
      const r = this.rect();
      if (!Array.isArray(grid) || grid.length !== r.rows || grid.some((row) => !Array.isArray(row) || row.length !== r.cols)) {
        throw new FakeOfficeError('InvalidArgument', "The number of rows or columns in the input array doesn't match the size or dimensions of the range.");
      }
      // null leaves a cell as it is (Office.js)
      grid.forEach((row, i) => row.forEach((v, j) => { if (v !== null) this.cellAt(r, i, j)[field] = v; }));
    }, this.sheetName());
  }
  set values(v: any[][]) { this.setGrid('value', v); }
  get values(): any[][] { return this.get('values'); }
  set numberFormat(v: any[][]) { this.setGrid('format', v); }
  get numberFormat(): any[][] { return this.get('numberFormat'); }
  get address(): string { return this.get('address'); }
  get rowIndex(): number { return this.get('rowIndex'); }
  get columnIndex(): number { return this.get('columnIndex'); }
  get rowCount(): number { return this.get('rowCount'); }
  get columnCount(): number { return this.get('columnCount'); }
  get isNullObject(): boolean { return this.nullable ? this.get('isNullObject') : false; }
  load(names?: string | string[]) {
    const props = this.props(names);
    this.ctx.enqueue('load', () => {
      const r = this.resolve();
      if (!r) return; // a null object loads nothing
      const grid = (f: 'value' | 'format') => Array.from({ length: r.rows }, (_, i) => Array.from({ length: r.cols }, (_, j) => {
        const c = r.sheet.cells.get(key(r.row + i, r.col + j));
        return c ? c[f] : f === 'value' ? '' : 'General';
      }));
      const all: Record<string, () => any> = {
        values: () => grid('value'), numberFormat: () => grid('format'), rowIndex: () => r.row, columnIndex: () => r.col,
        rowCount: () => r.rows, columnCount: () => r.cols, address: () => `${r.sheet.name}!${String.fromCharCode(65 + r.col)}${r.row + 1}`,
      };
      for (const p of props) if (all[p]) this.loaded.set(p, all[p]());
    });
    return this;
  }
  merge() { this.ctx.enqueue('merge', () => { const r = this.rect(); r.sheet.merges.push(`${r.row},${r.col},${r.rows},${r.cols}`); }, this.sheetName()); }
  select() { this.ctx.enqueue('select', () => { this.ctx.excel.active = this.rect().sheet.name; }); }
}

class Settings {
  constructor(private readonly ctx: Context) {}
  add(k: string, value: any) { this.ctx.enqueue('setting', () => { this.ctx.excel.settings.set(k, value); }); }
  getItemOrNullObject(k: string) {
    const ctx = this.ctx;
    const loaded = new Map<string, any>();
    ctx.enqueue('resolve', () => loaded.set('isNullObject', !ctx.excel.settings.has(k)));
    return {
      get isNullObject() { if (!loaded.has('isNullObject')) throw notLoaded('isNullObject'); return loaded.get('isNullObject'); },
      get value() { if (!loaded.has('value')) throw notLoaded('value'); return loaded.get('value'); },
      load() { ctx.enqueue('load', () => { if (ctx.excel.settings.has(k)) loaded.set('value', ctx.excel.settings.get(k)); }); },
    };
  }
}

class XmlParts {
  constructor(private readonly ctx: Context) {}
  add(xml: string) {
    this.ctx.enqueue('addXmlPart', () => { this.ctx.excel.newPart(xml); });
    return { id: '', isNullObject: false, getXml: () => ({ value: xml }), delete: () => {} };
  }
  getByNamespace(ns: string) {
    const ctx = this.ctx;
    const loaded = new Map<string, any>();
    return {
      get items() { if (!loaded.has('items')) throw notLoaded('items'); return loaded.get('items'); },
      load() {
        ctx.enqueue('load', () => loaded.set('items', ctx.excel.xmlParts.filter((p) => p.xml.includes(`xmlns="${ns}"`)).map((p) => ({
          id: p.id,
          isNullObject: false,
          getXml: () => {
            const result = new Map<string, string>();
            ctx.enqueue('load', () => result.set('value', p.xml));
            return { get value() { if (!result.has('value')) throw notLoaded('value'); return result.get('value')!; } };
          },
          delete: () => ctx.enqueue('deleteXmlPart', () => { const i = ctx.excel.xmlParts.indexOf(p); if (i >= 0) ctx.excel.xmlParts.splice(i, 1); }),
        }))));
      },
    };
  }
}
