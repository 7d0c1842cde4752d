import type ExcelJS from 'exceljs';
import { cellFormat, planSheet, type Block, type Cell, type NumberFormat, type ReportSheet, type TablePlan } from '../report/index.js';
import { toBase64 } from './base64.js';

const FACE = { name: 'Calibri', family: 2 } as const;
const STYLE = {
  title: { ...FACE, bold: true, size: 14, color: { argb: 'FF1B4470' } },
  blockTitle: { ...FACE, bold: true, size: 11 },
  header: { ...FACE, bold: true, size: 11 },
  note: { ...FACE, italic: true, size: 11, color: { argb: 'FF555555' } },
  caution: { ...FACE, size: 11, color: { argb: 'FF8A3F0A' } },
} as const;

const HEADER_FILL: ExcelJS.Fill = { type: 'pattern', pattern: 'solid', fgColor: { argb: 'FFE6EDF4' } };

function put(cell: ExcelJS.Cell, value: Cell, format?: NumberFormat): void {
  if (value === null || (typeof value === 'number' && !Number.isFinite(value))) { cell.value = null; return; }
  cell.value = value;
  // integers asked as decimals still show as decimals; whole counts in 'text' columns show plainly
  if (typeof value === 'number') cell.numFmt = cellFormat(format, value);
}

type TableBlock = Extract<Block, { kind: 'table' }>;

/** Rows of a long table left for the caller to stream into the sheet after exceljs has written the rest. */
export interface DeferredRows {
  block: TableBlock;
  /** index in block.rows of the first row not written */
  from: number;
  /** 1-based sheet row where block.rows[from] belongs */
  firstRow: number;
  /** heights in points of the deferred rows that wrap (1-based sheet row → points) */
  heights?: Map<number, number>;
}

export interface WriteSheetOptions {
  /** how many of a table's rows to write here (default all); the rest are returned as deferred */
  rowsToWrite?: (block: TableBlock) => number;
}

/**
 * Writes one report sheet's blocks (one blank row between them), pictures, frozen header and page
 * set-up, all placed by the report's sheet plan (the same plan the add-in follows).
 * Every block keeps its place in the shared layout even when a long table's rows are deferred.
 */
export function writeSheet(wb: ExcelJS.Workbook, ws: ExcelJS.Worksheet, sheet: ReportSheet, opts: WriteSheetOptions = {}): DeferredRows[] {
  const deferred: DeferredRows[] = [];
  const plan = planSheet(sheet);
  plan.widths.forEach((w, i) => { ws.getColumn(i + 1).width = w; });
  const spanned = (row: number, text: string, font?: Partial<ExcelJS.Font>) => {
    if (plan.span > 1) ws.mergeCells(row, 1, row, plan.span);
    const c = ws.getCell(row, 1);
    c.value = text;
    if (font) c.font = font;
    c.alignment = { wrapText: true, vertical: 'top' };
  };
  let freezeAt = 0;

  sheet.blocks.forEach((b, bi) => {
    const p = plan.blocks[bi];
    const top = plan.starts[bi];
    if (b.kind === 'title') spanned(top, b.text, STYLE.title);
    else if (b.kind === 'paragraph') spanned(top, b.text, b.style === 'note' ? STYLE.note : b.style === 'caution' ? STYLE.caution : undefined);
    else if (b.kind === 'table' && p.kind === 'table') {
      spanned(top, b.title, STYLE.blockTitle);
      for (const g of p.groups) {
        if (g.cols > 1) ws.mergeCells(p.groupRow!, g.col + 1, p.groupRow!, g.col + g.cols);
        const c = ws.getCell(p.groupRow!, g.col + 1);
        c.value = g.text;
        c.font = STYLE.header;
        c.alignment = { horizontal: 'center', vertical: 'bottom', wrapText: true };
        c.border = { bottom: { style: 'thin', color: { argb: 'FF8899AA' } } };
      }
      const header = ws.getRow(p.headerRow);
      b.columns.forEach((col, i) => {
        const c = header.getCell(i + 1);
        c.value = col.header;
        c.font = STYLE.header;
        c.fill = HEADER_FILL;
        c.alignment = { wrapText: true, vertical: 'bottom', horizontal: p.align[i], ...(indented(p, i) ? { indent: 1 } : {}) };
        c.border = { bottom: { style: 'thin', color: { argb: 'FF8899AA' } } };
      });
      const written = Math.min(b.rows.length, opts.rowsToWrite?.(b) ?? b.rows.length);
      // in a table with wrapped text every cell starts at the top of its row, beside the first line
      const wraps = p.wrap.some(Boolean);
      for (let r = 0; r < written; r++) {
        const row = ws.getRow(p.firstRow + r);
        b.rows[r].forEach((v, i) => {
          const c = row.getCell(i + 1);
          put(c, v, b.columns[i]?.format);
          const text = typeof v === 'string';
          if (wraps || (text && indented(p, i))) {
            // an indent shows only on a cell aligned to a side
            c.alignment = { vertical: 'top', ...(text && p.wrap[i] ? { wrapText: true } : {}), ...(text && indented(p, i) ? { horizontal: 'left', indent: 1 } : {}) };
          }
        });
      }
      if (written < b.rows.length) {
        const heights = new Map<number, number>();
        for (let r = p.firstRow + written; r < p.firstRow + b.rows.length; r++) {
          const h = plan.heights.get(r);
          if (h !== undefined) { heights.set(r, h); plan.heights.delete(r); }
        }
        deferred.push({ block: b, from: written, firstRow: p.firstRow + written, ...(heights.size ? { heights } : {}) });
      }
      if (b.note) spanned(p.noteRow!, b.note, STYLE.note);
      if (!freezeAt && bi === 0 && (sheet.freezeHeader || b.rows.length > 30)) freezeAt = p.headerRow;
    } else if (b.kind === 'keyValues' && p.kind === 'keyValues') {
      spanned(top, b.title, STYLE.blockTitle);
      b.rows.forEach(([label, value, format], r) => {
        const rp = p.rows[r];
        const l = ws.getCell(rp.row, 1);
        l.value = label;
        l.alignment = { vertical: 'top', ...(rp.wrapLabel ? { wrapText: true } : {}) };
        if (rp.valueCols > 1) ws.mergeCells(rp.row, 2, rp.row, 1 + rp.valueCols);
        const c = ws.getCell(rp.row, 2);
        put(c, value, format);
        c.alignment = { horizontal: rp.align, vertical: 'top', ...(rp.wrapValue ? { wrapText: true } : {}) };
      });
    }
  });
  for (const [row, points] of plan.heights) ws.getRow(row).height = points;
  if (freezeAt) ws.views = [{ state: 'frozen', xSplit: 0, ySplit: freezeAt }];

  const page = plan.page;
  ws.pageSetup = {
    ...ws.pageSetup,
    orientation: page.orientation, fitToPage: true, fitToWidth: page.fitToPagesWide, fitToHeight: 0,
    margins: { ...page.margins },
    ...(page.titleRows ? { printTitlesRow: `${page.titleRows.first}:${page.titleRows.last}` } : {}),
    ...(page.titleColumns ? { printTitlesColumn: `${columnLetters(page.titleColumns.first)}:${columnLetters(page.titleColumns.last)}` } : {}),
  };
  for (const row of page.breaksBefore) if (row > 1) ws.getRow(row - 1).addPageBreak();

  for (const im of sheet.images ?? []) {
    // Excel cannot show the SVG form; a picture without PNG bytes is described in words only.
    const caption = plan.captions.find((c) => c.row === Math.max(1, im.anchor.row - 1));
    if (caption) spanned(caption.row, caption.text, STYLE.note);
    if (!im.png.length) continue;
    const id = wb.addImage({ base64: `data:image/png;base64,${toBase64(im.png)}`, extension: 'png' });
    ws.addImage(id, { tl: { col: im.anchor.col - 1, row: im.anchor.row - 1 }, ext: { width: im.widthPx, height: im.heightPx }, editAs: 'oneCell' });
  }
  return deferred;
}

/** Text columns after the first keep a little space from the numbers to their left. */
function indented(p: TablePlan, i: number): boolean {
  return i > 0 && p.align[i] === 'left' && p.align[i - 1] === 'right';
}

/** 1-based column number to its letters (1 → A, 27 → AA). */
function columnLetters(n: number): string {
  let out = '';
  for (let k = n; k > 0; k = Math.floor((k - 1) / 26)) out = String.fromCharCode(65 + ((k - 1) % 26)) + out;
  return out;
}
