// Reading data tables. CSV inputs are hand-made (RFC 4180 quoting; semicolon lists with decimal
// commas as written by spreadsheet programs in many European locales — common practice). Workbooks are
// built here with exceljs, the same general-purpose library the product reads them with.
import { describe, expect, it } from 'vitest';
import ExcelJS from 'exceljs';
import { readTable } from '../src/geo/index.js';
import { failure } from './helpers/input-error.js';

const text = (s: string, name = 'data.csv') => ({ name, bytes: new TextEncoder().encode(s) });

describe('readTable: CSV', () => {
  it('strips a BOM, detects semicolons, keeps text and row numbers across blank lines', async () => {
    const t = await readTable(text('\uFEFFcode;rate;label\n001;3,5;North\n\n002;4,25;"South; coast"\n'));
    expect(t.columns).toEqual(['code', 'rate', 'label']);
    expect(t.rows).toEqual([['001', '3,5', 'North'], ['002', '4,25', 'South; coast']]);
    expect(t.firstRow).toBe(2);
    expect(t.rowNumbers).toEqual([2, 4]); // row 3 is blank in the file
    expect(t.decimalComma).toBe(true);
  });

  it('detects commas and tabs', async () => {
    expect((await readTable(text('a,b\n1,2\n'))).rows).toEqual([['1', '2']]);
    expect((await readTable(text('a\tb\n1\t2\n'))).rows).toEqual([['1', '2']]);
  });

  it('refuses duplicate and blank header names, naming the column position', async () => {
    const dup = await failure(readTable(text('id,x,id\n1,2,3\n')));
    expect(dup.message).toMatch(/names "id" twice, in column 1 \(A\) and column 3 \(C\)/);
    const blank = await failure(readTable(text('id,,y\n1,2,3\n')));
    expect(blank.message).toMatch(/no name in column 2 \(B\)/);
  });

  it('refuses values beyond the header, naming the row', async () => {
    const e = await failure(readTable(text('id,x\n1,2\n3,4,5\n')));
    expect(e.message).toMatch(/row 3 has a value in column 3 \(C\), which has no header/);
  });

  it('falls back to Windows-1252 with a warning', async () => {
    const bytes = Uint8Array.from([...new TextEncoder().encode('name\n'), 0x4d, 0xfc, 0x6e, 0x73, 0x74, 0x65, 0x72, 0x0a]);
    const t = await readTable({ name: 'old.csv', bytes });
    expect(t.rows[0][0]).toBe('Münster');
    expect(t.warnings?.join(' ')).toMatch(/not valid UTF-8/);
  });

  it('names an empty file', async () => {
    expect((await failure(readTable({ name: 'nothing.csv', bytes: new Uint8Array(0) }))).message).toMatch(/nothing\.csv is empty/);
  });
});

async function workbookBytes(): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  wb.addWorksheet('Notes').getCell('A1').value = 'invented figures for tests';
  const ws = wb.addWorksheet('Figures');
  // rows 1-2 left empty: the header is the first non-empty row
  ws.getRow(3).values = ['zone', 'income', 'note', 'when', 'share'];
  ws.getRow(4).values = ['Z1', 12.5, { richText: [{ text: 'rich ' }, { text: 'text' }] }, new Date(Date.UTC(2021, 2, 4)), { formula: 'B4/100', result: 0.125 }];
  ws.getRow(5).values = ['Z2', { error: '#N/A' }, 'plain', null, { formula: 'B5/100', result: { error: '#N/A' } }];
  ws.getRow(7).values = ['Z3', 7, null, null, 3];
  return new Uint8Array(await wb.xlsx.writeBuffer());
}

describe('readTable: xlsx', () => {
  it('reads a named sheet with header on the first non-empty row and plain cell values', async () => {
    const t = await readTable({ name: 'book.xlsx', bytes: await workbookBytes() }, { sheet: 'Figures' });
    expect(t.sheet).toBe('Figures');
    expect(t.columns).toEqual(['zone', 'income', 'note', 'when', 'share']);
    expect(t.firstRow).toBe(4);
    expect(t.rows[0]).toEqual(['Z1', 12.5, 'rich text', '2021-03-04', 0.125]);
    expect(t.rows[1]).toEqual(['Z2', '#N/A', 'plain', null, '#N/A']);
    expect(t.rows[2]).toEqual(['Z3', 7, null, null, 3]);
    expect(t.rowNumbers).toEqual([4, 5, 7]);
  });

  it('defaults to the first sheet, and lists the sheets when the named one is missing', async () => {
    const bytes = await workbookBytes();
    const first = await readTable({ name: 'book.xlsx', bytes });
    expect(first.sheet).toBe('Notes');
    const e = await failure(readTable({ name: 'book.xlsx', bytes }, { sheet: 'Data' }));
    expect(e.message).toMatch(/book\.xlsx has no sheet named "Data"; its sheets are "Notes", "Figures"/);
  });

  it('names a file that is not a workbook', async () => {
    const e = await failure(readTable({ name: 'broken.xlsx', bytes: new TextEncoder().encode('not a zip') }));
    expect(e.message).toMatch(/broken\.xlsx could not be opened as an \.xlsx workbook/);
  });
});
