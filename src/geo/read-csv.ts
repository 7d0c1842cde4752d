/** Delimited text (comma, semicolon or tab) read with papaparse; every cell stays text until used. */
import Papa from 'papaparse';
import { InputError } from '../errors.js';
import type { DataTable } from './types.js';
import { shapeTable, type RawRow } from './table-shape.js';
import { decodeText } from './decode-text.js';
import { DOT_GROUPED } from './numeric-column.js';

export function readCsv(bytes: Uint8Array, sourceName: string): DataTable {
  const decoded = decodeText(bytes, sourceName, { kind: 'a table (CSV or .xlsx)', latinFallback: true });
  const warnings = [...decoded.warnings];
  let text = decoded.text;
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (text.trim() === '') throw new InputError(`${sourceName} is empty.`, { file: sourceName });
  refuseJson(text, sourceName);

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
    ...(delimiter === ';' ? { decimalComma: true, ...(usesDotDecimals(raw) ? { dotDecimals: true } : {}) } : {}),
    ...(warnings.length ? { warnings } : {}),
  });
}

/**
 * In a semicolon file (where "3,5" reads as 3.5): whether the cells show dots as decimal points and
 * never commas, so that "1.250" is one and a quarter rather than one thousand two hundred and fifty.
 */
function usesDotDecimals(raw: RawRow[]): boolean {
  let dot = false;
  for (const r of raw) {
    for (const c of r.cells) {
      if (typeof c !== 'string') continue;
      const t = c.trim();
      if (/^[+-]?\d+,\d+([eE][+-]?\d+)?$/.test(t)) return false;
      if (!dot && /^[+-]?\d*\.\d+([eE][+-]?\d+)?$/.test(t) && !DOT_GROUPED.test(t)) dot = true;
    }
  }
  return dot;
}

/** A GeoJSON, TopoJSON or other JSON file given as the table: name it, rather than report its quotes. */
function refuseJson(text: string, sourceName: string): void {
  const start = text.trimStart();
  if (start[0] !== '{' && start[0] !== '[') return;
  const head = start.slice(0, 65536);
  const kind = /"type"\s*:\s*"Topology"/.test(head)
    ? 'TopoJSON'
    : /"type"\s*:\s*"(FeatureCollection|Feature)"/.test(head) ? 'GeoJSON' : 'JSON';
  throw new InputError(
    `${sourceName} holds ${kind}, not a table of rows and columns. ` +
      (kind === 'JSON' ? 'Save the table as CSV or .xlsx.' : 'Give it as the boundary file (--boundary); without a separate table its properties are the columns.'),
    { file: sourceName },
  );
}
