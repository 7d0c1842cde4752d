/** Results written as new sheets into a copy of the user's workbook (or a new one). Host-independent: bytes in, bytes out. */
import ExcelJS from 'exceljs';
import { InputError } from '../errors.js';
import { SHEET_ROW_LIMIT, layoutBlocks, uniqueSheetName, type Report } from '../report/index.js';
import { ooxmlText } from './ooxml-text.js';
import { writeSheet, type DeferredRows } from './write-sheet.js';
import { STREAM_ROWS_ABOVE, streamDeferredRows, templateRowCount, type EntryDeflate } from './stream-rows.js';
import { formatCount } from '../core/count.js';

export { cleanSheetName, uniqueSheetName, MAX_SHEET_NAME, EXCEL_FORMAT, cellFormat } from '../report/index.js';
export { readWorkbook, type ReadSheet } from './read-back.js';
export { baseWorkbookRisks } from './base-risks.js';
export { ooxmlText } from './ooxml-text.js';
export type { EntryDeflate } from './stream-rows.js';

export interface WriteWorkbookOptions {
  /** the input .xlsx to copy; its sheets are kept as they are and the results are added after them */
  base?: Uint8Array;
  /** the base file's name, for messages */
  baseName?: string;
  /** tables with more rows than this are streamed into the file (stream-rows.ts); default STREAM_ROWS_ABOVE */
  streamRowsAbove?: number;
  /** the deflate for the rebuilt zip when long tables are streamed (default fflate's; Node: nodeDeflate) */
  deflate?: EntryDeflate;
}

export async function writeResultsWorkbook(report: Report, opts: WriteWorkbookOptions = {}): Promise<Uint8Array> {
  // the report splits long tables across sheets (report/row-limit.ts); a sheet still too long is refused before anything is written
  for (const sheet of report.sheets) {
    const rows = layoutBlocks(sheet.blocks).lastRow;
    if (rows > SHEET_ROW_LIMIT) {
      throw new InputError(`The results sheet "${sheet.name}" would need ${formatCount(rows)} rows, and a worksheet holds at most ${formatCount(SHEET_ROW_LIMIT)}. Nothing was written.`);
    }
  }
  const wb = new ExcelJS.Workbook();
  if (opts.base) {
    const name = opts.baseName ?? 'the input workbook';
    try {
      // exceljs's typings want a Node Buffer; a Uint8Array is what it actually reads.
      await wb.xlsx.load(opts.base as unknown as ArrayBuffer);
    } catch (e) {
      throw new InputError(
        `${name} could not be opened as an .xlsx workbook to add the results to (${e instanceof Error ? e.message : String(e)}). ` +
          'Save it as .xlsx, or write the results to a new workbook instead.',
        { file: opts.baseName },
      );
    }
  } else {
    wb.creator = 'Spillway';
  }
  const taken = new Set(wb.worksheets.map((ws) => ws.name.toLowerCase()));
  const above = opts.streamRowsAbove ?? STREAM_ROWS_ABOVE;
  const deferred = new Map<string, DeferredRows[]>();
  for (const sheet of report.sheets) {
    const ws = wb.addWorksheet(uniqueSheetName(sheet.name, taken));
    const rest = writeSheet(wb, ws, sheet, { rowsToWrite: (b) => (b.rows.length > above ? templateRowCount(b.rows) : b.rows.length) });
    // exceljs names each sheet's part by the worksheet's id
    if (rest.length) deferred.set(`xl/worksheets/sheet${ws.id}.xml`, rest);
  }
  // every text cell in the spreadsheet format's escaped form (ooxml-text.ts): the new sheets, and the
  // user's own, which exceljs read back into plain text and would otherwise write changed
  for (const ws of wb.worksheets) escapeTextCells(ws);
  const out = new Uint8Array(await wb.xlsx.writeBuffer() as ArrayBuffer);
  return deferred.size ? streamDeferredRows(out, deferred, opts.deflate) : out;
}

function escapeTextCells(ws: ExcelJS.Worksheet): void {
  ws.eachRow({ includeEmpty: false }, (row) => row.eachCell({ includeEmpty: false }, (cell) => {
    if (cell.isMerged && cell.master !== cell) return;
    const v = cell.value;
    if (typeof v === 'string') {
      const safe = ooxmlText(v);
      if (safe !== v) cell.value = safe;
    } else if (v && typeof v === 'object' && 'richText' in v && Array.isArray(v.richText)) {
      if (v.richText.some((r) => ooxmlText(r.text) !== r.text)) cell.value = { richText: v.richText.map((r) => ({ ...r, text: ooxmlText(r.text) })) };
    }
  }));
}
