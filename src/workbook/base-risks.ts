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
  [/^xl\/ctrlProps\//, 'form controls'],
  [/^xl\/activeX\//, 'ActiveX controls'],
  [/^xl\/embeddings\//, 'embedded objects'],
  [/^xl\/queryTables\/|^xl\/connections\.xml$/, 'data connections'],
  [/^xl\/webextensions\//, 'add-in parts'],
];

/**
 * Parts whose content tells: drawings holding shapes or text boxes (exceljs keeps only pictures of
 * a drawing), and sheets holding sparklines or data validations in the 2010 extension (exceljs reads
 * neither). Looked for in the XML text, in parts up to a size (a sheet larger than that is not read
 * here; the copy's other checks still apply).
 */
const CONTENT: [RegExp, RegExp, string][] = [
  [/^xl\/drawings\/[^/]+\.xml$/, /<(?:\w+:)?(?:sp|grpSp|cxnSp)[\s>]/, 'shapes or text boxes'],
  [/^xl\/worksheets\/[^/]+\.xml$/, /<(?:\w+:)?sparklineGroups?[\s>]/, 'sparklines'],
];
const CONTENT_MAX_BYTES = 32 * 2 ** 20;

/** Plain names of the parts of `base` that would not survive the copy (empty when none, or when it is not a zip). */
export function baseWorkbookRisks(base: Uint8Array): string[] {
  const found = new Set<string>();
  let workbookXml: Uint8Array | undefined;
  try {
    const parts = unzipSync(base, {
      filter: (file) => {
        for (const [re, what] of PARTS) if (re.test(file.name)) found.add(what);
        // only the small list of sheets and parts checked by content are inflated, each below a size
        // (the archive passed the size checks when it was read)
        if (file.name === 'xl/workbook.xml') return file.originalSize < 16 * 2 ** 20;
        return CONTENT.some(([re]) => re.test(file.name)) && file.originalSize < CONTENT_MAX_BYTES;
      },
    });
    workbookXml = parts['xl/workbook.xml'];
    for (const [name, bytes] of Object.entries(parts)) {
      if (name === 'xl/workbook.xml') continue;
      const xml = new TextDecoder().decode(bytes);
      for (const [re, content, what] of CONTENT) if (re.test(name) && content.test(xml)) found.add(what);
      // a validation list in the 2010 extension (x14): exceljs keeps only the main ones
      if (/^xl\/worksheets\//.test(name) && /<x14:dataValidations?[\s>]/.test(xml)) found.add('data validations of the 2010 format');
    }
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
