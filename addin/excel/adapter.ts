/**
 * The one place that touches Office.js. Reads the active sheet's table, writes the report as new
 * sheets, inserts the maps as pictures and the Moran scatter as a native chart, and keeps the setup
 * (document settings) and the boundary files (custom XML parts) in the workbook. Every read and write
 * goes in row blocks small enough for Excel on the web's 5 MB per request and response (blocks.ts).
 * If any write fails, the sheets this run added are deleted again.
 */
import { InputError } from '../../src/errors.js';
import { uniqueSheetName, type PagePlan, type Report, type ReportImage, type ReportSheet } from '../../src/report/index.js';
import type { BoundaryFile, RunOutput, SavedSetup, ScatterPoints, SheetValue, TableSnapshot } from '../shared/types.js';
import type { ContextLike, CustomXmlPartLike, ExcelRunner, RangeLike, WorksheetLike } from './api.js';
import { RequestBudget, readRows, writeRows } from './blocks.js';
import { BOUNDARY_NAMESPACE, BoundaryNotKept, StoredBoundaryDamaged, boundaryParts, readBoundaryParts } from './boundary-part.js';
import { describe, isCellEditError, jsonBytes } from './limits.js';
import { hasExcelApi, type IsSetSupported } from './run.js';
import { address, columnLeft, columnName, rowTop, sheetGrid, POINTS_PER_CHAR, type CellStyle, type SheetGrid } from './report-grid.js';

export const SETUP_KEY = 'spillway.setup';
const PX_TO_POINTS = 0.75;
const SCATTER_PICTURE = 'Moran scatter plot';
/** Times a sheet is written again after a cell edit interrupted it (only where Excel cannot hold batches). */
const REWRITES_AFTER_CELL_EDIT = 3;

const STYLE: Record<CellStyle, { bold?: boolean; italic?: boolean; size?: number; color?: string; fill?: string; wrap?: boolean }> = {
  title: { bold: true, size: 14, color: '#1B4470' },
  blockTitle: { bold: true },
  header: { bold: true, fill: '#E6EDF4', wrap: true },
  group: { bold: true, wrap: true },
  note: { italic: true, color: '#555555' },
  caution: { color: '#8A3F0A' },
};

function toBase64(bytes: Uint8Array): string {
  let s = '';
  for (let i = 0; i < bytes.length; i += 0x8000) s += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(s);
}

function plainCell(v: unknown): SheetValue {
  if (v === '' || v === undefined || v === null) return null;
  if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean') return v;
  return String(v);
}

export class ExcelAdapter {
  /**
   * `maxBoundaryChars`: the largest boundary kept in the workbook (boundary-part.ts; tests pass a small one).
   * `isSetSupported`: Office's requirement check, asked when a sheet is written (the page set-up needs ExcelApi 1.9).
   */
  constructor(private readonly run: ExcelRunner, private readonly options: { maxBoundaryChars?: number; isSetSupported?: IsSetSupported } = {}) {}

  /** The first table on the active sheet, or else its used range: the header row and the rows below. */
  async readActiveTable(): Promise<TableSnapshot> {
    return this.run(async (context) => {
      const ws = context.workbook.worksheets.getActiveWorksheet();
      ws.load('name');
      ws.tables.load('items/name');
      await context.sync();
      const range: RangeLike = ws.tables.items.length > 0 ? ws.tables.items[0].getRange() : ws.getUsedRangeOrNullObject(true);
      range.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
      await context.sync();
      if (range.isNullObject || range.rowCount === 0) {
        throw new InputError(`The sheet "${ws.name}" is empty. Open the sheet that holds one row per area, with column names in the first row.`);
      }
      const values = (await readRows(context, ws, range.rowIndex, range.columnIndex, range.rowCount, range.columnCount)).map((row) => row.map(plainCell));
      let head = 0;
      while (head < values.length && values[head].every((c) => c === null)) head++;
      if (head === values.length) throw new InputError(`The sheet "${ws.name}" has no values.`);
      const headers = values[head].map((c) => (c === null ? '' : String(c).trim()));
      while (headers.length > 0 && headers[headers.length - 1] === '') headers.pop();
      const rows: SheetValue[][] = [];
      const rowNumbers: number[] = [];
      for (let r = head + 1; r < values.length; r++) {
        if (values[r].every((c) => c === null)) continue;
        rows.push(values[r].slice(0, headers.length));
        rowNumbers.push(range.rowIndex + r + 1);
      }
      return { sheet: ws.name, headerRow: range.rowIndex + head + 1, firstColumn: range.columnIndex + 1, headers, rows, rowNumbers };
    }, { repeatable: true });
  }

  /** Selects a cell so the analyst sees the value at fault. */
  async showCell(sheet: string, cell: string): Promise<void> {
    await this.run(async (context) => {
      const ws = context.workbook.worksheets.getItemOrNullObject(sheet);
      await context.sync();
      if (ws.isNullObject) return;
      ws.activate();
      ws.getRange(cell).select();
      await context.sync();
    }, { repeatable: true });
  }

  /**
   * Writes every report sheet as a new sheet, in row blocks, and returns the names they were written
   * under: one per report sheet, in the report's order. On the first failure the sheets this call
   * added are deleted and the error is passed on with the sheet it happened on.
   */
  async writeReport(output: Pick<RunOutput, 'report' | 'scatter'>): Promise<string[]> {
    const existing = await this.run(async (context) => {
      context.workbook.worksheets.load('items/name');
      await context.sync();
      return context.workbook.worksheets.items.map((w) => w.name);
    }, { repeatable: true });
    const taken = new Set(existing.map((n) => n.toLowerCase()));
    const created: string[] = [];
    let current = '';
    try {
      for (const sheet of output.report.sheets) {
        current = uniqueSheetName(sheet.name, taken);
        const scatter = sheet.role === 'overview' ? output.scatter : undefined;
        for (let attempt = 1; ; attempt++) {
          try {
            await this.writeSheet(current, sheet, scatter, created);
            break;
          } catch (e) {
            // Excel without delayForCellEdit refused a block half-way through the sheet: write it again
            if (!isCellEditError(e) || attempt > REWRITES_AFTER_CELL_EDIT) throw e;
            await this.removeSheets([current]);
            created.splice(created.indexOf(current), 1);
          }
        }
      }
      await this.run(async (context) => {
        context.workbook.worksheets.getItemOrNullObject(created[0]).activate();
        await context.sync();
      }, { repeatable: true }).catch(() => undefined);
      return created;
    } catch (e) {
      await this.removeSheets(created);
      throw new Error(`Writing the results stopped at the sheet "${current}": ${describe(e)}. The sheets this run had added were removed again.`);
    }
  }

  private async writeSheet(name: string, sheet: ReportSheet, scatter: ScatterPoints | undefined, created: string[]): Promise<void> {
    await this.run(async (context) => {
      const ws = context.workbook.worksheets.add(name);
      if (!created.includes(name)) created.push(name);
      const budget = new RequestBudget(context);
      const grid = sheetGrid(sheet);
      await writeGrid(budget, ws, grid);
      // an Excel without the page set-up calls prints with its own defaults; the sheet is the same
      if (hasExcelApi(this.options.isSetSupported, '1.9')) await writePageSetup(budget, ws, grid.page);
      await writePictures(budget, ws, grid, sheet, scatter);
      await budget.flush();
    });
  }

  private async removeSheets(names: readonly string[]): Promise<void> {
    if (names.length === 0) return;
    await this.run(async (context: ContextLike) => {
      const sheets = names.map((n) => context.workbook.worksheets.getItemOrNullObject(n));
      await context.sync();
      for (const ws of sheets) if (!ws.isNullObject) ws.delete();
      await context.sync();
    }, { repeatable: true });
  }

  async saveSetup(setup: SavedSetup): Promise<void> {
    await this.run(async (context) => {
      context.workbook.settings.add(SETUP_KEY, JSON.stringify(setup));
      await context.sync();
    }, { repeatable: true });
  }

  async loadSetup(): Promise<SavedSetup | null> {
    return this.run(async (context) => {
      const item = context.workbook.settings.getItemOrNullObject(SETUP_KEY);
      item.load('value');
      await context.sync();
      if (item.isNullObject || typeof item.value !== 'string') return null;
      try {
        const parsed = JSON.parse(item.value) as SavedSetup;
        return parsed && parsed.version === 1 ? parsed : null;
      } catch {
        return null;
      }
    }, { repeatable: true });
  }

  /**
   * Replaces the stored boundary files with these, one custom XML part per request. The old parts are
   * deleted only once every new part is in; if a part is refused, the new parts are taken out again
   * and the old ones stay. Throws BoundaryNotKept with the reason when the files are not kept.
   */
  async storeBoundary(files: readonly BoundaryFile[]): Promise<void> {
    const parts = boundaryParts(files, { maxChars: this.options.maxBoundaryChars });
    const names = files.map((f) => f.name).join(', ');
    await this.run(async (context) => {
      const old = context.workbook.customXmlParts.getByNamespace(BOUNDARY_NAMESPACE);
      old.load('items/id');
      await context.sync();
      const added: CustomXmlPartLike[] = [];
      try {
        for (const xml of parts) {
          added.push(context.workbook.customXmlParts.add(xml));
          await context.sync();
        }
      } catch (e) {
        for (const part of added) part.delete();
        await context.sync().catch(() => undefined);
        throw new BoundaryNotKept(`The boundary file (${names}) was not kept in this workbook: Excel refused to store it (${describe(e)}). Keep the file beside the workbook to run again.`);
      }
      for (const part of old.items) part.delete();
      await context.sync();
    });
  }

  /**
   * The boundary files kept by an earlier run, or null when there are none. Throws with the reason in
   * words when they are there but cannot be read (Excel refused to hand them back, or they are damaged).
   */
  async loadBoundary(): Promise<BoundaryFile[] | null> {
    const xmls = await this.run(async (context) => {
      const parts = context.workbook.customXmlParts.getByNamespace(BOUNDARY_NAMESPACE);
      parts.load('items/id');
      await context.sync();
      const texts: string[] = [];
      // one part per response: each is at most a megabyte
      for (const part of parts.items) {
        const xml = part.getXml();
        await context.sync();
        texts.push(xml.value);
      }
      return texts;
    }, { repeatable: true }).catch((e: unknown) => {
      throw new Error(`Excel did not hand back the boundary file kept in this workbook (${describe(e)}); open the original file again.`);
    });
    if (xmls.length === 0) return null;
    let files: BoundaryFile[];
    try {
      files = readBoundaryParts(xmls);
    } catch (e) {
      // the reader's own messages name the file; a decoder's do not
      if (e instanceof StoredBoundaryDamaged) throw e;
      throw new Error(`The boundary file kept in this workbook is damaged (${describe(e)}); open the original file again.`);
    }
    return files.length ? files : null;
  }
}

/** Values and number formats in row blocks, then widths, heights, merges, wrapping, alignment, styles and frozen rows. */
export async function writeGrid(budget: RequestBudget, ws: WorksheetLike, grid: SheetGrid): Promise<void> {
  // formats first in every block, so text such as IDs with leading zeros or a leading minus stays text
  await writeRows(budget, ws, 0, 0, grid.values, grid.formats);
  for (const [c, w] of grid.columnWidths.entries()) {
    await budget.room(0);
    ws.getRangeByIndexes(0, c, 1, 1).format.columnWidth = w * POINTS_PER_CHAR;
  }
  for (const [r, h] of grid.rowHeights) {
    await budget.room(0);
    ws.getRangeByIndexes(r, 0, 1, 1).format.rowHeight = h;
  }
  for (const m of grid.merges) {
    await budget.room(0);
    const range = ws.getRangeByIndexes(m.row, m.col, 1, m.cols);
    range.merge(false);
    range.format.wrapText = true;
    range.format.verticalAlignment = 'Top';
  }
  for (const w of grid.wraps) {
    await budget.room(0);
    ws.getRangeByIndexes(w.row, w.col, w.rows, w.cols).format.wrapText = true;
  }
  for (const a of grid.aligns) {
    await budget.room(0);
    const f = ws.getRangeByIndexes(a.row, a.col, a.rows, a.cols).format;
    f.horizontalAlignment = a.horizontal;
    if (a.indent) f.indentLevel = a.indent;
    if (a.top) f.verticalAlignment = 'Top';
  }
  for (const s of grid.styles) {
    const style = STYLE[s.style];
    await budget.room(jsonBytes(style));
    const f = ws.getRangeByIndexes(s.row, s.col, s.rows, s.cols).format;
    if (style.bold) f.font.bold = true;
    if (style.italic) f.font.italic = true;
    if (style.size) f.font.size = style.size;
    if (style.color) f.font.color = style.color;
    if (style.fill) f.fill.color = style.fill;
    if (style.wrap) f.wrapText = true;
  }
  if (grid.freezeRows > 0) {
    await budget.room(0);
    ws.freezePanes.freezeRows(grid.freezeRows);
  }
}

/**
 * The sheet plan's page set-up, as the .xlsx writer writes it (src/workbook/write-sheet.ts):
 * orientation, one page wide (or the plan's pages, with its key columns repeated) and as many tall as the rows need, the margins, the first long table's
 * headings repeated on every page, and the page breaks that keep each picture and short block whole.
 */
export async function writePageSetup(budget: RequestBudget, ws: WorksheetLike, page: PagePlan): Promise<void> {
  await budget.room(512);
  const layout = ws.pageLayout;
  layout.orientation = page.orientation === 'landscape' ? 'Landscape' : 'Portrait';
  // 0 pages tall: as many as needed (the file format's "automatic"; the .xlsx writer's fitToHeight 0)
  layout.zoom = { horizontalFitToPages: page.fitToPagesWide, verticalFitToPages: 0 };
  layout.setPrintMargins('Inches', { ...page.margins });
  if (page.titleRows) layout.setPrintTitleRows(`$${page.titleRows.first}:$${page.titleRows.last}`);
  if (page.titleColumns) layout.setPrintTitleColumns(`$${columnName(page.titleColumns.first - 1)}:$${columnName(page.titleColumns.last - 1)}`);
  for (const row of page.breaksBefore) {
    if (row <= 1) continue;
    await budget.room(0);
    ws.horizontalPageBreaks.add(ws.getRangeByIndexes(row - 1, 0, 1, 1));
  }
}

function placeAt(grid: SheetGrid, im: Pick<ReportImage, 'anchor'>) {
  return { top: rowTop(grid, im.anchor.row - 1), left: columnLeft(grid, im.anchor.col - 1) };
}

/**
 * The report's pictures as PNG shapes; on the overview, the Moran scatter becomes a native chart
 * over its points, written to the right of the report (the slope of its trend line is Moran's I).
 */
export async function writePictures(budget: RequestBudget, ws: WorksheetLike, grid: SheetGrid, sheet: ReportSheet, scatter?: ScatterPoints): Promise<void> {
  for (const im of sheet.images ?? []) {
    const at = placeAt(grid, im);
    const chart = scatter !== undefined && im.name === SCATTER_PICTURE;
    // the picture described in words in the cell above it, as the .xlsx files written by exceljs have it
    await budget.room(2 * im.alt.length + 256);
    const caption = ws.getRangeByIndexes(Math.max(0, im.anchor.row - 2), im.anchor.col - 1, 1, 1);
    caption.values = [[im.png.length || chart ? `Picture: ${im.alt}` : `Picture not drawn here (no PNG renderer): ${im.alt}`]];
    caption.format.font.italic = true;
    caption.format.font.color = STYLE.note.color!;
    if (chart) {
      await writeScatterChart(budget, ws, grid, scatter, at, im);
      continue;
    }
    if (!im.png.length) continue;
    const base64 = toBase64(im.png);
    await budget.room(base64.length + 6 * 64);
    const shape = ws.shapes.addImage(base64);
    shape.name = im.name;
    shape.altTextDescription = im.alt;
    shape.top = at.top;
    shape.left = at.left;
    shape.width = im.widthPx * PX_TO_POINTS;
    shape.height = im.heightPx * PX_TO_POINTS;
  }
}

async function writeScatterChart(budget: RequestBudget, ws: WorksheetLike, grid: SheetGrid, s: ScatterPoints, at: { top: number; left: number }, im: ReportImage): Promise<void> {
  const col = grid.cols + 1;
  const n = s.z.length;
  // the points go in row blocks like the sheet itself: at 90,000 areas they alone pass 5 MB
  await writeRows(budget, ws, 0, col,
    [['Points of the Moran scatter plot', null], [`${s.valueName} (standardised)`, "Neighbours' average"], ...s.z.map((z, i) => [z, s.lag[i]])],
    [['@', null], ['@', '@'], ...s.z.map(() => ['0.0000', '0.0000'])]);
  await budget.room(2048);
  ws.getRangeByIndexes(0, col, 1, 1).format.font.bold = true;
  ws.getRangeByIndexes(1, col, 1, 2).format.font.bold = true;
  const data = ws.getRangeByIndexes(1, col, n + 1, 2);
  const chart = ws.charts.add('XYScatter', data, 'Columns');
  chart.name = 'Moran scatter';
  chart.title.text = `Moran scatter plot of ${s.valueName} (slope ${s.slope.toFixed(3)})`;
  chart.legend.visible = false;
  chart.axes.categoryAxis.title.text = `${s.valueName}, standardised`;
  chart.axes.valueAxis.title.text = "Neighbours' average, standardised";
  chart.series.getItemAt(0).markerSize = 5;
  chart.series.getItemAt(0).trendlines.add('Linear');
  chart.top = at.top;
  chart.left = at.left;
  chart.width = im.widthPx * PX_TO_POINTS;
  chart.height = im.heightPx * PX_TO_POINTS;
}

export { address };
export type { Report };

