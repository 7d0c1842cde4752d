import { readFileSync } from 'node:fs';
import { basename, extname } from 'node:path';
import type { AnalysisResult } from '../pipeline/index.js';
import { buildReport } from '../report/index.js';
import { renderPng } from '../report/render-png.js';
import { baseWorkbookRisks, writeResultsWorkbook } from '../workbook/index.js';
import { writeWorkbookFile } from '../workbook/write-file.js';
import { nodeDeflate } from '../workbook/node-deflate.js';

/**
 * Writes the results workbook: a copy of the input workbook with the results sheets added when the
 * data came from one, else a new book. A workbook holding parts the copy cannot carry (charts, pivot
 * tables, macros...) is not copied — the user's work must never lose anything — and the results go
 * into a new book; the returned notes say so.
 */
export async function writeResultsFile(result: AnalysisResult, outPath: string, dataPath?: string): Promise<string[]> {
  const notes: string[] = [];
  let base: Uint8Array | undefined;
  if (dataPath && extname(dataPath).toLowerCase() === '.xlsx') {
    base = new Uint8Array(readFileSync(dataPath));
    const risks = baseWorkbookRisks(base);
    if (risks.length) {
      notes.push(`${basename(dataPath)} holds ${risks.join(', ')}, which a copy could not keep; the results were written to a new workbook instead.`);
      base = undefined;
    }
  }
  const report = buildReport(result, { renderPng });
  const bytes = await writeResultsWorkbook(report, { base, baseName: dataPath ? basename(dataPath) : undefined, deflate: nodeDeflate });
  await writeWorkbookFile(outPath, bytes);
  return notes;
}
