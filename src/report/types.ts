/**
 * The report model: results laid out as sheet-shaped blocks, independent of any host.
 * The workbook writer, the CLI and the add-in's sidebar all read this.
 */

/** Numbers stay numbers; the writer maps the format to the host's own number format. */
export type Cell = number | string | boolean | null;

export type NumberFormat = 'integer' | 'decimal2' | 'decimal4' | 'scientific' | 'pvalue' | 'percent' | 'text';

export interface TableColumn {
  header: string;
  format?: NumberFormat;
  /** width in characters */
  width?: number;
}

export type Block =
  | { kind: 'title'; text: string }
  | { kind: 'paragraph'; text: string; style?: 'note' | 'caution' | 'interpretation' }
  | { kind: 'table'; title: string; columns: TableColumn[]; rows: Cell[][]; note?: string }
  | { kind: 'keyValues'; title: string; rows: [string, Cell, NumberFormat?][] }
  /** empty rows kept free for pictures placed over them */
  | { kind: 'space'; rows: number };

export interface ReportImage {
  name: string;
  /** PNG bytes; empty when no renderer was given (the SVG is then the only form). */
  png: Uint8Array;
  svg: string;
  widthPx: number;
  heightPx: number;
  /** 1-based row and column of the cell under the picture's top-left corner */
  anchor: { row: number; col: number };
  alt: string;
  /** how the picture was simplified to draw many areas (pictures/area-shapes.ts); absent when drawn plainly */
  drawingNote?: string;
}

export type SheetRole = 'overview' | 'model' | 'diagnostics' | 'impacts' | 'areas' | 'neighbours' | 'comparison' | 'local' | 'rates' | 'record';

export interface ReportSheet {
  /** base name, at most 31 characters; the writer makes it unique in the workbook */
  name: string;
  role: SheetRole;
  blocks: Block[];
  images?: ReportImage[];
  /** keep the first table's header in view while scrolling */
  freezeHeader?: boolean;
}

export interface Report {
  sheets: ReportSheet[];
}

/** Turns an SVG string into PNG bytes at the given pixel width (Node: resvg; the browser draws the SVG itself). */
export type PngRenderer = (svg: string, widthPx: number) => Uint8Array;

export interface BuildReportOptions {
  title?: string;
  renderPng?: PngRenderer;
  /** rows a sheet may hold before a long table goes on to another sheet (default: a worksheet's 1,048,576; lower in checks) */
  sheetRowLimit?: number;
}
