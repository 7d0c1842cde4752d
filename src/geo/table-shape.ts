/** Turns raw sheet rows (with their user-visible row numbers) into a DataTable with checked headers. */
import { InputError } from '../errors.js';
import type { DataTable } from './types.js';

export type Cell = string | number | boolean | null;

export interface RawRow {
  /** user-visible row number (1-based) */
  row: number;
  cells: Cell[];
}

export function isBlankCell(c: Cell | undefined): boolean {
  return c === null || c === undefined || (typeof c === 'string' && c.trim() === '');
}

/** Spreadsheet column letters for a 1-based position: 1 → A, 27 → AA. */
export function columnLetters(position: number): string {
  let s = '';
  for (let n = position; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
  return s;
}

/** The first non-blank row is the header; blank rows are dropped but keep their numbering. */
export function shapeTable(raw: RawRow[], sourceName: string, extra: Partial<DataTable> = {}): DataTable {
  const nonBlank = raw.filter((r) => r.cells.some((c) => !isBlankCell(c)));
  if (nonBlank.length === 0) throw new InputError(`${sourceName} has no rows.`, { file: sourceName });
  const [head, ...body] = nonBlank;
  let width = head.cells.length;
  while (width > 0 && isBlankCell(head.cells[width - 1])) width--;
  const columns: string[] = [];
  const seen = new Map<string, number>();
  for (let k = 0; k < width; k++) {
    const name = head.cells[k] === null ? '' : String(head.cells[k]).trim();
    const where = `column ${k + 1} (${columnLetters(k + 1)})`;
    if (name === '') {
      throw new InputError(`${sourceName}: the header (row ${head.row}) has no name in ${where}; give every column a name.`, {
        file: sourceName, row: head.row, column: columnLetters(k + 1),
      });
    }
    const earlier = seen.get(name);
    if (earlier !== undefined) {
      throw new InputError(
        `${sourceName}: the header (row ${head.row}) names "${name}" twice, in column ${earlier + 1} (${columnLetters(earlier + 1)}) and ${where}; rename one.`,
        { file: sourceName, row: head.row, column: name },
      );
    }
    seen.set(name, k);
    columns.push(name);
  }
  const rows: Cell[][] = new Array(body.length);
  const rowNumbers: number[] = new Array(body.length);
  for (let i = 0; i < body.length; i++) {
    const { row, cells } = body[i];
    for (let k = width; k < cells.length; k++) {
      if (!isBlankCell(cells[k])) {
        throw new InputError(
          `${sourceName}: row ${row} has a value in column ${k + 1} (${columnLetters(k + 1)}), which has no header; ` +
            'add a header name or remove the value.',
          { file: sourceName, row, column: columnLetters(k + 1) },
        );
      }
    }
    const out: Cell[] = new Array(width);
    for (let k = 0; k < width; k++) out[k] = cells[k] === undefined ? null : cells[k];
    rows[i] = out;
    rowNumbers[i] = row;
  }
  const firstRow = body.length > 0 ? rowNumbers[0] : head.row + 1;
  const consecutive = rowNumbers.every((r, i) => r === firstRow + i);
  return { sourceName, columns, rows, firstRow, ...(consecutive ? {} : { rowNumbers }), ...extra };
}
