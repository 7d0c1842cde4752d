// Long tables streamed into the .xlsx give the same workbook as exceljs writing every cell: read back
// with exceljs (a general-purpose library), every sheet's values, number formats, pictures and frozen
// header agree with the cell-by-cell file, for a new workbook and for a copy of a user's workbook;
// LibreOffice-style readers need well-formed XML, checked here by the XML rules (XML 1.0: the five
// markup characters escaped, control characters other than tab, newline and return written as the
// format's _xHHHH_ escapes, so that text keeps them).
import { describe, expect, it } from 'vitest';
import ExcelJS from 'exceljs';
import { unzipSync } from 'fflate';
import { buildReport, type Cell, type Report } from '../src/report/index.js';
import { renderPng } from '../src/report/render-png.js';
import { readWorkbook, writeResultsWorkbook } from '../src/workbook/index.js';
import { nodeDeflate } from '../src/workbook/node-deflate.js';
import { templateRowCount } from '../src/workbook/stream-rows.js';
import { fakeResult } from './helpers/fake-result.js';

async function userWorkbook(): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  const data = wb.addWorksheet('Data');
  data.addRow(['ward', 'rate']);
  data.addRow(['W01', 4.25]);
  data.getCell('B2').numFmt = '0.0';
  wb.addWorksheet('By area').getCell('C3').value = 'kept';
  return new Uint8Array(await wb.xlsx.writeBuffer() as ArrayBuffer);
}

/** A report whose per-area table also holds the awkward cells: text in number columns, blanks, flags, markup. */
function awkwardReport(): Report {
  const report = buildReport(fakeResult(), { renderPng });
  const areas = report.sheets.find((s) => s.role === 'areas')!;
  const table = areas.blocks.find((b) => b.kind === 'table')!;
  if (table.kind !== 'table') throw new Error('no table');
  const extra: Cell[][] = [
    ['a<b>&"c\'', 7, NaN, null, true],
    [' leading and trailing ', -0, Infinity, 'text in a number column', false],
    ['ctl\u0001char', 1e-300, 1.7976931348623157e308, 12345678901234567, null],
  ];
  table.rows.push(...extra.map((r) => [...r, ...table.rows[0].slice(r.length)]));
  return report;
}

describe('long tables streamed into the workbook', () => {
  it('writes the same cells, formats, pictures and frozen header as exceljs cell by cell', async () => {
    const report = awkwardReport();
    const plain = await readWorkbook(await writeResultsWorkbook(report, { streamRowsAbove: Infinity }));
    for (const deflate of [undefined, nodeDeflate]) {
      const bytes = await writeResultsWorkbook(report, { streamRowsAbove: 0, deflate });
      // exceljs undoes the format's _xHHHH_ escapes (ECMA-376 Part 1, §22.9.2.19) in shared strings but
      // not in the streamed rows' inline strings; spreadsheet programs undo both (checked with
      // LibreOffice 7: "ctl\u0001char" reads back from either form), so the comparison undoes them here
      const streamed = (await readWorkbook(bytes)).map((sheet) => ({
        ...sheet,
        rows: sheet.rows.map((r) => r.map((c) => (typeof c === 'string' ? c.replace(/_x([0-9A-Fa-f]{4})_/g, (_m, h: string) => String.fromCharCode(parseInt(h, 16))) : c))),
      }));
      expect(streamed.map((s) => s.name)).toEqual(plain.map((s) => s.name));
      for (let i = 0; i < plain.length; i++) {
        expect(streamed[i].rows, plain[i].name).toEqual(plain[i].rows);
        expect(streamed[i].numberFormats, plain[i].name).toEqual(plain[i].numberFormats);
        expect(streamed[i].images).toEqual(plain[i].images);
        expect(streamed[i].frozenRows).toBe(plain[i].frozenRows);
      }
      const files = unzipSync(bytes);
      for (const [name, data] of Object.entries(files)) {
        if (!name.endsWith('.xml')) continue;
        const xml = new TextDecoder().decode(data);
        expect(/[\x00-\x08\x0B\x0C\x0E-\x1F\uFFFE\uFFFF]/.test(xml), name).toBe(false);
        expect(/&(?!(amp|lt|gt|quot|apos|#\d+);)/.test(xml), name).toBe(false);
      }
    }
  });

  it('keeps the user’s sheets of a copied workbook as they were', async () => {
    const base = await userWorkbook();
    const report = buildReport(fakeResult(), { renderPng });
    const plain = await readWorkbook(await writeResultsWorkbook(report, { base, streamRowsAbove: Infinity }));
    const streamed = await readWorkbook(await writeResultsWorkbook(report, { base, streamRowsAbove: 0, deflate: nodeDeflate }));
    expect(streamed.map((s) => s.name)).toEqual(plain.map((s) => s.name));
    expect(streamed[0].rows).toEqual([['ward', 'rate'], ['W01', 4.25]]);
    expect(streamed[0].numberFormats[1][1]).toBe('0.0');
    expect(streamed[1].rows[2][2]).toBe('kept');
    for (let i = 0; i < plain.length; i++) expect(streamed[i].rows, plain[i].name).toEqual(plain[i].rows);
  });

  it('writes through exceljs just enough rows to hold every kind of cell of each column', () => {
    expect(templateRowCount([])).toBe(0);
    expect(templateRowCount([['a', 1], ['b', 2]])).toBe(1);
    expect(templateRowCount([['a', 1], ['b', null], ['c', 'x'], ['d', 3]])).toBe(3);
    expect(templateRowCount([[null], [NaN], [true]])).toBe(3);
  });
});
