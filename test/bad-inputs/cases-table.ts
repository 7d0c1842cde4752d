/** Bad tables and joins: IDs, numeric columns, CSV and .xlsx problems, table caps. */
import type { BadInput } from './case.js';
import { claimSize, csvFile, gridCodesOnly, gridCsv, gridFile, gridSheet, text, xlsxFile } from './make.js';

const I = 'IDs: blank, duplicated, unmatched, zero-padded';
const N = 'numeric columns: text, blanks, NaN, Infinity';
const X = 'tables: CSV and .xlsx';
const CAP = 'size caps';

const withTable = (data: ReturnType<typeof gridCsv>, boundary = gridCodesOnly()) => ({ boundary: [boundary], data });
const codes16 = Array.from({ length: 16 }, (_, i) => String(1001 + i));

export const tableCases: BadInput[] = [
  // --- IDs
  { group: I, name: 'ID column missing from the boundary file', request: { id: 'district' }, files: () => ({ boundary: [gridFile()] }), expect: ['has no property "district" to join by', '"code"'] },
  {
    group: I, name: 'ID column missing from the table', request: { id: 'code' },
    files: () => ({ boundary: [gridCodesOnly()], data: csvFile('table.csv', ['district', 'y', 'x1', 'x2'], [['D01', 1, 2, 3]]) }),
    expect: ['table.csv has no column "code" to join by', '"district"'],
  },
  { group: I, name: 'blank ID in a table row', files: () => withTable(gridCsv('table.csv', (r) => { r[3][0] = ''; })), expect: ['table.csv: the ID is blank in row 5'] },
  {
    group: I, name: 'blank ID on a feature',
    files: () => ({ boundary: [gridFile('districts.geojson', (fc) => { fc.features[2].properties.code = '  '; })] }),
    expect: ['the ID is blank in feature 3'],
  },
  { group: I, name: 'ID repeated in the table', files: () => withTable(gridCsv('table.csv', (r) => { r[4][0] = 'D03'; })), expect: ['IDs appear more than once: D03 (rows 4, 6)'] },
  {
    group: I, name: 'ID repeated on two features',
    files: () => ({ boundary: [gridFile('districts.geojson', (fc) => { fc.features[9].properties.code = 'D02'; })] }),
    expect: ['IDs appear on more than one feature: D02 (features 2, 10)'],
  },
  { group: I, name: 'table ID with no feature', files: () => withTable(gridCsv('table.csv', (r) => { r[5][0] = 'D99'; })), expect: ['row 7 (D99)', 'no feature in districts.geojson'] },
  {
    group: I, name: 'numbers vs zero-padded text (1001 vs 01001): reported, not guessed',
    files: () => withTable(
      gridCsv('table.csv', (r) => r.forEach((row, i) => { row[0] = codes16[i]; })),
      gridCodesOnly('districts.geojson', codes16.map((c) => `0${c}`)),
    ),
    expect: ['differ only by leading zeros', '1001 vs 01001', 'row 2 (1001)'],
  },
  // --- numeric columns
  { group: N, name: 'text in the outcome', files: () => withTable(gridCsv('table.csv', (r) => { r[2][1] = 'n/a'; })), expect: ['Column "y" must hold a number', 'row 4 ("n/a")'] },
  { group: N, name: 'blank explanatory cell', files: () => withTable(gridCsv('table.csv', (r) => { r[5][2] = ''; })), expect: ['Column "x1"', 'blank cells in row 7', 'leave rows with missing values out'] },
  { group: N, name: 'NaN in a column', files: () => withTable(gridCsv('table.csv', (r) => { r[1][3] = 'NaN'; })), expect: ['Column "x2"', 'NaN or infinite values in row 3 (NaN)'] },
  { group: N, name: 'Infinity in a column', files: () => withTable(gridCsv('table.csv', (r) => { r[8][1] = '-Infinity'; })), expect: ['Column "y"', 'row 10 (-Infinity)'] },
  { group: N, name: 'a number too large for double precision', files: () => withTable(gridCsv('table.csv', (r) => { r[0][2] = '1e999'; })), expect: ['Column "x1"', 'row 2 (1e999)'] },
  {
    group: N, name: 'thousands separators', files: () => withTable(gridCsv('table.csv', (r) => { r[3][1] = '"1,234"'; })),
    expect: ['Column "y"', 'row 5 ("1,234")', 'Remove thousands separators'],
  },
  {
    group: N, name: 'NaN and Infinity in the boundary file\'s own attributes',
    files: () => ({ boundary: [text('districts.geojson', JSON.stringify(gridFileObject()).replace('"x2":', '"x2":"Infinity","old":'))] }),
    expect: ['Column "x2"', 'feature 1 (Infinity)'],
  },
  { group: N, name: 'outcome column that does not exist', request: { y: 'yield' }, files: () => withTable(gridCsv()), expect: ['There is no column "yield" in table.csv'] },
  {
    group: N, name: 'every row missing, with missing rows dropped', request: { dropMissing: true },
    files: () => withTable(gridCsv('table.csv', (r) => r.forEach((row) => { row[1] = ''; }))),
    expect: ['Every row has a missing value', 'nothing is left'],
  },
  // --- CSV and xlsx
  { group: X, name: 'CSV with an unmatched quote', files: () => withTable(gridCsv('table.csv', (r) => { r[2][0] = '"D03'; })), expect: ['table.csv: row', 'unmatched quote'] },
  {
    group: X, name: 'CSV header naming a column twice',
    files: () => withTable(csvFile('table.csv', ['code', 'y', 'x1', 'y'], [['D01', 1, 2, 3]])),
    expect: ['header (row 1) names "y" twice, in column 2 (B) and column 4 (D)'],
  },
  {
    group: X, name: 'CSV header with a blank name',
    files: () => withTable(csvFile('table.csv', ['code', '', 'x1', 'x2'], [['D01', 1, 2, 3]])),
    expect: ['header (row 1) has no name in column 2 (B)'],
  },
  { group: X, name: 'CSV value beyond the header', files: () => withTable(gridCsv('table.csv', (r) => { r[6].push(99); })), expect: ['table.csv: row 8 has a value in column 5 (E), which has no header'] },
  { group: X, name: 'CSV that is only a header', files: () => withTable(csvFile('table.csv', ['code', 'y', 'x1', 'x2'], [])), expect: ['table.csv has a header (row 1) but no data rows'] },
  {
    group: X, name: 'non-UTF-8 CSV text (read as Windows-1252, with a warning)', outcome: 'warn',
    files: () => {
      const csv = gridCsv('table.csv').bytes;
      const withName = new Uint8Array([...new TextEncoder().encode('code,y,x1,x2,name\n'), ...csv.slice(csv.indexOf(10) + 1, csv.length - 1), ...new TextEncoder().encode(',Dorf M'), 0xfc, 0x68, 0x6c, 0x65, 10]);
      return withTable({ name: 'table.csv', bytes: withName });
    },
    expect: ['table.csv is not valid UTF-8; it was read as Windows-1252'],
  },
  {
    group: X, name: '.xlsx without the named sheet', request: { sheet: 'Data' },
    files: async () => ({ boundary: [gridCodesOnly()], data: await xlsxFile('book.xlsx', { Districts: gridSheet() }) }),
    expect: ['book.xlsx has no sheet named "Data"', '"Districts"'],
  },
  {
    group: X, name: '.xlsx without the named column', request: { x: ['x1', 'rainfall'] },
    files: async () => ({ boundary: [gridCodesOnly()], data: await xlsxFile('book.xlsx', { Districts: gridSheet() }) }),
    expect: ['There is no column "rainfall" in book.xlsx (sheet "Districts")'],
  },
  {
    group: X, name: '.xlsx with text in a numeric cell (sheet row numbers)',
    files: async () => ({ boundary: [gridCodesOnly()], data: await xlsxFile('book.xlsx', { Districts: gridSheet((r) => { r[6][3] = 'about 4'; }) }) }),
    expect: ['Column "x2"', 'row 7 ("about 4")'],
  },
  {
    group: X, name: '.xlsx with a blank header cell',
    files: async () => ({ boundary: [gridCodesOnly()], data: await xlsxFile('book.xlsx', { Districts: gridSheet((r) => { r[0][2] = null; }) }) }),
    expect: ['book.xlsx (sheet "Districts"): the header (row 1) has no name in column 3 (C)'],
  },
  { group: X, name: 'a damaged .xlsx', files: () => withTable(text('book.xlsx', 'PK\u0003\u0004 not a workbook')), expect: ['book.xlsx could not be opened as an .xlsx workbook'] },
  {
    group: X, name: 'old-style .xls',
    files: () => withTable({ name: 'book.xls', bytes: Uint8Array.of(0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1, 0, 0) }),
    expect: ['book.xls is an old-style .xls workbook'],
  },
  // --- caps
  {
    group: CAP, name: '.xlsx whose sheet would expand past the cap (claimed 3.75 GiB)',
    files: async () => {
      const book = await xlsxFile('book.xlsx', { Districts: gridSheet() });
      return { boundary: [gridCodesOnly()], data: { name: 'book.xlsx', bytes: claimSize(book.bytes, 'xl/worksheets/sheet1.xml', 0xf0000000) } };
    },
    expect: ['book.xlsx would expand to 3.75 GiB, more than the 1 GiB limit'],
  },
  {
    group: CAP, name: 'table over a stated cap', request: { maxBytes: 4096 }, cli: 'skip',
    cliNote: 'covered on the command line by the 1 GiB sparse-file case in corpus.test.ts',
    files: () => ({ boundary: [gridCodesOnly()], data: gridCsv('table.csv', (r) => r.forEach((row) => { row[3] = `${row[3]}${' '.repeat(300)}`; })) }),
    expect: ['table.csv is', 'over the 4 KiB limit'],
  },
];

function gridFileObject() {
  return JSON.parse(new TextDecoder().decode(gridFile().bytes));
}
