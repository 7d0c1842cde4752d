/**
 * The proxies of the Excel stand-in (test/helpers/fake-excel.ts): sheets, ranges, shapes, charts,
 * settings and custom XML parts. Each setter or method queues a command with the bytes it adds to the
 * request; each load queues a command whose result is delivered only when the response fits.
 */
/* eslint-disable @typescript-eslint/no-explicit-any */
import type { Context, FakeCell, FakeSheet } from './fake-excel.js';

export const REQUEST_LIMIT_BYTES = 5_000_000;
export const RESPONSE_LIMIT_BYTES = 5_000_000;
export const READ_CELL_LIMIT = 5_000_000;
/** The stand-in's allowance per queued command for Office's own request wrapping (action, object path). */
export const COMMAND_BYTES = 200;

export class FakeOfficeError extends Error {
  constructor(readonly code: string, message: string) {
    super(message);
    this.name = 'RichApi.Error';
  }
}

export interface Delivery { bytes: number; deliver(): void }
export interface Command { kind: string; sheet?: string; bytes: number; run(): Delivery | void }
export type Rect = { sheet: FakeSheet; row: number; col: number; rows: number; cols: number } | null;

/** UTF-8 length of a string, without building the bytes. */
export function utf8Bytes(s: string): number {
  let n = s.length;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c >= 0x80) n += c >= 0x800 && (c < 0xd800 || c > 0xdfff) ? 2 : 1;
  }
  return n;
}

export const jsonBytes = (value: unknown) => utf8Bytes(JSON.stringify(value) ?? '');

/** A load's result, delivered only when the whole response fits. */
export function delivery(value: unknown, deliver: () => void): Delivery {
  return { bytes: jsonBytes(value), deliver };
}

export function readCap(rect: NonNullable<Rect>): void {
  if (rect.rows * rect.cols > READ_CELL_LIMIT) {
    throw new FakeOfficeError('ResponsePayloadSizeLimitExceeded', `A range read is limited to ${READ_CELL_LIMIT} cells; this one has ${rect.rows * rect.cols}.`);
  }
}

function colIndex(letters: string): number {
  let n = 0;
  for (const ch of letters.toUpperCase()) n = n * 26 + (ch.charCodeAt(0) - 64);
  return n - 1;
}

export function parseAddress(a: string): { row: number; col: number; rows: number; cols: number } {
  const m = /^([A-Z]+)(\d+)(?::([A-Z]+)(\d+))?$/i.exec(a.replace(/^.*!/, '').replace(/\$/g, ''));
  if (!m) throw new FakeOfficeError('InvalidArgument', `The address ${a} is not valid.`);
  const row = Number(m[2]) - 1, col = colIndex(m[1]);
  const row2 = m[4] ? Number(m[4]) - 1 : row, col2 = m[3] ? colIndex(m[3]) : col;
  return { row, col, rows: row2 - row + 1, cols: col2 - col + 1 };
}

export function notLoaded(prop: string): FakeOfficeError {
  return new FakeOfficeError('PropertyNotLoaded',
    `The property '${prop}' is not available. Before reading the property's value, call the load method on the containing object and call "context.sync()" on the associated request context.`);
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

export class SheetProxy extends ClientObject {
  constructor(ctx: Context, private readonly resolve: () => FakeSheet | null, private readonly nullable = false, private readonly hint?: string) {
    super(ctx);
    if (nullable) ctx.enqueue('resolve', () => { const v = resolve() === null; return delivery(v, () => this.loaded.set('isNullObject', v)); });
  }
  target(): FakeSheet {
    const s = this.resolve();
    if (!s) throw new FakeOfficeError('ItemNotFound', 'The requested resource does not exist.');
    return s;
  }
  fill(props: string[]) { const s = this.target(); if (props.includes('name')) this.loaded.set('name', s.name); }
  get name(): string { return this.get('name'); }
  get isNullObject(): boolean { return this.nullable ? this.get('isNullObject') : false; }
  load(names?: string | string[]) {
    const props = this.props(names);
    this.ctx.enqueue('load', () => { const s = this.target(); return delivery(s.name, () => this.fill(props)); });
    return this;
  }
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
        ctx.enqueue('load', () => {
          const items = self.target().tables.map((t) => ({
            name: t.name,
            getRange: () => new RangeProxy(ctx, () => ({ sheet: self.target(), row: t.row, col: t.col, rows: t.rows, cols: t.cols })),
          }));
          return delivery(items.map((t) => t.name), () => loaded.set('items', items));
        });
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
        }, this.name_(), base64.length);
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
        return Object.assign(obj('', ['name', 'top', 'left', 'width', 'height']), {
          title: obj('title.', ['text']),
          legend: obj('legend.', ['visible']),
          axes: { categoryAxis: { title: obj('categoryAxis.title.', ['text']) }, valueAxis: { title: obj('valueAxis.title.', ['text']) } },
          series: { getItemAt: () => series },
        });
      },
    };
  }
  /** ExcelApi 1.9: orientation, zoom, margins and print titles; an older Excel has no such member */
  get pageLayout() {
    this.requires(9, 'pageLayout');
    const ctx = this.ctx, sheet = this.name_();
    const page = () => this.target().page;
    const o = {
      setPrintMargins: (unit: string, m: Record<string, number>) => {
        if (!['Points', 'Inches', 'Centimeters'].includes(unit)) throw new FakeOfficeError('InvalidArgument', `The margin unit ${unit} is not valid.`);
        ctx.enqueue('pageLayout', () => { page().margins = { unit, ...m }; }, sheet, jsonBytes(m));
      },
      setPrintTitleRows: (rows: string | RangeProxy) => {
        ctx.enqueue('pageLayout', () => {
          // the rows must be whole rows ("$3:$4"), as Office requires
          const text = typeof rows === 'string' ? rows : '';
          if (!/^\$?\d+:\$?\d+$/.test(text)) throw new FakeOfficeError('InvalidArgument', `The print title rows ${text || '(a range)'} do not span entire rows.`);
          page().printTitleRows = text;
        }, sheet, jsonBytes(rows));
      },
      setPrintTitleColumns: (cols: string | RangeProxy) => {
        ctx.enqueue('pageLayout', () => {
          // whole columns ("$A:$C"), as Office requires
          const text = typeof cols === 'string' ? cols : '';
          if (!/^\$?[A-Z]+:\$?[A-Z]+$/.test(text)) throw new FakeOfficeError('InvalidArgument', `The print title columns ${text || '(a range)'} do not span entire columns.`);
          page().printTitleColumns = text;
        }, sheet, jsonBytes(cols));
      },
    };
    return Object.defineProperties(o, {
      orientation: {
        set: (v: string) => ctx.enqueue('pageLayout', () => {
          if (v !== 'Portrait' && v !== 'Landscape') throw new FakeOfficeError('InvalidArgument', `The orientation ${v} is not valid.`);
          page().orientation = v;
        }, sheet, jsonBytes(v)),
        get: () => { throw notLoaded('orientation'); },
      },
      zoom: {
        set: (v: Record<string, number>) => ctx.enqueue('pageLayout', () => { page().zoom = { ...v }; }, sheet, jsonBytes(v)),
        get: () => { throw notLoaded('zoom'); },
      },
    });
  }
  /** ExcelApi 1.9: manual page breaks; add() breaks before the range's top-left cell */
  get horizontalPageBreaks() {
    this.requires(9, 'horizontalPageBreaks');
    return {
      add: (at: string | RangeProxy) => this.ctx.enqueue('pageBreak', () => {
        const row = typeof at === 'string' ? parseAddress(at).row : at.rect().row;
        this.target().page.breaksBefore.push(row + 1);
      }, this.name_()),
    };
  }
  private requires(minor: number, member: string) {
    if (this.ctx.excel.excelApi < minor) throw new FakeOfficeError('ApiNotFound', `Worksheet.${member} needs ExcelApi 1.${minor}; this Excel has 1.${this.ctx.excel.excelApi}.`);
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
      set(value) { ctx.enqueue(kind, () => { target[prefix + prop] = value; }, sheet, jsonBytes(value)); },
      get() { throw notLoaded(prefix + prop); },
    });
  }
  return o;
}

export class RangeProxy extends ClientObject {
  readonly format: any;
  constructor(ctx: Context, private readonly resolve: () => Rect, private readonly nullable = false, private readonly sheetHint?: string) {
    super(ctx);
    if (nullable) ctx.enqueue('resolve', () => { const v = resolve() === null; return delivery(v, () => this.loaded.set('isNullObject', v)); });
    const each = (apply: (c: FakeCell) => void) => () => {
      const r = this.rect();
      for (let i = 0; i < r.rows; i++) for (let j = 0; j < r.cols; j++) apply(r.sheet.cells.at(r.row + i, r.col + j));
    };
    const style = (field: keyof FakeCell) => ({ set: (v: any) => ctx.enqueue('format', each((c) => { (c as any)[field] = v; }), sheetHint, jsonBytes(v)) });
    const font = Object.defineProperties({}, { bold: style('bold'), italic: style('italic'), size: style('size'), color: style('color') });
    const fill = Object.defineProperties({}, { color: style('fill') });
    this.format = Object.defineProperties({ font, fill }, {
      wrapText: style('wrap'),
      verticalAlignment: { set: (v: string) => ctx.enqueue('format', () => {}, sheetHint, jsonBytes(v)) },
      horizontalAlignment: { set: (v: string) => ctx.enqueue('format', each((c) => { c.align = v; }), sheetHint, jsonBytes(v)) },
      indentLevel: { set: (v: number) => ctx.enqueue('format', () => {}, sheetHint, jsonBytes(v)) },
      columnWidth: { set: (w: number) => ctx.enqueue('format', () => { const r = this.rect(); for (let j = 0; j < r.cols; j++) r.sheet.columnWidths.set(r.col + j, w); }, sheetHint) },
      rowHeight: { set: (h: number) => ctx.enqueue('format', () => { const r = this.rect(); for (let i = 0; i < r.rows; i++) r.sheet.rowHeights.set(r.row + i, h); }, sheetHint) },
    });
  }
  rect(): NonNullable<Rect> {
    const r = this.resolve();
    if (!r) throw new FakeOfficeError('ItemNotFound', 'The range does not exist.');
    return r;
  }
  private setGrid(field: 'value' | 'format', grid: any[][]) {
    this.ctx.enqueue(field === 'value' ? 'values' : 'numberFormat', () => {
      const r = this.rect();
      if (!Array.isArray(grid) || grid.length !== r.rows || grid.some((row) => !Array.isArray(row) || row.length !== r.cols)) {
        throw new FakeOfficeError('InvalidArgument', "The number of rows or columns in the input array doesn't match the size or dimensions of the range.");
      }
      // null leaves a cell as it is (Office.js)
      grid.forEach((row, i) => row.forEach((v, j) => { if (v !== null) r.sheet.cells.at(r.row + i, r.col + j)[field] = v; }));
    }, this.sheetHint, jsonBytes(grid));
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
      const grid = (f: 'value' | 'format') => {
        readCap(r);
        return Array.from({ length: r.rows }, (_, i) => Array.from({ length: r.cols }, (_, j) => {
          const c = r.sheet.cells.get(r.row + i, r.col + j);
          return c ? c[f] : f === 'value' ? '' : 'General';
        }));
      };
      const all: Record<string, () => any> = {
        values: () => grid('value'), numberFormat: () => grid('format'), rowIndex: () => r.row, columnIndex: () => r.col,
        rowCount: () => r.rows, columnCount: () => r.cols, address: () => `${r.sheet.name}!${String.fromCharCode(65 + r.col)}${r.row + 1}`,
      };
      const got = new Map<string, any>();
      for (const p of props) if (all[p]) got.set(p, all[p]());
      return delivery([...got.values()], () => { for (const [k, v] of got) this.loaded.set(k, v); });
    });
    return this;
  }
  merge() { this.ctx.enqueue('merge', () => { const r = this.rect(); r.sheet.merges.push(`${r.row},${r.col},${r.rows},${r.cols}`); }, this.sheetHint); }
  select() { this.ctx.enqueue('select', () => { this.ctx.excel.active = this.rect().sheet.name; }); }
}

export class Settings {
  constructor(private readonly ctx: Context) {}
  add(k: string, value: any) { this.ctx.enqueue('setting', () => { this.ctx.excel.settings.set(k, value); }, undefined, jsonBytes([k, value])); }
  getItemOrNullObject(k: string) {
    const ctx = this.ctx;
    const loaded = new Map<string, any>();
    ctx.enqueue('resolve', () => { const v = !ctx.excel.settings.has(k); return delivery(v, () => loaded.set('isNullObject', v)); });
    return {
      get isNullObject() { if (!loaded.has('isNullObject')) throw notLoaded('isNullObject'); return loaded.get('isNullObject'); },
      get value() { if (!loaded.has('value')) throw notLoaded('value'); return loaded.get('value'); },
      load() {
        ctx.enqueue('load', () => {
          if (!ctx.excel.settings.has(k)) return;
          const v = ctx.excel.settings.get(k);
          return delivery(v, () => loaded.set('value', v));
        });
      },
    };
  }
}

export class XmlParts {
  constructor(private readonly ctx: Context) {}
  add(xml: string) {
    const ctx = this.ctx;
    let created: { id: string; xml: string } | null = null;
    ctx.enqueue('addXmlPart', () => { created = ctx.excel.newPart(xml); }, undefined, jsonBytes(xml));
    return {
      get id(): string { throw notLoaded('id'); },
      isNullObject: false,
      getXml: () => { throw new FakeOfficeError('NotImplemented', 'The stand-in reads a part only through getByNamespace.'); },
      delete: () => ctx.enqueue('deleteXmlPart', () => {
        const i = created ? ctx.excel.xmlParts.indexOf(created) : -1;
        if (i >= 0) ctx.excel.xmlParts.splice(i, 1);
      }),
    };
  }
  getByNamespace(ns: string) {
    const ctx = this.ctx;
    const loaded = new Map<string, any>();
    return {
      get items() { if (!loaded.has('items')) throw notLoaded('items'); return loaded.get('items'); },
      load() {
        ctx.enqueue('load', () => {
          const items = ctx.excel.xmlParts.filter((p) => p.xml.includes(`xmlns="${ns}"`)).map((p) => ({
            id: p.id,
            isNullObject: false,
            getXml: () => {
              const result = new Map<string, string>();
              ctx.enqueue('load', () => delivery(p.xml, () => result.set('value', p.xml)));
              return { get value() { if (!result.has('value')) throw notLoaded('value'); return result.get('value')!; } };
            },
            delete: () => ctx.enqueue('deleteXmlPart', () => { const i = ctx.excel.xmlParts.indexOf(p); if (i >= 0) ctx.excel.xmlParts.splice(i, 1); }),
          }));
          return delivery(items.map((p) => p.id), () => loaded.set('items', items));
        });
      },
    };
  }
}
