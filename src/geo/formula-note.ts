import { listSome } from '../errors.js';

/** Why cells that hold formulas read as blank, and how to fix it. */
export function formulaNote(rows: number[]): string {
  return `Row${rows.length > 1 ? 's' : ''} ${listSome(rows)} hold${rows.length > 1 ? '' : 's'} a formula with no saved result ` +
    '(the workbook was written by a program that does not calculate, or saved without calculating). ' +
    'Open it in a spreadsheet program, let it calculate, and save it again.';
}
