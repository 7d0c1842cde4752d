import type ExcelJS from 'exceljs';
import { layoutBlocks, type Block, type Cell, type NumberFormat, type ReportSheet } from '../report/index.js';
import { EXCEL_FORMAT } from './number-formats.js';
import { toBase64 } from './base64.js';

/** Paragraphs wrap across the first columns up to about this many characters: a comfortable line. */
const PARAGRAPH_CHARS = 110;
const MAX_PARAGRAPH_COLUMNS = 10;
const DEFAULT_WIDTH = 12;
const LINE_POINTS = 15;

const FACE = { name: 'Calibri', family: 2 } as const;
const STYLE = {
  title: { ...FACE, bold: true, size: 14, color: { argb: 'FF1B4470' } },
  blockTitle: { ...FACE, bold: true, size: 11 },
  header: { ...FACE, bold: true, size: 11 },
  note: { ...FACE, italic: true, size: 11, color: { argb: 'FF555555' } },
  caution: { ...FACE, size: 11, color: { argb: 'FF8A3F0A' } },
} as const;

const HEADER_FILL: ExcelJS.Fill = { type: 'pattern', pattern: 'solid', fgColor: { argb: 'FFE6EDF4' } };

/** Column widths in characters: the widest asked for by any table, or enough for key-value labels. */
function columnWidths(blocks: readonly Block[]): number[] {
  const w: number[] = [];
  const want = (col: number, width: number) => { w[col] = Math.max(w[col] ?? DEFAULT_WIDTH, width); };
  for (const b of blocks) {
    if (b.kind === 'table') b.columns.forEach((c, i) => want(i, c.width ?? Math.min(60, Math.max(DEFAULT_WIDTH, c.header.length + 2))));
    if (b.kind === 'keyValues') {
      want(0, Math.min(48, Math.max(...b.rows.map((r) => r[0].length), b.title.length) + 2));
      // long text values overflow into the empty cells to their right, so the value column stays modest
      want(1, 16);
    }
  }
  for (let i = 0; i < w.length; i++) if (w[i] === undefined) w[i] = DEFAULT_WIDTH;
  return w;
}

function put(cell: ExcelJS.Cell, value: Cell, format?: NumberFormat): void {
  if (value === null || (typeof value === 'number' && !Number.isFinite(value))) { cell.value = null; return; }
  cell.value = value;
  if (typeof value === 'number') cell.numFmt = EXCEL_FORMAT[format && format !== 'text' ? format : 'decimal4'];
  // integers asked as decimals still show as decimals; whole counts in 'text' columns show plainly
  if (typeof value === 'number' && format === 'text') cell.numFmt = 'General';
}

function lines(text: string, widthChars: number): number {
  return Math.max(1, Math.ceil(text.length / Math.max(10, widthChars * 1.05)));
}

type TableBlock = Extract<Block, { kind: 'table' }>;

/** Rows of a long table left for the caller to stream into the sheet after exceljs has written the rest. */
export interface DeferredRows {
  block: TableBlock;
  /** index in block.rows of the first row not written */
  from: number;
  /** 1-based sheet row where block.rows[from] belongs */
  firstRow: number;
}

export interface WriteSheetOptions {
  /** how many of a table's rows to write here (default all); the rest are returned as deferred */
  rowsToWrite?: (block: TableBlock) => number;
}

/**
 * Writes one report sheet's blocks (one blank row between them), pictures and frozen header.
 * Every block keeps its place in the shared layout even when a long table's rows are deferred.
 */
export function writeSheet(wb: ExcelJS.Workbook, ws: ExcelJS.Worksheet, sheet: ReportSheet, opts: WriteSheetOptions = {}): DeferredRows[] {
  const deferred: DeferredRows[] = [];
  const widths = columnWidths(sheet.blocks);
  widths.forEach((w, i) => { ws.getColumn(i + 1).width = w; });
  let span = 0, paragraphWidth = 0;
  while (span < MAX_PARAGRAPH_COLUMNS && paragraphWidth < PARAGRAPH_CHARS) paragraphWidth += widths[span++] ?? DEFAULT_WIDTH;
  ws.pageSetup = { orientation: 'landscape', fitToPage: true, fitToWidth: 1, fitToHeight: 0 };
  const { starts } = layoutBlocks(sheet.blocks);
  let freezeAt = 0;

  sheet.blocks.forEach((b, bi) => {
    const top = starts[bi];
    switch (b.kind) {
      case 'title': {
        const c = ws.getCell(top, 1);
        c.value = b.text;
        c.font = STYLE.title;
        ws.getRow(top).height = 21;
        break;
      }
      case 'paragraph': {
        ws.mergeCells(top, 1, top, span);
        const c = ws.getCell(top, 1);
        c.value = b.text;
        c.alignment = { wrapText: true, vertical: 'top' };
        if (b.style === 'note') c.font = STYLE.note;
        if (b.style === 'caution') c.font = STYLE.caution;
        ws.getRow(top).height = lines(b.text, paragraphWidth) * LINE_POINTS + 3;
        break;
      }
      case 'table': {
        ws.getCell(top, 1).value = b.title;
        ws.getCell(top, 1).font = STYLE.blockTitle;
        const header = ws.getRow(top + 1);
        let headerLines = 1;
        b.columns.forEach((col, i) => {
          const c = header.getCell(i + 1);
          c.value = col.header;
          c.font = STYLE.header;
          c.fill = HEADER_FILL;
          c.alignment = { wrapText: true, vertical: 'bottom' };
          c.border = { bottom: { style: 'thin', color: { argb: 'FF8899AA' } } };
          headerLines = Math.max(headerLines, lines(col.header, widths[i] ?? DEFAULT_WIDTH));
        });
        header.height = headerLines * LINE_POINTS;
        const written = Math.min(b.rows.length, opts.rowsToWrite?.(b) ?? b.rows.length);
        for (let r = 0; r < written; r++) {
          const row = ws.getRow(top + 2 + r);
          b.rows[r].forEach((v, i) => put(row.getCell(i + 1), v, b.columns[i]?.format));
        }
        if (written < b.rows.length) deferred.push({ block: b, from: written, firstRow: top + 2 + written });
        if (b.note) {
          const nr = top + 2 + b.rows.length;
          ws.mergeCells(nr, 1, nr, span);
          const c = ws.getCell(nr, 1);
          c.value = b.note;
          c.font = STYLE.note;
          c.alignment = { wrapText: true, vertical: 'top' };
          ws.getRow(nr).height = lines(b.note, paragraphWidth) * LINE_POINTS + 3;
        }
        if (!freezeAt && bi === 0 && (sheet.freezeHeader || b.rows.length > 30)) freezeAt = top + 1;
        break;
      }
      case 'keyValues': {
        ws.getCell(top, 1).value = b.title;
        ws.getCell(top, 1).font = STYLE.blockTitle;
        b.rows.forEach(([label, value, format], r) => {
          ws.getCell(top + 1 + r, 1).value = label;
          put(ws.getCell(top + 1 + r, 2), value, format);
          ws.getCell(top + 1 + r, 2).alignment = { horizontal: 'left' };
        });
        break;
      }
    }
  });
  if (freezeAt) ws.views = [{ state: 'frozen', xSplit: 0, ySplit: freezeAt }];

  for (const im of sheet.images ?? []) {
    // Excel cannot show the SVG form; a picture without PNG bytes is described in words only.
    const caption = ws.getCell(Math.max(1, im.anchor.row - 1), im.anchor.col);
    caption.value = im.png.length ? `Picture: ${im.alt}` : `Picture not drawn here (no PNG renderer): ${im.alt}`;
    caption.font = STYLE.note;
    if (!im.png.length) continue;
    const id = wb.addImage({ base64: `data:image/png;base64,${toBase64(im.png)}`, extension: 'png' });
    ws.addImage(id, { tl: { col: im.anchor.col - 1, row: im.anchor.row - 1 }, ext: { width: im.widthPx, height: im.heightPx }, editAs: 'oneCell' });
  }
  return deferred;
}
