/** .xlsx sheets read with exceljs. Formulas give their cached result; no formula is evaluated. */
import { unzipSync } from 'fflate';
import { InputError } from '../errors.js';
import { formatBytes } from './unzip.js';
import type { DataTable } from './types.js';
import { shapeTable, type Cell, type RawRow } from './table-shape.js';

export async function readXlsx(bytes: Uint8Array, sourceName: string, sheet?: string, maxBytes = 2 ** 30): Promise<DataTable> {
  checkExpansion(bytes, sourceName, maxBytes);
  // loaded on first use: exceljs takes about a third of a second to load, which a run reading
  // only CSV or GeoJSON should not pay
  const { default: ExcelJS } = await import('exceljs');
  const workbook = new ExcelJS.Workbook();
  try {
    // exceljs's typings want a Node Buffer; a Uint8Array is what it actually reads.
    await workbook.xlsx.load(bytes as unknown as ArrayBuffer);
  } catch (e) {
    throw new InputError(
      `${sourceName} could not be opened as an .xlsx workbook (${e instanceof Error ? e.message : String(e)}). ` +
        'Older .xls files must be saved as .xlsx first.',
      { file: sourceName },
    );
  }
  const sheets = workbook.worksheets;
  if (sheets.length === 0) throw new InputError(`${sourceName} has no worksheets.`, { file: sourceName });
  const ws = sheet === undefined ? sheets[0] : sheets.find((s) => s.name === sheet);
  if (!ws) {
    throw new InputError(
      `${sourceName} has no sheet named "${sheet}"; its sheets are ${sheets.map((s) => `"${s.name}"`).join(', ')}.`,
      { file: sourceName },
    );
  }
  const raw: RawRow[] = [];
  ws.eachRow({ includeEmpty: false }, (row, rowNumber) => {
    const cells: Cell[] = [];
    row.eachCell({ includeEmpty: false }, (cell, col) => {
      cells[col - 1] = cellValue(cell.value);
    });
    for (let k = 0; k < cells.length; k++) if (cells[k] === undefined) cells[k] = null;
    raw.push({ row: rowNumber, cells });
  });
  const table = shapeTable(raw, `${sourceName} (sheet "${ws.name}")`);
  return { ...table, sheet: ws.name };
}

/**
 * An .xlsx is a zip: its declared sizes (central directory, read by fflate without inflating
 * anything) are added up and checked against the cap before exceljs expands the parts.
 */
function checkExpansion(bytes: Uint8Array, sourceName: string, maxBytes: number): void {
  let declared = 0;
  try {
    unzipSync(bytes, { filter: (info) => { declared += info.originalSize; return false; } });
  } catch {
    return; // not readable as a zip: exceljs gives the error message
  }
  if (declared > maxBytes) {
    throw new InputError(
      `${sourceName} would expand to ${formatBytes(declared)}, more than the ${formatBytes(maxBytes)} limit for data tables.`,
      { file: sourceName },
    );
  }
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
