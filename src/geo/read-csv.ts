/** Delimited text (comma, semicolon or tab) read with papaparse; every cell stays text until used. */
import Papa from 'papaparse';
import { InputError } from '../errors.js';
import type { DataTable } from './types.js';
import { shapeTable, type RawRow } from './table-shape.js';

export function readCsv(bytes: Uint8Array, sourceName: string): DataTable {
  const warnings: string[] = [];
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes); // drops a UTF-8 byte-order mark
  } catch {
    text = new TextDecoder('windows-1252').decode(bytes);
    warnings.push(`${sourceName} is not valid UTF-8; it was read as Windows-1252. Save it as UTF-8 if letters look wrong.`);
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (text.trim() === '') throw new InputError(`${sourceName} is empty.`, { file: sourceName });

  // Guess the delimiter on a preview without blank lines (blank lines upset papaparse's guess), then
  // parse everything keeping blank lines so row numbers match what a spreadsheet shows.
  const guess = Papa.parse<string[]>(text.slice(0, 65536), {
    delimitersToGuess: [',', ';', '\t'],
    skipEmptyLines: 'greedy',
    preview: 50,
  });
  const delimiter = guess.meta.delimiter || ',';
  const parsed = Papa.parse<string[]>(text, { delimiter, skipEmptyLines: false });
  const fatal = parsed.errors.find((e) => e.type === 'Quotes');
  if (fatal) {
    const row = (fatal.row ?? 0) + 1;
    throw new InputError(`${sourceName}: row ${row} has an unmatched quote (${fatal.message}); check the quoting there.`, {
      file: sourceName, row,
    });
  }
  const raw: RawRow[] = parsed.data.map((cells, i) => ({
    row: i + 1,
    cells: cells.map((c) => (c.trim() === '' ? null : c)),
  }));
  return shapeTable(raw, sourceName, {
    ...(delimiter === ';' ? { decimalComma: true } : {}),
    ...(warnings.length ? { warnings } : {}),
  });
}
