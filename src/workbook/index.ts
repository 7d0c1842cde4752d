/** Results written as new sheets into a copy of the user's workbook (or a new one). Host-independent: bytes in, bytes out. */
import ExcelJS from 'exceljs';
import { InputError } from '../errors.js';
import type { Report } from '../report/index.js';
import { uniqueSheetName } from './sheet-names.js';
import { writeSheet } from './write-sheet.js';

export { cleanSheetName, uniqueSheetName, MAX_SHEET_NAME } from './sheet-names.js';
export { EXCEL_FORMAT } from './number-formats.js';
export { readWorkbook, type ReadSheet } from './read-back.js';
export { baseWorkbookRisks } from './base-risks.js';

export interface WriteWorkbookOptions {
  /** the input .xlsx to copy; its sheets are kept as they are and the results are added after them */
  base?: Uint8Array;
  /** the base file's name, for messages */
  baseName?: string;
}

export async function writeResultsWorkbook(report: Report, opts: WriteWorkbookOptions = {}): Promise<Uint8Array> {
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
  for (const sheet of report.sheets) {
    const ws = wb.addWorksheet(uniqueSheetName(sheet.name, taken));
    writeSheet(wb, ws, sheet);
  }
  const out = await wb.xlsx.writeBuffer();
  return new Uint8Array(out as ArrayBuffer);
}

/** The sheet names the report would get in a workbook that already has `existing` sheets. */
export function plannedSheetNames(report: Report, existing: readonly string[] = []): string[] {
  const taken = new Set(existing.map((s) => s.toLowerCase()));
  return report.sheets.map((s) => uniqueSheetName(s.name, taken));
}
