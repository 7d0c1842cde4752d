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

/** A row that reads as a header: at least two names, none of them a number, none repeated. */
function looksLikeHeader(r: RawRow): boolean {
  const named = r.cells.filter((c) => !isBlankCell(c));
  if (named.length < 2) return false;
  if (named.some((c) => typeof c !== 'string' || /^\s*[-+]?(\d[\d,.\s]*|\.\d+)([eE][-+]?\d+)?\s*%?\s*$/.test(c))) return false;
  return new Set(named.map((c) => String(c).trim())).size === named.length;
}

/**
 * The header is the first non-blank row, except that up to three title rows above it (one filled
 * cell each, as a sheet's title or a note) are skipped when the row after them reads as a header;
 * columns blank from top to bottom on the left are skipped too. Both are noted (in the table's
 * warnings), naming the row used as the header. Blank rows are dropped but keep their numbering.
 */
export function shapeTable(raw: RawRow[], sourceName: string, extra: Partial<DataTable> = {}): DataTable {
  let nonBlank = raw.filter((r) => r.cells.some((c) => !isBlankCell(c)));
  if (nonBlank.length === 0) throw new InputError(`${sourceName} has no rows.`, { file: sourceName });
  const notes: string[] = [];
  let titles = 0;
  const single = (r: RawRow) => r.cells.filter((c) => !isBlankCell(c)).length === 1;
  for (let k = 1; k <= 3 && k < nonBlank.length && single(nonBlank[k - 1]); k++) {
    if (looksLikeHeader(nonBlank[k])) {
      titles = k;
      break;
    }
  }
  if (titles > 0) {
    const shown = nonBlank.slice(0, titles).map((r) => `row ${r.row} ("${String(r.cells.find((c) => !isBlankCell(c))).trim().slice(0, 60)}")`);
    notes.push(`${sourceName}: ${shown.join(' and ')} ${titles === 1 ? 'looks like a title' : 'look like titles'} above the table and ${titles === 1 ? 'was' : 'were'} skipped; ` +
      `row ${nonBlank[titles].row} was used as the header. Remove the title rows if that is wrong.`);
    nonBlank = nonBlank.slice(titles);
  }
  // columns empty in every row, on the left: skipped, their letters kept in messages
  let lead = 0;
  while (nonBlank.every((r) => isBlankCell(r.cells[lead])) && nonBlank.some((r) => r.cells.length > lead + 1)) lead++;
  if (lead > 0) {
    notes.push(`${sourceName}: column${lead === 1 ? ` ${columnLetters(1)} is` : `s ${columnLetters(1)} to ${columnLetters(lead)} are`} empty and ${lead === 1 ? 'was' : 'were'} skipped; the table starts in column ${columnLetters(lead + 1)}.`);
    nonBlank = nonBlank.map((r) => ({ row: r.row, cells: r.cells.slice(lead) }));
  }
  const columnLetter = (k: number) => columnLetters(k + lead);
  const [head, ...body] = nonBlank;
  let width = head.cells.length;
  while (width > 0 && isBlankCell(head.cells[width - 1])) width--;
  const columns: string[] = [];
  const seen = new Map<string, number>();
  for (let k = 0; k < width; k++) {
    const name = head.cells[k] === null ? '' : String(head.cells[k]).trim();
    const where = `column ${k + 1 + lead} (${columnLetter(k + 1)})`;
    if (name === '') {
      throw new InputError(`${sourceName}: the header (row ${head.row}) has no name in ${where}; give every column a name.`, {
        file: sourceName, row: head.row, column: columnLetter(k + 1),
      });
    }
    const earlier = seen.get(name);
    if (earlier !== undefined) {
      throw new InputError(
        `${sourceName}: the header (row ${head.row}) names "${name}" twice, in column ${earlier + 1 + lead} (${columnLetter(earlier + 1)}) and ${where}; rename one.`,
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
          `${sourceName}: row ${row} has a value in column ${k + 1 + lead} (${columnLetter(k + 1)}), which has no header; ` +
            'add a header name or remove the value.',
          { file: sourceName, row, column: columnLetter(k + 1) },
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
  const warnings = [...notes, ...extra.warnings ?? []];
  return { sourceName, columns, rows, firstRow, ...(consecutive ? {} : { rowNumbers }), ...(lead ? { columnOffset: lead } : {}), ...extra, ...(warnings.length ? { warnings } : {}) };
}
