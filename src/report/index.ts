/** The report model: one run's results as sheet-shaped blocks, for any host to lay out. */
import type { AnalysisResult } from '../pipeline/types.js';
import type { BuildReportOptions, Report, ReportSheet } from './types.js';
import { overviewBlocks } from './overview.js';
import { diagnosticsBlocks } from './diagnostics.js';
import { blocksOf } from './model-blocks.js';
import { fittedInOrder } from '../models/index.js';
import { areasBlocks } from './areas.js';
import { neighboursBlocks } from './neighbours.js';
import { comparisonBlocks } from './comparison.js';
import { recordBlocks } from './record.js';
import { localPatternsSheet } from './local-patterns.js';
import { ratesSheet } from './rates.js';
import { layoutBlocks } from './layout.js';
import { drawingNoteBlock, drawingRecordBlocks, overviewPictureList, placePictures } from './pictures-for-report.js';
import { shortCaution } from './cautions.js';
import { splitLongSheets } from './row-limit.js';
import { sayOnce } from './say-once.js';

export type {
  Report, ReportSheet, Block, Cell, NumberFormat, ReportImage, TableColumn, SheetRole, PngRenderer, BuildReportOptions,
} from './types.js';
export {
  blockHeight, layoutBlocks, planSheet, pictureCaption, hasGroups, BLOCK_GAP, ROW_HEIGHT_PX, LINE_POINTS, POINTS_PER_CHAR, DEFAULT_WIDTH, LONG_TABLE_ROWS,
  type SheetPlan, type BlockPlan, type TablePlan, type KeyValuesPlan, type PagePlan, type Align,
} from './layout.js';
export { textWidth, wrappedLines, longestWordWidth, numberWidth } from './text-fit.js';
export { MODEL_BLOCKS, type ModelBlocks } from './model-blocks.js';
export { SHEET_ROW_LIMIT, splitLongSheets } from './row-limit.js';
export { MODEL_LABEL, evidenceMark, MARK_NOTE, STRONG_MARK, SOME_MARK } from './format.js';
export { interpretation } from './interpretation.js';
export { familyReading } from './family.js';
export { scatterPoints } from './pictures-for-report.js';
export { withheldOutcome } from './withheld.js';
export { SMOOTHING_LABEL } from './rates.js';
export { cleanSheetName, uniqueSheetName, MAX_SHEET_NAME } from './sheet-names.js';
export { EXCEL_FORMAT, cellFormat, isSmall } from './number-formats.js';
export * from './pictures/index.js';

export function buildReport(result: AnalysisResult, opts: BuildReportOptions = {}): Report {
  const overview = overviewBlocks(result, opts.title);
  const overviewPics = overviewPictureList(result);
  const drawingNote = drawingNoteBlock(overviewPics);
  if (drawingNote) overview.push(drawingNote);
  const sheets: ReportSheet[] = [
    { name: 'Summary', role: 'overview', blocks: overview, images: placePictures(overviewPics, layoutBlocks(overview).lastRow + 3, opts.renderPng) },
  ];
  const fitted = fittedInOrder(result.fits);
  for (const { entry, fit } of fitted) sheets.push({ name: entry.label, role: 'model', blocks: blocksOf(entry.key).sheet(result, fit, entry) });
  sheets.push({ name: 'Checks on residuals', role: 'diagnostics', blocks: diagnosticsBlocks(result) });
  const impacts = fitted.flatMap(({ entry, fit }) => blocksOf(entry.key).impacts?.(result, fit, entry) ?? []);
  if (impacts.length) sheets.push({ name: 'Spillover effects', role: 'impacts', blocks: sayOnce(impacts) });
  const local = localPatternsSheet(result, opts.renderPng);
  if (local) sheets.push({ name: 'Local patterns', role: 'local', blocks: local.blocks, images: local.images, freezeHeader: false });
  const rates = ratesSheet(result, opts.renderPng);
  if (rates) sheets.push({ name: 'Rates', role: 'rates', blocks: rates.blocks, images: rates.images, freezeHeader: false });
  sheets.push({ name: 'By area', role: 'areas', blocks: areasBlocks(result), freezeHeader: true });
  sheets.push({ name: 'Neighbours', role: 'neighbours', blocks: neighboursBlocks(result) });
  const compared = comparisonBlocks(result);
  if (compared.length) sheets.push({ name: 'Neighbour definitions compared', role: 'comparison', blocks: compared });
  sheets.push({ name: 'How this was made', role: 'record', blocks: [...recordBlocks(result), ...drawingRecordBlocks(sheets)] });
  const reminder = shortCaution(result);
  for (const sheet of sheets) {
    if (sheet.role !== 'overview') sheet.blocks.push({ kind: 'paragraph', text: reminder, style: 'caution' });
  }
  return { sheets: splitLongSheets(sheets, opts.sheetRowLimit) };
}
export { resultsGeoJson, resultsGeoJsonText, projectedNote } from './geojson.js';
