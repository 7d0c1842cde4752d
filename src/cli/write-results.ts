import { readFileSync } from 'node:fs';
import { extname } from 'node:path';
import type { AnalysisResult } from '../pipeline/index.js';
import { buildReport } from '../report/index.js';
import { renderPng } from '../report/render-png.js';
import { writeResultsWorkbook } from '../workbook/index.js';
import { writeWorkbookFile } from '../workbook/write-file.js';

/** Writes the results workbook: a copy of the input workbook when the data came from one, else a new book. */
export async function writeResultsFile(result: AnalysisResult, outPath: string, dataPath?: string): Promise<void> {
  const base = dataPath && extname(dataPath).toLowerCase() === '.xlsx' ? new Uint8Array(readFileSync(dataPath)) : undefined;
  const report = buildReport(result, { renderPng });
  const bytes = await writeResultsWorkbook(report, { base });
  await writeWorkbookFile(outPath, bytes);
}
