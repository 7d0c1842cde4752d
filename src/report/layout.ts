import type { Block, NumberFormat, ReportSheet, TableColumn } from './types.js';
import { cellWidth, longestWordWidth, textWidth, wrappedLines, type TextWeight } from './text-fit.js';

type TableBlock = Extract<Block, { kind: 'table' }>;

/** True when a table has a row of group headings above its column headings. */
export function hasGroups(columns: readonly TableColumn[]): boolean {
  return columns.some((c) => c.group);
}

/** Rows a block takes on a sheet: shared by the report (to place pictures) and both sheet writers. */
export function blockHeight(block: Block): number {
  switch (block.kind) {
    case 'title':
    case 'paragraph':
      return 1;
    case 'table':
      return 2 + (hasGroups(block.columns) ? 1 : 0) + block.rows.length + (block.note ? 1 : 0);
    case 'keyValues':
      return 1 + block.rows.length;
    case 'space':
      return block.rows;
  }
}

/** Blank rows left between two blocks. */
export const BLOCK_GAP = 1;

/** 1-based first row of each block, and the last row used. Blocks start at row 1. */
export function layoutBlocks(blocks: readonly Block[]): { starts: number[]; lastRow: number } {
  const starts: number[] = [];
  let row = 1;
  for (const b of blocks) {
    starts.push(row);
    row += blockHeight(b) + BLOCK_GAP;
  }
  return { starts, lastRow: blocks.length ? row - 1 - BLOCK_GAP : 0 };
}

/** Default row height in pixels (15 points), used to stack pictures below the blocks. */
export const ROW_HEIGHT_PX = 20;
/** Height of one line of 11-point text, in points. */
export const LINE_POINTS = 15;
export const DEFAULT_WIDTH = 12;
/** Points per unit of column width (Calibri 11: about 7 pixels a digit plus the cell's padding). */
export const POINTS_PER_CHAR = 5.25;

/** Paragraphs, titles and notes are merged across columns to about this width: a comfortable line. */
const PARAGRAPH_MIN = 80;
const PARAGRAPH_MAX = 120;
/** Text columns widen to their longest word up to this many units (longer text wraps). */
const TEXT_COLUMN_MAX = 40;
/** Labels of key-value blocks wrap beyond this width. */
const LABEL_MAX = 36;
/** The narrowest column a table may ask for. */
const MIN_WIDTH = 4;
/** A long text value of a key-value block is merged across columns up to about this width, then wraps. */
const VALUE_MAX = 90;
/** Tables longer than this repeat their header on every printed page and may break across pages. */
export const LONG_TABLE_ROWS = 40;

/** Printed margins in inches: half an inch at the sides (the printable width below assumes it). */
/** Text that is a figure or two: "3 and 146", "−1.85 to 1.00". */
const FIGURE_TEXT = /^[-−]?[\d.,]+(?: (?:and|to) [-−]?[\d.,]+)?$/;

/** Below this print scale (about 7 pt from 11 pt type) a wide long table is printed across pages instead. */
export const MIN_PRINT_SCALE = 0.6;
/** The scale such a table is spread to: about 8 pt type. */
const COMFORTABLE_PRINT_SCALE = 0.75;

export const PAGE_MARGINS = { left: 0.5, right: 0.5, top: 0.6, bottom: 0.6, header: 0.3, footer: 0.3 } as const;

/** Printable area of an A4 or Letter page (whichever is smaller) with half-inch side margins, in points. */
const PAGE = { portrait: { width: 523, height: 720 }, landscape: { width: 720, height: 505 } } as const;

export type Align = 'left' | 'right';

export interface TablePlan {
  kind: 'table';
  titleRow: number;
  /** row of the group headings, when the table has them */
  groupRow?: number;
  /** group headings: first column (0-based), number of columns, text */
  groups: { col: number; cols: number; text: string }[];
  headerRow: number;
  firstRow: number;
  noteRow?: number;
  /** per column: alignment of its header and cells */
  align: Align[];
  /** per column: its text cells wrap (some are longer than the column is wide) */
  wrap: boolean[];
}

export interface KeyValuesPlan {
  kind: 'keyValues';
  titleRow: number;
  rows: {
    row: number;
    /** columns the value is merged across (1: the value column alone) */
    valueCols: number;
    wrapValue: boolean;
    wrapLabel: boolean;
    align: Align;
  }[];
}

export type BlockPlan = TablePlan | KeyValuesPlan | { kind: 'title' | 'paragraph' | 'space'; row: number };

export interface PagePlan {
  orientation: 'portrait' | 'landscape';
  /**
   * printed this many pages wide (one, unless one page wide would shrink the print below MIN_PRINT_SCALE:
   * then a wide long table, the per-area table of many models, goes on across pages with its key columns
   * repeated) and as many pages tall as the rows need
   */
  fitToPagesWide: number;
  /** columns repeated at the left of every printed page when the sheet is printed more than one page wide (1-based) */
  titleColumns?: { first: number; last: number };
  /** in inches */
  margins: typeof PAGE_MARGINS;
  /** rows repeated at the top of every printed page: the first long table's headings */
  titleRows?: { first: number; last: number };
  /** rows that begin a new printed page, so that no picture or short block is split by a page break */
  breaksBefore: number[];
  /** estimated print scale when the sheet is fitted to its pages wide */
  scale: number;
}

/** Everything a sheet writer needs besides the values: one layout for the .xlsx writer and the add-in. */
export interface SheetPlan {
  /** width of each column, in units of one digit's width */
  widths: number[];
  /** 1-based first row of each block */
  starts: number[];
  lastRow: number;
  /** columns a title, paragraph, table title or note is merged across */
  span: number;
  /** 1-based row → height in points, for rows taller than one line */
  heights: Map<number, number>;
  blocks: BlockPlan[];
  /** caption rows of the pictures (1-based), merged across `span` and wrapped */
  captions: { row: number; text: string }[];
  page: PagePlan;
}

const isNumberFormat = (f: NumberFormat | undefined) => f !== undefined && f !== 'text';

/**
 * Text that may not fit on one line of a column `width` units wide: longer in characters than the
 * width (the unit is one character of the default font), or estimated so. Such a cell wraps.
 */
function overflows(text: string, width: number): boolean {
  return text.length > width || textWidth(text) > width;
}

/** The caption written above a picture. */
export function pictureCaption(im: { png: Uint8Array; alt: string }): string {
  return im.png.length ? `Picture: ${im.alt}` : `Picture not drawn here (no PNG renderer): ${im.alt}`;
}

/**
 * The layout of one sheet: column widths that fit the headers' words and the numbers, text that
 * wraps in bounded columns (never relying on shrinking to fit), row heights for wrapped rows,
 * aligned headers, and a page set-up (orientation, repeated headers, page breaks that keep each
 * picture and each short block whole).
 */
export function planSheet(sheet: ReportSheet): SheetPlan {
  const { starts, lastRow } = layoutBlocks(sheet.blocks);
  const widths: number[] = [];
  // a declared width is honoured (it is at least what the column's header words and numbers need)
  const want = (col: number, w: number) => { widths[col] = Math.max(widths[col] ?? MIN_WIDTH, Math.ceil(w)); };

  // columns: declared width, the header's longest word, every number, text up to a cap
  for (const b of sheet.blocks) {
    if (b.kind === 'table') {
      b.columns.forEach((c, i) => {
        want(i, c.width ?? Math.min(TEXT_COLUMN_MAX, Math.max(DEFAULT_WIDTH, textWidth(c.header, 'bold'))));
        want(i, longestWordWidth(c.header, 'bold'));
        // numbers must show whole; text needs room for its longest word (longer text wraps), so that
        // one long sentence does not widen a column that other blocks on the sheet share
        let content = 0;
        for (const row of b.rows) {
          const v = row[i] ?? null;
          content = Math.max(content, typeof v === 'string' ? longestWordWidth(v) : cellWidth(v, c.format));
        }
        want(i, Math.min(content, Math.max(TEXT_COLUMN_MAX, c.width ?? 0)));
      });
    } else if (b.kind === 'keyValues') {
      want(0, Math.min(LABEL_MAX, Math.max(0, ...b.rows.map((r) => textWidth(r[0])))));
      for (const r of b.rows) if (typeof r[1] === 'number') want(1, cellWidth(r[1], r[2]));
    }
  }
  const tableWidth = Math.max(0, ...sheet.blocks.map((b) => (b.kind === 'table' ? sum(widths, 0, b.columns.length) : b.kind === 'keyValues' ? sum(widths, 0, 2) : 0)));
  const target = Math.min(PARAGRAPH_MAX, Math.max(PARAGRAPH_MIN, tableWidth));
  let span = 0;
  for (let acc = 0; acc < target - 2; span++) {
    if (widths[span] === undefined) widths[span] = DEFAULT_WIDTH;
    acc += widths[span];
  }
  for (let i = 0; i < widths.length; i++) widths[i] ??= DEFAULT_WIDTH;
  const spanWidth = sum(widths, 0, span);

  const heights = new Map<number, number>();
  const tall = (row: number, lines: number, linePoints = LINE_POINTS) => {
    if (lines <= 1 && linePoints === LINE_POINTS) return;
    heights.set(row, Math.max(heights.get(row) ?? 0, lines * linePoints + (lines > 1 ? 3 : 0)));
  };
  const spanned = (row: number, text: string, weight: TextWeight = 'text', linePoints = LINE_POINTS) => tall(row, wrappedLines(text, spanWidth, weight), linePoints);

  const blocks: BlockPlan[] = sheet.blocks.map((b, bi): BlockPlan => {
    const top = starts[bi];
    switch (b.kind) {
      case 'title':
        spanned(top, b.text, 'title', 21);
        return { kind: 'title', row: top };
      case 'paragraph':
        spanned(top, b.text);
        return { kind: 'paragraph', row: top };
      case 'space':
        return { kind: 'space', row: top };
      case 'table':
        return planTable(b, top, widths, spanned, tall);
      case 'keyValues':
        return planKeyValues(b, top, widths, spanned, tall, Math.max(spanWidth, tableWidth));
    }
  });
  const captions = (sheet.images ?? []).map((im) => ({ row: Math.max(1, im.anchor.row - 1), text: pictureCaption(im) }));
  for (const c of captions) spanned(c.row, c.text);

  return { widths, starts, lastRow, span, heights, blocks, captions, page: planPage(sheet, widths, starts, heights, blocks) };
}

function sum(widths: readonly number[], from: number, count: number): number {
  let s = 0;
  for (let i = from; i < from + count; i++) s += widths[i] ?? DEFAULT_WIDTH;
  return s;
}

type Tall = (row: number, lines: number, linePoints?: number) => void;
type Spanned = (row: number, text: string, weight?: TextWeight) => void;

function planTable(b: TableBlock, top: number, widths: number[], spanned: Spanned, tall: Tall): TablePlan {
  const grouped = hasGroups(b.columns);
  const headerRow = top + 1 + (grouped ? 1 : 0);
  const firstRow = headerRow + 1;
  spanned(top, b.title, 'bold');
  const align = b.columns.map((c): Align => (isNumberFormat(c.format) ? 'right' : 'left'));
  const groups: TablePlan['groups'] = [];
  b.columns.forEach((c, i) => {
    const last = groups[groups.length - 1];
    if (c.group && last && last.text === c.group && last.col + last.cols === i) last.cols++;
    else if (c.group) groups.push({ col: i, cols: 1, text: c.group });
  });
  if (grouped) tall(top + 1, Math.max(1, ...groups.map((g) => wrappedLines(g.text, sum(widths, g.col, g.cols), 'bold'))));
  tall(headerRow, Math.max(1, ...b.columns.map((c, i) => wrappedLines(c.header, widths[i], 'bold'))));
  const wrap = b.columns.map((_, i) => b.rows.some((r) => typeof r[i] === 'string' && overflows(r[i] as string, widths[i])));
  if (wrap.some(Boolean)) {
    b.rows.forEach((r, k) => {
      let lines = 1;
      r.forEach((v, i) => { if (wrap[i] && typeof v === 'string') lines = Math.max(lines, wrappedLines(v, widths[i])); });
      tall(firstRow + k, lines);
    });
  }
  const noteRow = b.note ? firstRow + b.rows.length : undefined;
  if (noteRow !== undefined) spanned(noteRow, b.note!);
  return { kind: 'table', titleRow: top, ...(grouped ? { groupRow: top + 1 } : {}), groups, headerRow, firstRow, ...(noteRow ? { noteRow } : {}), align, wrap };
}

function planKeyValues(b: Extract<Block, { kind: 'keyValues' }>, top: number, widths: number[], spanned: Spanned, tall: Tall, room: number): KeyValuesPlan {
  spanned(top, b.title, 'bold');
  const valueRoom = Math.max(widths[1], Math.min(VALUE_MAX, room - widths[0]));
  // a block of figures right-aligns its numbers, like a table's; a block of mostly words keeps one left edge
  const figures = b.rows.filter((r) => typeof r[1] === 'number').length * 2 >= b.rows.length;
  return {
    kind: 'keyValues', titleRow: top,
    rows: b.rows.map(([label, value, format], r) => {
      const row = top + 1 + r;
      const text = typeof value === 'string' ? value : '';
      const need = text ? textWidth(text) : 0;
      let valueCols = 1;
      // merged across the value columns up to a comfortable line; past it only while the merge is still narrow
      const fits = (k: number) => sum(widths, 1, k) <= valueRoom || sum(widths, 1, k - 1) < valueRoom / 2;
      while (need > sum(widths, 1, valueCols) && valueCols + 1 < widths.length && fits(valueCols + 1)) valueCols++;
      const wrapValue = overflows(text, sum(widths, 1, valueCols));
      const wrapLabel = overflows(label, widths[0]);
      const lines = Math.max(wrapValue ? wrappedLines(text, sum(widths, 1, valueCols)) : 1, wrapLabel ? wrappedLines(label, widths[0]) : 1);
      tall(row, lines);
      // a figure written as text ("3 and 146" degrees of freedom) lines up with the numbers above it
      const figureText = typeof value === 'string' && FIGURE_TEXT.test(value);
      return { row, valueCols, wrapValue, wrapLabel, align: figures && ((typeof value === 'number' && isNumberFormat(format)) || figureText) ? 'right' : 'left' };
    }),
  };
}

/**
 * Orientation from the sheet's width; the first long table's headings repeat on every page; and a
 * page break before any picture or short block that would otherwise be cut by the page's end. The
 * closing caution is kept with the block before it. Page heights are estimates (the host decides the
 * real breaks), so each page is filled to 95 % of its estimated height.
 */
function planPage(sheet: ReportSheet, widths: number[], starts: number[], heights: Map<number, number>, blocks: BlockPlan[]): PagePlan {
  const used = Math.max(1, ...sheet.blocks.map((b) => (b.kind === 'table' ? b.columns.length : b.kind === 'keyValues' ? 2 : 1)));
  const widthPoints = sum(widths, 0, Math.max(used, 1)) * POINTS_PER_CHAR;
  const orientation = widthPoints <= PAGE.portrait.width * 1.05 ? 'portrait' : 'landscape';
  let scale = Math.min(1, PAGE[orientation].width / widthPoints);
  // below MIN_PRINT_SCALE (about 7 pt type) a wide long table goes on across pages, its leading
  // columns before the first column group (the area's ID, name and row) repeated on each
  let fitToPagesWide = 1;
  let titleColumns: PagePlan['titleColumns'];
  const wide = sheet.blocks.find((b): b is TableBlock => b.kind === 'table' && b.rows.length > LONG_TABLE_ROWS && b.columns.length === used);
  if (scale < MIN_PRINT_SCALE && wide) {
    const keys = wide.columns.findIndex((c) => c.group !== undefined);
    if (keys > 0 && keys <= 3) {
      const keyPoints = sum(widths, 0, keys) * POINTS_PER_CHAR;
      const room = PAGE[orientation].width / COMFORTABLE_PRINT_SCALE - keyPoints;
      if (room > 0) {
        fitToPagesWide = Math.max(2, Math.ceil((widthPoints - keyPoints) / room));
        titleColumns = { first: 1, last: keys };
        scale = Math.min(1, PAGE[orientation].width / ((widthPoints - keyPoints) / fitToPagesWide + keyPoints));
      }
    }
  }
  const pageHeight = (PAGE[orientation].height / scale) * 0.95;

  let titleRows: PagePlan['titleRows'];
  sheet.blocks.forEach((b, i) => {
    const p = blocks[i];
    if (!titleRows && b.kind === 'table' && p.kind === 'table' && b.rows.length > LONG_TABLE_ROWS) titleRows = { first: p.groupRow ?? p.headerRow, last: p.headerRow };
  });

  // units that must not be split: [first row, last row, extra points below the last row]
  // picture: its caption and the picture itself, which must never be cut
  const units: { first: number; last: number; below: number; picture?: boolean }[] = [];
  let underHeading = false;
  sheet.blocks.forEach((b, i) => {
    const first = starts[i];
    if (b.kind === 'space') return;
    const last = first + blockHeight(b) - 1;
    const p = blocks[i];
    // a long table may break anywhere past its headings and first rows, and before its last rows
    if (b.kind === 'table' && b.rows.length > LONG_TABLE_ROWS && p.kind === 'table') {
      underHeading = false;
      units.push({ first, last: p.firstRow + 2, below: 0 });
      units.push({ first: p.firstRow + b.rows.length - 3, last, below: 0 });
    } else {
      // a heading (a title block) is kept with the block after it, and with all the paragraphs under it
      // (the Summary's cautions), never left at the foot of a page nor losing its last line to the next
      const before = units[units.length - 1];
      const glued = i > 0 && (sheet.blocks[i - 1].kind === 'title' || (underHeading && b.kind === 'paragraph'));
      // a title, or a paragraph still under one, keeps the following paragraphs with it
      underHeading = b.kind === 'title' || (glued && b.kind === 'paragraph');
      if (before && glued && before.last >= first - BLOCK_GAP - 1) units[units.length - 1] = { first: before.first, last, below: 0 };
      else units.push({ first, last, below: 0 });
    }
  });
  for (const im of sheet.images ?? []) {
    const first = Math.max(1, im.anchor.row - 1);
    units.push({ first, last: im.anchor.row - 1, below: im.heightPx * 0.75, picture: true });
  }
  units.sort((a, b) => a.first - b.first);
  // the closing paragraphs (the cautions) go with the block just before them
  let tail = sheet.blocks.length;
  while (tail > 0 && sheet.blocks[tail - 1].kind === 'paragraph') tail--;
  if (tail < sheet.blocks.length && tail > 0) {
    const from = units.findIndex((u) => u.first === starts[tail]);
    if (from > 0) {
      const prev = units[from - 1];
      const prevEnd = prev.last + Math.ceil(prev.below / LINE_POINTS);
      const count = sheet.blocks.length - tail;
      if (starts[tail] - prevEnd <= BLOCK_GAP + 1 && units[from + count - 1]?.first === starts[sheet.blocks.length - 1]) {
        const last = units[from + count - 1].last;
        units.splice(from - 1, count + 1, { first: prev.first, last: Math.max(prevEnd, last), below: 0 });
      }
    }
  }

  const rowHeight = (r: number) => heights.get(r) ?? LINE_POINTS;
  const topOf = (() => {
    const cache: number[] = [0, 0];
    return (row: number) => {
      for (let r = cache.length; r <= row; r++) cache[r] = cache[r - 1] + rowHeight(r - 1);
      return cache[row];
    };
  })();
  const breaksBefore: number[] = [];
  let pageTop = 0;
  let full = false;
  for (const u of units) {
    const top = topOf(u.first);
    const bottom = topOf(u.last + 1) + u.below;
    if (u.picture) {
      // a picture starts a page of its own: where the host breaks inside the estimated rows before it
      // is not known exactly, so an estimate that it still fits is not relied on
      if (top > pageTop) {
        breaksBefore.push(u.first);
        pageTop = top;
      }
    } else {
      // the block before overran the page by a little and most likely fits on it: the page is full, and
      // this block starts the next, so that its title is not left at the foot of that page
      if (full && top > pageTop && bottom - top <= pageHeight) {
        breaksBefore.push(u.first);
        pageTop = top;
      }
      full = false;
      while (top - pageTop >= pageHeight) pageTop += pageHeight; // the host's own breaks in between
      // row heights are estimated on the generous side: a block overrunning by two lines or less most likely fits
      const over = bottom - pageTop - pageHeight;
      if (over > 2 * LINE_POINTS && top > pageTop && bottom - top <= pageHeight) {
        breaksBefore.push(u.first);
        pageTop = top;
      } else if (over > 0 && top > pageTop && bottom - top <= pageHeight) {
        full = true;
        pageTop = bottom;
        continue;
      }
    }
    while (bottom - pageTop > pageHeight) pageTop += pageHeight;
  }
  return { orientation, fitToPagesWide, margins: PAGE_MARGINS, ...(titleRows ? { titleRows } : {}), ...(titleColumns ? { titleColumns } : {}), breaksBefore, scale };
}
