/** Reads a joined column as numbers, naming every row that does not hold one. */
import { InputError, listSome } from '../errors.js';
import type { JoinedAreas } from './types.js';
import { formulaNote } from './formula-note.js';

const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const COMMA_DECIMAL = /^[+-]?\d+,\d+([eE][+-]?\d+)?$/;
const THOUSANDS = /^[+-]?\d{1,3}([,.' ]\d{3})+([.,]\d+)?$/;
/** "1.000", "12.500.000": a dot every three digits, which in a decimal-comma file may group thousands */
export const DOT_GROUPED = /^[+-]?\d{1,3}(\.\d{3})+$/;

export function numericColumn(joined: JoinedAreas, name: string, opts: { allowMissing?: boolean } = {}): Float64Array {
  const cells = joined.column(name);
  const out = new Float64Array(cells.length);
  const text: string[] = [];
  const blank: number[] = [];
  const notFinite: string[] = [];
  const dotGrouped: string[] = [];
  let thousands = false;
  const word = joined.rowKind === 'feature' ? 'feature' : 'row';
  for (let i = 0; i < cells.length; i++) {
    const c = cells[i];
    const where = joined.rows[i];
    let v = NaN;
    if (typeof c === 'number') {
      if (Number.isFinite(c)) v = c;
      else notFinite.push(`${word} ${where} (${String(c)})`);
    } else if (c === null || (typeof c === 'string' && c.trim() === '')) {
      blank.push(where);
    } else if (typeof c === 'string') {
      const t = c.trim();
      if (joined.decimalComma && !joined.dotDecimals && DOT_GROUPED.test(t)) dotGrouped.push(`${word} ${where} ("${t}")`);
      else if (PLAIN_NUMBER.test(t)) v = Number(t);
      else if (joined.decimalComma && COMMA_DECIMAL.test(t)) v = Number(t.replace(',', '.'));
      else if (/^[+-]?(nan|inf|infinity)$/i.test(t)) notFinite.push(`${word} ${where} (${t})`);
      else {
        text.push(`${word} ${where} ("${t.length > 20 ? `${t.slice(0, 20)}…` : t}")`);
        if (THOUSANDS.test(t)) thousands = true;
      }
      if (!Number.isFinite(v) && PLAIN_NUMBER.test(t)) notFinite.push(`${word} ${where} (${t})`); // e.g. 1e999
    } else {
      text.push(`${word} ${where} (${String(c)})`);
    }
    out[i] = Number.isFinite(v) ? v : NaN;
  }
  if (dotGrouped.length) {
    // ambiguous even where missing values may be dropped: reading them either way would be a guess
    throw new InputError(
      `Column "${name}" holds numbers written with a dot in a file whose decimal separator is the comma: ${listSome(dotGrouped)}. ` +
        'Each could group thousands (1.000 = 1000) or be a decimal point (1.000 = 1); it is not guessed. ' +
        'Remove the dots from whole numbers, or write decimals with a comma (1,005).',
      { column: name, row: joined.rowKind === 'feature' ? undefined : Number(/\d+/.exec(dotGrouped[0])?.[0]) },
    );
  }
  if (opts.allowMissing || (text.length === 0 && blank.length === 0 && notFinite.length === 0)) return out;
  const parts: string[] = [];
  if (text.length) parts.push(`text in ${listSome(text)}`);
  if (blank.length) parts.push(`blank cells in ${word}${blank.length > 1 ? 's' : ''} ${listSome(blank)}`);
  const formulaRows = joined.formulasWithoutResult?.get(name)?.filter((r) => blank.includes(r)) ?? [];
  if (notFinite.length) parts.push(`NaN or infinite values in ${listSome(notFinite)}`);
  throw new InputError(
    `Column "${name}" must hold a number in every ${word}, but it has ${parts.join('; ')}. ` +
      (thousands ? 'Remove thousands separators. ' : '') +
      (formulaRows.length ? `${formulaNote(formulaRows)} ` : '') +
      'Fix these cells, or choose to leave rows with missing values out of the analysis.',
    { column: name, row: joined.rowKind === 'feature' ? undefined : joined.rows[firstBadIndex(cells)] },
  );
}

function firstBadIndex(cells: unknown[]): number {
  for (let i = 0; i < cells.length; i++) {
    const c = cells[i];
    if (!(typeof c === 'number' && Number.isFinite(c)) && !(typeof c === 'string' && PLAIN_NUMBER.test(c.trim()))) return i;
  }
  return 0;
}
