/**
 * .xlsx sheets read with exceljs. Formulas give their cached result; no formula is evaluated.
 * Read as the user sees the workbook:
 * - without a named sheet, the first *visible* sheet (a hidden first sheet is skipped, and a note
 *   says so);
 * - a merged range keeps its value in its top-left cell only (exceljs repeats it into every cell
 *   of the range, which would copy one area's value into the next row), and a note names the ranges;
 * - formulas without a saved result are remembered, so a blank they leave is named as such.
 * The archive is checked first (zip.ts): encrypted or misleading entries are refused and nothing
 * passes its declared size. Anything exceljs prints while loading is kept out of the terminal and
 * becomes a note.
 */
import { InputError, listSome } from '../errors.js';
import { formatBytes } from '../core/words.js';
import type { DataTable } from './types.js';
import { shapeTable, columnLetters, type Cell, type RawRow } from './table-shape.js';
import { expandEntry, listZip } from './zip.js';
import { capturingConsole } from './library-output.js';
import { formatCount } from '../core/count.js';

/** The workbook's sheets in order, with whether each is hidden, after the same archive checks as readXlsx. */
export async function workbookSheets(bytes: Uint8Array, sourceName: string, maxBytes = 2 ** 30): Promise<{ name: string; hidden: boolean }[]> {
  checkArchive(bytes, sourceName, maxBytes);
  const { workbook } = await loadWorkbook(bytes, sourceName);
  return workbook.worksheets.map((s) => ({ name: s.name, hidden: !(s.state === undefined || s.state === 'visible') }));
}

/** exceljs's workbook, with what the library printed while loading it (kept off the terminal). */
async function loadWorkbook(bytes: Uint8Array, sourceName: string) {
  // loaded on first use: exceljs takes about a third of a second to load, which a run reading
  // only CSV or GeoJSON should not pay
  const { default: ExcelJS } = await import('exceljs');
  const workbook = new ExcelJS.Workbook();
  const loaded = await capturingConsole(async () => {
    // exceljs's typings want a Node Buffer; a Uint8Array is what it actually reads.
    await workbook.xlsx.load(bytes as unknown as ArrayBuffer);
  });
  if (loaded.error) {
    const e = loaded.error;
    const long = longSheetName(bytes);
    if (long) {
      throw new InputError(
        `${sourceName} has a sheet name of ${long.length} characters ("${long.slice(0, 30)}…"), longer than the 31 that spreadsheets allow; ` +
          'the spreadsheet library cannot open the workbook. Rename the sheet in a spreadsheet program, save, and try again.',
        { file: sourceName },
      );
    }
    throw new InputError(
      `${sourceName} could not be opened as an .xlsx workbook (${e instanceof Error ? e.message : String(e)}). ` +
        'Older .xls files must be saved as .xlsx first.',
      { file: sourceName },
    );
  }
  return { workbook, said: loaded.said };
}

export async function readXlsx(bytes: Uint8Array, sourceName: string, sheet?: string, maxBytes = 2 ** 30): Promise<DataTable> {
  checkArchive(bytes, sourceName, maxBytes);
  const { workbook, said } = await loadWorkbook(bytes, sourceName);
  const warnings = said.map((s) => `While opening ${sourceName}, the spreadsheet library said: ${s}`);
  const sheets = workbook.worksheets;
  if (sheets.length === 0) throw new InputError(`${sourceName} has no worksheets.`, { file: sourceName });
  const visible = (s: (typeof sheets)[number]) => s.state === undefined || s.state === 'visible';
  let ws = sheet === undefined ? sheets.find(visible) ?? sheets[0] : sheets.find((s) => s.name === sheet);
  if (!ws && sheet !== undefined) {
    // a name longer than Excel's 31 characters was cut short by the library when it read the workbook
    const cut = sheets.filter((s) => s.name.length === 31 && sheet.length > 31 && sheet.startsWith(s.name));
    if (cut.length === 1) ws = cut[0];
  }
  if (!ws) {
    const alike = sheets.find((s) => s.name.trim().toLowerCase() === sheet!.trim().toLowerCase());
    throw new InputError(
      `${sourceName} has no sheet named "${sheet}"; its sheets are ${listSome(sheets.map((s) => `"${s.name}"${visible(s) ? '' : ' (hidden)'}`), 20)}.` +
        (alike ? ` "${alike.name}" differs only in letter case or spaces.` : ''),
      { file: sourceName },
    );
  }
  if (sheet === undefined && ws !== sheets[0]) {
    const skipped = sheets.slice(0, sheets.indexOf(ws)).map((s) => `"${s.name}"`);
    warnings.push(`${sourceName}: the first sheet${skipped.length > 1 ? 's' : ''} ${skipped.join(', ')} ${skipped.length > 1 ? 'are' : 'is'} hidden; the first visible sheet, "${ws.name}", was read. Name a sheet to read another.`);
  } else if (!visible(ws)) {
    warnings.push(`${sourceName}: the sheet "${ws.name}" is hidden in the workbook; it was read because it was named.`);
  }

  const raw: RawRow[] = [];
  const merged = new Set<string>();
  const uncached: { row: number; column: number }[] = [];
  ws.eachRow({ includeEmpty: false }, (row, rowNumber) => {
    const cells: Cell[] = [];
    row.eachCell({ includeEmpty: false }, (cell, col) => {
      if (cell.isMerged && cell.master !== cell) {
        merged.add(cell.master.address);
        cells[col - 1] = null;
        return;
      }
      const v = cell.value;
      if (isFormula(v) && !hasResult(v)) uncached.push({ row: rowNumber, column: col });
      cells[col - 1] = cellValue(v);
    });
    for (let k = 0; k < cells.length; k++) if (cells[k] === undefined) cells[k] = null;
    raw.push({ row: rowNumber, cells });
  });
  const name = `${sourceName} (sheet "${ws.name}")`;
  if (merged.size > 0) {
    const ranges = mergeRanges(ws, merged);
    warnings.push(
      `${name}: ${formatCount(ranges.length)} merged range${ranges.length > 1 ? 's' : ''} (${listSome(ranges)}); each keeps its value in its top-left cell only, ` +
        'and the other cells of the range read as blank. Unmerge them and fill every row if the value belongs to each.',
    );
  }
  const table = shapeTable(raw, name);
  const formulaCells = uncached.length
    ? (() => {
        // the column names of the header row, so notes can be attached to columns by name
        const byColumn = new Map<string, number[]>();
        for (const u of uncached) {
          const header = table.columns[u.column - 1 - (table.columnOffset ?? 0)] ?? columnLetters(u.column);
          byColumn.set(header, [...(byColumn.get(header) ?? []), u.row]);
        }
        return byColumn;
      })()
    : undefined;
  return {
    ...table,
    sheet: ws.name,
    ...(warnings.length ? { warnings: [...(table.warnings ?? []), ...warnings] } : {}),
    ...(formulaCells ? { formulasWithoutResult: formulaCells } : {}),
  };
}

/** The first sheet name in xl/workbook.xml longer than Excel's 31 characters, if any (the archive was checked already). */
function longSheetName(bytes: Uint8Array): string | null {
  try {
    const entry = listZip(bytes, '').find((e) => e.name === 'xl/workbook.xml');
    if (!entry) return null;
    const xml = new TextDecoder().decode(expandEntry(bytes, entry, ''));
    for (const m of xml.matchAll(/<sheet\b[^>]*\bname="([^"]*)"/g)) {
      const name = m[1].replace(/&(lt|gt|quot|apos|amp);/g, (_x, e: string) => ({ lt: '<', gt: '>', quot: '"', apos: "'", amp: '&' })[e as 'lt']);
      if (name.length > 31) return name;
    }
  } catch {
    return null;
  }
  return null;
}

function isFormula(v: unknown): v is Record<string, unknown> {
  return !!v && typeof v === 'object' && ('formula' in v || 'sharedFormula' in v);
}

function hasResult(v: Record<string, unknown>): boolean {
  return v.result !== undefined && v.result !== null;
}

/** The merged ranges (A1 notation) whose top-left cells are in `masters`. */
function mergeRanges(ws: { model: unknown }, masters: Set<string>): string[] {
  const all = ((ws.model as { merges?: string[] }).merges ?? []);
  const out = all.filter((r) => masters.has(r.split(':')[0]));
  return out.length ? out : [...masters];
}

/**
 * An .xlsx is a zip: its directory is read without inflating anything, the declared sizes are added
 * up and checked against the cap, and every entry is then inflated once without keeping it, stopping
 * the moment one passes its declared size, before exceljs expands the parts.
 */
function checkArchive(bytes: Uint8Array, sourceName: string, maxBytes: number): void {
  let entries;
  try {
    entries = listZip(bytes, sourceName);
  } catch (e) {
    throw new InputError(
      `${sourceName} could not be opened as an .xlsx workbook (${e instanceof Error ? e.message.replace(/^.*?\((.*)\)\.?$/, '$1') : String(e)}). ` +
        'Older .xls files must be saved as .xlsx first.',
      { file: sourceName },
    );
  }
  const names = entries.map((e) => e.name);
  if (!names.includes('[Content_Types].xml') || !names.some((n) => n.startsWith('xl/'))) {
    const boundary = names.some((n) => /\.(shp|geojson|json|topojson)$/i.test(n));
    throw new InputError(
      `${sourceName} is a zip archive, not an .xlsx workbook` +
        (boundary ? '; it holds boundary files, so give it as the boundary file (--boundary).' : '; the table must be CSV or .xlsx.'),
      { file: sourceName },
    );
  }
  const declared = entries.reduce((s, e) => s + e.size, 0);
  if (declared > maxBytes) {
    throw new InputError(
      `${sourceName} would expand to ${formatBytes(declared)}, more than the ${formatBytes(maxBytes)} limit for data tables.`,
      { file: sourceName },
    );
  }
  for (const e of entries) expandEntry(bytes, e, sourceName, { keep: false });
}

/** Plain value of an exceljs cell: rich text → text, formula → cached result, date → ISO text, error → its text. */
export function cellValue(v: unknown): Cell {
  if (v === null || v === undefined) return null;
  if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean') return v;
  if (v instanceof Date) return isoText(v);
  if (typeof v === 'object') {
    const o = v as Record<string, unknown>;
    if (Array.isArray(o.richText)) return (o.richText as { text?: string }[]).map((r) => r.text ?? '').join('');
    if ('formula' in o || 'sharedFormula' in o) return 'result' in o ? cellValue(o.result) : null;
    if (typeof o.error === 'string') return o.error;
    if ('text' in o) return cellValue(o.text);
  }
  return String(v);
}

/** Dates in workbooks carry no zone; exceljs returns them as UTC, so UTC fields give the shown date. */
function isoText(d: Date): string | null {
  if (Number.isNaN(d.getTime())) return null;
  const iso = d.toISOString();
  return iso.endsWith('T00:00:00.000Z') ? iso.slice(0, 10) : iso.replace(/\.000Z$/, 'Z');
}
