/**
 * What a copy of the user's workbook could lose. The writer rebuilds the file from what exceljs
 * reads, and exceljs does not carry some parts over (charts, pivot tables, macros, slicers and a
 * few more). Listing the parts lets the CLI and the add-in warn, or write to a new file instead.
 */
import { unzipSync } from 'fflate';

const PARTS: [RegExp, string][] = [
  [/^xl\/charts\//, 'charts'],
  [/^xl\/pivotTables\/|^xl\/pivotCache\//, 'pivot tables'],
  [/^xl\/vbaProject\.bin$/, 'macros'],
  [/^xl\/slicers\/|^xl\/slicerCaches\//, 'slicers'],
  [/^xl\/timelines\//, 'timelines'],
  [/^xl\/externalLinks\//, 'links to other workbooks'],
  [/^xl\/chartsheets\//, 'chart sheets'],
  [/^xl\/model\//, 'a data model'],
  [/^xl\/threadedComments\//, 'threaded comments'],
];

/** Plain names of the parts of `base` that would not survive the copy (empty when none, or when it is not a zip). */
export function baseWorkbookRisks(base: Uint8Array): string[] {
  const found = new Set<string>();
  try {
    unzipSync(base, {
      filter: (file) => {
        for (const [re, what] of PARTS) if (re.test(file.name)) found.add(what);
        return false; // names only: nothing is inflated
      },
    });
  } catch {
    return [];
  }
  return [...found];
}
