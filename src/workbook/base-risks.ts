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
  let workbookXml: Uint8Array | undefined;
  try {
    const parts = unzipSync(base, {
      filter: (file) => {
        for (const [re, what] of PARTS) if (re.test(file.name)) found.add(what);
        // only the small list of sheets is inflated (the archive passed the size checks when it was read)
        return file.name === 'xl/workbook.xml' && file.originalSize < 16 * 2 ** 20;
      },
    });
    workbookXml = parts['xl/workbook.xml'];
  } catch {
    return [];
  }
  if (workbookXml) {
    // exceljs cuts sheet names to Excel's 31 characters when it reads them: the copy would rename the
    // sheet (and break formulas that name it)
    const xml = new TextDecoder().decode(workbookXml);
    for (const m of xml.matchAll(/<sheet\b[^>]*\bname="([^"]*)"/g)) {
      if (decodeXml(m[1]).length > 31) found.add('sheet names longer than 31 characters');
    }
  }
  return [...found];
}

function decodeXml(s: string): string {
  return s.replace(/&(lt|gt|quot|apos|amp|#x[0-9a-f]+|#\d+);/gi, (_m, e: string) => {
    const named: Record<string, string> = { lt: '<', gt: '>', quot: '"', apos: "'", amp: '&' };
    if (named[e.toLowerCase()]) return named[e.toLowerCase()];
    return String.fromCodePoint(e[1] === 'x' || e[1] === 'X' ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10));
  });
}
