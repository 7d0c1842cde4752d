/**
 * Compile-time check (addin/tsconfig.json only, where the Office.js typings are loaded) that the
 * real Excel API fits the subset the adapter is written against. Never imported at run time.
 */
import type { ContextLike, PageBreaksLike, PageLayoutLike, RangeLike, RunOptionsLike, WorksheetLike, WorkbookLike } from './api.js';

export type Conforms = [
  Excel.Range extends RangeLike ? true : never,
  Excel.Worksheet extends WorksheetLike ? true : never,
  Excel.Workbook extends WorkbookLike ? true : never,
  Excel.RequestContext extends ContextLike ? true : never,
  Excel.RunOptions extends RunOptionsLike ? true : never,
  Excel.PageLayout extends PageLayoutLike ? true : never,
  Excel.PageBreakCollection extends PageBreaksLike ? true : never,
];
export const conforms: Conforms = [true, true, true, true, true, true, true];
