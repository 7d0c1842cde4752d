import { basename, extname } from 'node:path';
import type { AnalysisResult } from '../pipeline/index.js';
import { buildReport, type Report } from '../report/index.js';
import { renderPng } from '../report/render-png.js';
import { baseWorkbookRisks, writeResultsWorkbook } from '../workbook/index.js';
import { writeWorkbookFile } from '../workbook/write-file.js';
import { nodeDeflate } from '../workbook/node-deflate.js';

/** The data table as it was read for the run: its path (for the name and kind) and the very bytes analysed. */
export interface DataSource {
  path: string;
  bytes: Uint8Array;
}

/**
 * Writes the results workbook: a copy of the input workbook with the results sheets added when the
 * data came from one, else a new book. The copy is made from the bytes the run read (never a second
 * read of a file that may have changed). A workbook holding parts the copy cannot carry (charts,
 * pivot tables, macros...) is not copied — the user's work must never lose anything — and the
 * results go into a new book; the returned notes say so. `replace` and `mode` as for writeWorkbookFile;
 * `report` when it is already built (for the pictures), so its maps are not drawn twice.
 */
export async function writeResultsFile(
  result: AnalysisResult, outPath: string, data?: DataSource, opts: { replace?: boolean; mode?: number } = {}, report?: Report,
): Promise<string[]> {
  const notes: string[] = [];
  let base: Uint8Array | undefined;
  if (data && extname(data.path).toLowerCase() === '.xlsx') {
    base = data.bytes;
    const risks = baseWorkbookRisks(base);
    if (risks.length) {
      notes.push(`${basename(data.path)} holds ${risks.join(', ')}, which a copy could not keep; the results were written to a new workbook instead.`);
      base = undefined;
    }
  }
  const bytes = await writeResultsWorkbook(report ?? buildReport(result, { renderPng }), { base, baseName: data ? basename(data.path) : undefined, deflate: nodeDeflate });
  await writeWorkbookFile(outPath, bytes, opts);
  return notes;
}
