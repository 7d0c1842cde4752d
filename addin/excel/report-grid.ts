/**
 * One report sheet as the rectangles Office.js writes in a single batch: values, number formats,
 * styled ranges, merged paragraph rows, row heights and column widths. Pure (no Office), so it is
 * checked in Node. The layout is the report's own (layoutBlocks), the same as the .xlsx writer's.
 */
import { layoutBlocks, type Block, type Cell, type NumberFormat, type ReportSheet } from '../../src/report/index.js';
// The number-format table alone (src/workbook's index would pull exceljs into the task pane).
import { EXCEL_FORMAT } from '../../src/workbook/number-formats.js';

export type CellStyle = 'title' | 'blockTitle' | 'header' | 'note' | 'caution';

export interface StyledRange {
  /** 0-based top-left cell and size */
  row: number;
  col: number;
  rows: number;
  cols: number;
  style: CellStyle;
}

export interface SheetGrid {
  rows: number;
  cols: number;
  values: (string | number | boolean | null)[][];
  formats: (string | null)[][];
  styles: StyledRange[];
  /** paragraph rows merged across the first columns so the text wraps on a comfortable line */
  merges: { row: number; col: number; cols: number }[];
  /** 0-based row → height in points, for wrapped rows */
  rowHeights: Map<number, number>;
  /** width of each column in characters */
  columnWidths: number[];
  /** rows to keep in view while scrolling (0: none) */
  freezeRows: number;
}

const DEFAULT_WIDTH = 12;
const PARAGRAPH_CHARS = 110;
const MAX_PARAGRAPH_COLUMNS = 10;
/** Excel's default row height in points. */
export const ROW_POINTS = 15;
/** Points per character of column width (Calibri 11, approximately). */
export const POINTS_PER_CHAR = 5.6;

function widths(blocks: readonly Block[]): number[] {
  const w: number[] = [];
  const want = (col: number, width: number) => { w[col] = Math.max(w[col] ?? DEFAULT_WIDTH, width); };
  for (const b of blocks) {
    if (b.kind === 'table') b.columns.forEach((c, i) => want(i, c.width ?? Math.min(60, Math.max(DEFAULT_WIDTH, c.header.length + 2))));
    if (b.kind === 'keyValues') {
      want(0, Math.min(48, Math.max(b.title.length, ...b.rows.map((r) => r[0].length)) + 2));
      want(1, Math.min(60, Math.max(DEFAULT_WIDTH, ...b.rows.map((r) => (typeof r[1] === 'string' ? r[1].length + 2 : DEFAULT_WIDTH)))));
    }
  }
  for (let i = 0; i < w.length; i++) if (w[i] === undefined) w[i] = DEFAULT_WIDTH;
  return w.length ? w : [DEFAULT_WIDTH];
}

function lineCount(text: string, widthChars: number): number {
  return Math.max(1, Math.ceil(text.length / Math.max(10, widthChars * 1.05)));
}

function shown(value: Cell): string | number | boolean | null {
  if (value === null) return null;
  if (typeof value === 'number' && !Number.isFinite(value)) return null;
  return value;
}

export function sheetGrid(sheet: ReportSheet): SheetGrid {
  const columnWidths = widths(sheet.blocks);
  const { starts, lastRow } = layoutBlocks(sheet.blocks);
  const cols = Math.max(columnWidths.length, 2);
  const rows = Math.max(lastRow, 1);
  const values = Array.from({ length: rows }, () => new Array<string | number | boolean | null>(cols).fill(null));
  const formats = Array.from({ length: rows }, () => new Array<string | null>(cols).fill(null));
  const styles: StyledRange[] = [];
  const merges: SheetGrid['merges'] = [];
  const rowHeights = new Map<number, number>();
  let span = 0, paragraphWidth = 0;
  while (span < Math.min(MAX_PARAGRAPH_COLUMNS, cols) && paragraphWidth < PARAGRAPH_CHARS) paragraphWidth += columnWidths[span++] ?? DEFAULT_WIDTH;
  let freezeRows = 0;

  const put = (r: number, c: number, v: Cell, format?: NumberFormat) => {
    const value = shown(v);
    values[r][c] = value;
    // as the .xlsx writer: numbers without a format show 4 decimals; whole counts in text columns show plainly
    if (typeof value === 'number') formats[r][c] = format === undefined ? EXCEL_FORMAT.decimal4 : format === 'text' ? 'General' : EXCEL_FORMAT[format];
    else if (typeof value === 'string') formats[r][c] = '@';
  };
  const paragraph = (r: number, text: string, style?: CellStyle) => {
    put(r, 0, text);
    if (span > 1) merges.push({ row: r, col: 0, cols: span });
    rowHeights.set(r, lineCount(text, paragraphWidth) * ROW_POINTS + 3);
    if (style) styles.push({ row: r, col: 0, rows: 1, cols: 1, style });
  };

  sheet.blocks.forEach((b, bi) => {
    const top = starts[bi] - 1;
    switch (b.kind) {
      case 'title':
        put(top, 0, b.text);
        styles.push({ row: top, col: 0, rows: 1, cols: 1, style: 'title' });
        break;
      case 'paragraph':
        paragraph(top, b.text, b.style === 'note' ? 'note' : b.style === 'caution' ? 'caution' : undefined);
        break;
      case 'table':
        put(top, 0, b.title);
        styles.push({ row: top, col: 0, rows: 1, cols: 1, style: 'blockTitle' });
        b.columns.forEach((c, i) => put(top + 1, i, c.header));
        styles.push({ row: top + 1, col: 0, rows: 1, cols: b.columns.length, style: 'header' });
        b.rows.forEach((cells, r) => cells.forEach((v, i) => put(top + 2 + r, i, v, b.columns[i]?.format)));
        if (b.note) paragraph(top + 2 + b.rows.length, b.note, 'note');
        if (!freezeRows && bi === 0 && (sheet.freezeHeader || b.rows.length > 30)) freezeRows = top + 2;
        break;
      case 'keyValues':
        put(top, 0, b.title);
        styles.push({ row: top, col: 0, rows: 1, cols: 1, style: 'blockTitle' });
        b.rows.forEach(([label, value, format], r) => { put(top + 1 + r, 0, label); put(top + 1 + r, 1, value, format); });
        break;
    }
  });
  return { rows, cols, values, formats, styles, merges, rowHeights, columnWidths, freezeRows };
}

/** Distance in points from the top of the sheet to the top of 0-based `row`, given the grid's row heights. */
export function rowTop(grid: Pick<SheetGrid, 'rowHeights'>, row: number): number {
  let top = 0;
  for (let r = 0; r < row; r++) top += grid.rowHeights.get(r) ?? ROW_POINTS;
  return top;
}

/** Distance in points from the left edge to 0-based `col`. */
export function columnLeft(grid: Pick<SheetGrid, 'columnWidths'>, col: number): number {
  let left = 0;
  for (let c = 0; c < col; c++) left += (grid.columnWidths[c] ?? DEFAULT_WIDTH) * POINTS_PER_CHAR;
  return left;
}

/** A1-style column letters for a 0-based index: 0 → A, 26 → AA. */
export function columnName(index: number): string {
  let s = '';
  for (let n = index + 1; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
  return s;
}

/** A1 address of a 0-based cell, or of a block of cells. */
export function address(row: number, col: number, rows = 1, cols = 1): string {
  const a = `${columnName(col)}${row + 1}`;
  return rows === 1 && cols === 1 ? a : `${a}:${columnName(col + cols - 1)}${row + rows}`;
}
