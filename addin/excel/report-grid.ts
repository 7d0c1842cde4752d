/**
 * One report sheet as the rectangles Office.js writes in a single batch: values, number formats,
 * styled ranges, merged rows, wrapped and aligned cells, row heights and column widths. Pure (no
 * Office), so it is checked in Node. The layout is the report's own sheet plan (planSheet), the same
 * as the .xlsx writer's.
 */
import { cellFormat, planSheet, POINTS_PER_CHAR, type Cell, type NumberFormat, type PagePlan, type ReportSheet } from '../../src/report/index.js';
// The number-format table alone (src/workbook's index would pull exceljs into the task pane).

export type CellStyle = 'title' | 'blockTitle' | 'header' | 'group' | 'note' | 'caution';

export interface StyledRange {
  /** 0-based top-left cell and size */
  row: number;
  col: number;
  rows: number;
  cols: number;
  style: CellStyle;
}

export interface Rect { row: number; col: number; rows: number; cols: number }

export interface SheetGrid {
  rows: number;
  cols: number;
  values: (string | number | boolean | null)[][];
  formats: (string | null)[][];
  styles: StyledRange[];
  /** cells merged across columns (titles, paragraphs, notes, group headings, long values); they wrap */
  merges: { row: number; col: number; cols: number }[];
  /** cells whose text wraps without being merged */
  wraps: Rect[];
  /** cells aligned other than by default */
  aligns: (Rect & { horizontal: 'Left' | 'Right' | 'Center'; indent?: number; top?: boolean })[];
  /** 0-based row → height in points, for wrapped rows */
  rowHeights: Map<number, number>;
  /** width of each column in characters */
  columnWidths: number[];
  /** rows to keep in view while scrolling (0: none) */
  freezeRows: number;
  /** the printed page set-up (the plan's, as the .xlsx writer's) */
  page: PagePlan;
}

const DEFAULT_WIDTH = 12;
/** Excel's default row height in points. */
export const ROW_POINTS = 15;
export { POINTS_PER_CHAR };

function shown(value: Cell): string | number | boolean | null {
  if (value === null) return null;
  if (typeof value === 'number' && !Number.isFinite(value)) return null;
  return value;
}

const CASE = { left: 'Left', right: 'Right' } as const;

export function sheetGrid(sheet: ReportSheet): SheetGrid {
  const plan = planSheet(sheet);
  const columnWidths = plan.widths.length ? plan.widths : [DEFAULT_WIDTH];
  const cols = Math.max(columnWidths.length, 2);
  const rows = Math.max(plan.lastRow, 1);
  const values = Array.from({ length: rows }, () => new Array<string | number | boolean | null>(cols).fill(null));
  const formats = Array.from({ length: rows }, () => new Array<string | null>(cols).fill(null));
  const styles: StyledRange[] = [];
  const merges: SheetGrid['merges'] = [];
  const wraps: Rect[] = [];
  const aligns: SheetGrid['aligns'] = [];
  const rowHeights = new Map<number, number>();
  for (const [r, h] of plan.heights) if (r - 1 < rows) rowHeights.set(r - 1, h);
  let freezeRows = 0;

  const put = (r: number, c: number, v: Cell, format?: NumberFormat) => {
    const value = shown(v);
    values[r][c] = value;
    // as the .xlsx writer: numbers without a format show 4 decimals; whole counts in text columns show plainly
    if (typeof value === 'number') formats[r][c] = cellFormat(format, value);
    else if (typeof value === 'string') formats[r][c] = '@';
  };
  /** 0-based row: text merged across the plan's span, wrapped */
  const spanned = (r: number, text: string, style?: CellStyle) => {
    put(r, 0, text);
    if (plan.span > 1) merges.push({ row: r, col: 0, cols: plan.span });
    else wraps.push({ row: r, col: 0, rows: 1, cols: 1 });
    if (style) styles.push({ row: r, col: 0, rows: 1, cols: 1, style });
  };

  sheet.blocks.forEach((b, bi) => {
    const p = plan.blocks[bi];
    const top = plan.starts[bi] - 1;
    if (b.kind === 'title') spanned(top, b.text, 'title');
    else if (b.kind === 'paragraph') spanned(top, b.text, b.style === 'note' ? 'note' : b.style === 'caution' ? 'caution' : undefined);
    else if (b.kind === 'table' && p.kind === 'table') {
      spanned(top, b.title, 'blockTitle');
      for (const g of p.groups) {
        put(p.groupRow! - 1, g.col, g.text);
        if (g.cols > 1) merges.push({ row: p.groupRow! - 1, col: g.col, cols: g.cols });
        styles.push({ row: p.groupRow! - 1, col: g.col, rows: 1, cols: g.cols, style: 'group' });
        aligns.push({ row: p.groupRow! - 1, col: g.col, rows: 1, cols: g.cols, horizontal: 'Center' });
      }
      const h = p.headerRow - 1;
      b.columns.forEach((c, i) => put(h, i, c.header));
      styles.push({ row: h, col: 0, rows: 1, cols: b.columns.length, style: 'header' });
      b.rows.forEach((cells, r) => cells.forEach((v, i) => put(p.firstRow - 1 + r, i, v, b.columns[i]?.format)));
      b.columns.forEach((_, i) => {
        const indent = i > 0 && p.align[i] === 'left' && p.align[i - 1] === 'right' ? { indent: 1 } : {};
        if (p.wrap.some(Boolean) && b.rows.length) {
          // with wrapped text in the table, every cell starts at the top of its row; the header stays at the bottom
          aligns.push({ row: h, col: i, rows: 1, cols: 1, horizontal: CASE[p.align[i]], ...indent });
          aligns.push({ row: h + 1, col: i, rows: b.rows.length, cols: 1, horizontal: CASE[p.align[i]], ...indent, top: true });
        } else aligns.push({ row: h, col: i, rows: 1 + b.rows.length, cols: 1, horizontal: CASE[p.align[i]], ...indent });
        if (p.wrap[i] && b.rows.length) wraps.push({ row: p.firstRow - 1, col: i, rows: b.rows.length, cols: 1 });
      });
      if (b.note) spanned(p.noteRow! - 1, b.note, 'note');
      if (!freezeRows && bi === 0 && (sheet.freezeHeader || b.rows.length > 30)) freezeRows = p.headerRow;
    } else if (b.kind === 'keyValues' && p.kind === 'keyValues') {
      spanned(top, b.title, 'blockTitle');
      b.rows.forEach(([label, value, format], r) => {
        const rp = p.rows[r];
        put(rp.row - 1, 0, label);
        put(rp.row - 1, 1, value, format);
        if (rp.wrapLabel) wraps.push({ row: rp.row - 1, col: 0, rows: 1, cols: 1 });
        if (rp.valueCols > 1) merges.push({ row: rp.row - 1, col: 1, cols: rp.valueCols });
        else if (rp.wrapValue) wraps.push({ row: rp.row - 1, col: 1, rows: 1, cols: 1 });
        aligns.push({ row: rp.row - 1, col: 1, rows: 1, cols: 1, horizontal: CASE[rp.align] });
      });
    }
  });
  return { rows, cols, values, formats, styles, merges, wraps, aligns, rowHeights, columnWidths, freezeRows, page: plan.page };
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
