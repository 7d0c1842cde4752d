/**
 * Read what the user meant, or say what was done (issue #17 part 3): hidden sheets, merged cells,
 * formulas without saved results, long sheet names, decimal commas with dot-grouped numbers, text
 * encodings, JSON or binary files given as tables, IDs that are not text, object-prototype names,
 * letter case in IDs, rule syntax, seeds and counts out of range, tolerances and bands that link
 * every pair, coordinates no map has, .dbf code pages and deleted records, ties and duplicates.
 */
import ExcelJS from 'exceljs';
import type { BadInput } from './case.js';
import type { NamedBytes } from './make.js';
import { csvFile, editZipPart, gridCodesOnly, gridCsv, gridFile, gridRows, gridSheet, json, squareRing, text } from './make.js';
import { dbf, pointShp } from '../fixtures/geo/make-shapefile.js';

const W = 'workbooks: hidden sheets, merged cells, formulas, long names';
const T = 'text: encodings, decimal commas, files of the wrong kind';
const I = 'IDs and names: characters that are not text, prototype names, letter case';
const R = 'rules and settings: syntax, seeds, counts, tolerances';
const G = 'geometry: coordinates, code pages, deleted records, ties and duplicates';

const withTable = (data: NamedBytes) => ({ boundary: [gridCodesOnly()], data });

async function book(build: (wb: ExcelJS.Workbook) => void, name = 'book.xlsx'): Promise<NamedBytes> {
  const wb = new ExcelJS.Workbook();
  build(wb);
  return { name, bytes: new Uint8Array(await wb.xlsx.writeBuffer() as ArrayBuffer) };
}

function sheetOf(wb: ExcelJS.Workbook, name: string, rows = gridSheet()): ExcelJS.Worksheet {
  const ws = wb.addWorksheet(name);
  for (const r of rows) ws.addRow(r);
  return ws;
}

const utf16le = (s: string, bom: boolean) => {
  const out = new Uint8Array((bom ? 2 : 0) + 2 * s.length);
  if (bom) out.set([0xff, 0xfe]);
  for (let i = 0; i < s.length; i++) {
    out[(bom ? 2 : 0) + 2 * i] = s.charCodeAt(i) & 0xff;
    out[(bom ? 2 : 0) + 2 * i + 1] = s.charCodeAt(i) >> 8;
  }
  return out;
};
const csvText = (edit?: (rows: (string | number)[][]) => void) => new TextDecoder().decode(gridCsv('t', edit).bytes);

/** A small TopoJSON topology (two squares sharing an arc). */
const topology = { type: 'Topology', objects: { zones: { type: 'GeometryCollection', geometries: [] } }, arcs: [[[0, 0], [1, 0]]] };

/** Point shapefile of the 4 × 4 grid's centres; `code` as raw bytes per record. */
function villages(code: (i: number) => string | Uint8Array = (i) => gridRows()[i].code, edit?: (dbfBytes: Uint8Array) => void) {
  const rows = gridRows();
  const shp = pointShp(rows.map((_, i) => ({ x: 12.25 + (i % 4) * 0.5, y: 48.25 + Math.floor(i / 4) * 0.5 })));
  const table = dbf(
    [{ name: 'code', type: 'C', length: 12 }, { name: 'y', type: 'N', length: 10 }, { name: 'x1', type: 'N', length: 10 }, { name: 'x2', type: 'N', length: 10 }],
    rows.map((g, i) => [code(i), String(g.y), String(g.x1), String(g.x2)]),
  );
  edit?.(table);
  return [{ name: 'villages.shp', bytes: shp }, { name: 'villages.dbf', bytes: table }];
}
/** Byte offset of record r (0-based) in the villages .dbf (header 32 + 4 × 32 + 1). */
const RECORD = (r: number) => 161 + r * 43;
const cyrillic1251 = (i: number) => Uint8Array.of(0xc4, 0xf0, 0xe0, 0xe9, 0x30 + Math.floor((i + 1) / 10), 0x30 + ((i + 1) % 10)); // "Драй01".. in code page 1251
const cyrillicText = (i: number) => `Драй${String(i + 1).padStart(2, '0')}`;
const KNN3 = { weights: { method: 'knn' as const, k: 3 } };

export const readingCases: BadInput[] = [
  // --- workbooks
  {
    group: W, name: 'hidden first sheet (stale) before the data: the first visible sheet is read, with a note', outcome: 'warn',
    files: async () => withTable(await book((wb) => {
      const old = sheetOf(wb, 'Old', gridSheet((r) => { r[1][1] = 'stale'; }));
      old.state = 'hidden';
      sheetOf(wb, 'Districts');
    })),
    expect: ['book.xlsx: the first sheet "Old" is hidden; the first visible sheet, "Districts", was read'],
  },
  {
    group: W, name: 'merged cells B3:B4 in the outcome: the lower cell is blank, and the merge is named with the refusal',
    files: async () => withTable(await book((wb) => { sheetOf(wb, 'Districts').mergeCells('B3:B4'); })),
    expect: ['Column "y"', 'blank cells in row 4', 'Noted while reading the files', 'merged range (B3:B4)'],
  },
  {
    group: W, name: 'formulas without saved results (named as such, not just "blank cells")',
    files: async () => withTable(await book((wb) => {
      const ws = sheetOf(wb, 'Districts');
      ws.getCell('B3').value = { formula: 'C3*2+D3' } as ExcelJS.CellFormulaValue;
      ws.getCell('B6').value = { formula: 'C6*2+D6' } as ExcelJS.CellFormulaValue;
    })),
    expect: ['Column "y"', 'blank cells in rows 3, 6', 'Rows 3, 6 hold a formula with no saved result', 'let it calculate, and save it again'],
  },
  {
    group: W, name: 'a 300-character sheet name: the cause named, and no library output printed first',
    request: { sheet: `Districts ${'of the Vell basin '.repeat(17)}`.slice(0, 300) },
    files: async () => {
      const long = `Districts ${'of the Vell basin '.repeat(17)}`.slice(0, 300);
      const b = await book((wb) => { sheetOf(wb, 'Districts'); });
      return withTable({ name: 'book.xlsx', bytes: editZipPart(b.bytes, 'xl/workbook.xml', (x) => x.replace('name="Districts"', `name="${long}"`)) });
    },
    expect: ['book.xlsx has a sheet name of 300 characters ("Districts of the Vell basin of…"), longer than the 31 that spreadsheets allow', 'Rename the sheet'],
  },
  {
    group: W, name: 'a sheet named for a CSV table (would be ignored)', request: { sheet: 'Districts' },
    files: () => withTable(gridCsv()),
    expect: ['table.csv is a text table (CSV), which has no sheets; the sheet "Districts" cannot be chosen in it'],
  },
  {
    group: W, name: 'a layer named for a single GeoJSON file (would be ignored)', request: { layer: 'counties' },
    files: () => ({ boundary: [gridFile()] }),
    expect: ['districts.geojson is a single GeoJSON layer; the layer "counties" names neither a TopoJSON object nor one of several files'],
  },
  {
    group: W, name: 'a layer naming another shapefile than the one given', request: { layer: 'rivers', weights: { method: 'knn', k: 3 } },
    files: () => ({ boundary: villages() }),
    expect: ['one shapefile, villages.shp; the layer "rivers" is not its name'],
  },
  // --- text
  {
    group: T, name: 'decimal-comma CSV with dot-grouped numbers (1.000, 1.005)',
    files: () => withTable(text('table.csv', csvText((r) => { r[2][1] = '1.000'; r[5][1] = '1.005'; }).replaceAll(',', ';').replace(/(\d)\.(\d\d)(?=;|\n)/g, '$1,$2'))),
    expect: ['Column "y" holds numbers written with a dot in a file whose decimal separator is the comma: row 4 ("1.000"), row 7 ("1.005")', 'it is not guessed'],
  },
  {
    group: T, name: 'UTF-16 CSV with a byte-order mark: read as text, so the message names the real fault',
    files: () => withTable({ name: 'table.csv', bytes: utf16le(csvText((r) => { r[2][1] = 'n/a'; }), true) }),
    expect: ['Column "y" must hold a number', 'row 4 ("n/a")'],
  },
  {
    group: T, name: 'UTF-16 CSV without a byte-order mark (read, with a note)', outcome: 'warn',
    files: () => withTable({ name: 'table.csv', bytes: utf16le(csvText(), false) }),
    expect: ['table.csv is UTF-16 text without a byte-order mark; it was read as UTF-16 little-endian'],
  },
  {
    group: T, name: 'GeoJSON given as the table (not "unmatched quote")',
    files: () => ({ boundary: [gridCodesOnly()], data: gridFile('districts.geojson') }),
    expect: ['districts.geojson holds GeoJSON, not a table of rows and columns', '--boundary'],
  },
  {
    group: T, name: 'TopoJSON given as the table',
    files: () => ({ boundary: [gridCodesOnly()], data: json('zones.json', topology) }),
    expect: ['zones.json holds TopoJSON, not a table'],
  },
  {
    group: T, name: 'a shapefile\'s .dbf given as the table',
    files: () => ({ boundary: [gridCodesOnly()], data: villages()[1] }),
    expect: ['villages.dbf is not a text file (it looks like a dBASE table (the attribute part of a shapefile, .dbf))'],
  },
  // --- IDs and names
  {
    group: I, name: 'table IDs with control characters (A\\u0001B would collapse into AB in a workbook)',
    files: () => withTable(text('table.csv', csvText((r) => { r[2][0] = 'D0\u00013'; }))),
    expect: ['table.csv: the ID column "code" holds characters that are not text', 'row 4 ("D0', ': U+0001)'],
  },
  {
    group: I, name: 'table ID carrying terminal codes (clear screen, a fake "spillway:" line)',
    files: () => withTable(text('table.csv', csvText((r) => { r[3][0] = '"\u001b[2J\u001b]0;owned\u0007\rspillway: all fine"'; }))),
    expect: ['the ID column "code" holds characters that are not text', 'row 5 ("', 'U+001B'],
  },
  {
    group: I, name: 'boundary ID with U+FFFE (not allowed in a workbook\'s XML)',
    files: () => ({ boundary: [gridFile('districts.geojson', (fc) => { fc.features[2].properties.code = 'D\uFFFE03'; })] }),
    expect: ['districts.geojson: the ID column "code" holds characters that are not text', 'feature 3 ("D', 'U+FFFE'],
  },
  {
    group: I, name: '--id constructor, present on only some features (never read as Object\'s constructor)', request: { id: 'constructor' },
    files: () => ({ boundary: [gridFile('districts.geojson', (fc) => { fc.features.slice(0, 3).forEach((f, i) => { f.properties.constructor = `C${i}`; }); })] }),
    expect: ['Joining by "constructor" failed', 'the ID is blank in features 4, 5, 6'],
  },
  {
    group: I, name: '--y toString, present on only some features', request: { y: 'toString' },
    files: () => ({ boundary: [gridFile('districts.geojson', (fc) => { fc.features.slice(0, 2).forEach((f) => { f.properties.toString = 5; }); })] }),
    expect: ['Column "toString" must hold a number in every feature', 'blank cells in features 3, 4'],
  },
  {
    group: I, name: '--layer constructor on a TopoJSON file', request: { layer: 'constructor' },
    files: () => ({ boundary: [json('zones.topojson', topology)] }),
    expect: ['zones.topojson: the TopoJSON file has no object named "constructor"; it has "zones"'],
  },
  {
    group: I, name: '--layer __proto__ on a TopoJSON file', request: { layer: '__proto__' },
    files: () => ({ boundary: [json('zones.topojson', topology)] }),
    expect: ['has no object named "__proto__"; it has "zones"'],
  },
  {
    group: I, name: 'IDs that match only when letter case is ignored (d01 vs D01): pointed out, not guessed',
    files: () => withTable(gridCsv('table.csv', (r) => { r[0][0] = 'd01'; r[1][0] = 'd02'; })),
    expect: ['row 2 (d01)', 'match a boundary ID when letter case is ignored', 'd01 vs D01'],
  },
  // --- rules and settings
  ...([
    ['queen:2', ['--weights queen:2: queen takes no number (queen), so "2" cannot be read', '--weights queen --order 2']],
    ['knn:3:7', ['--weights knn:3:7: knn takes one number (knn:K), so "7" cannot be read']],
    ['idw:1:1500:9', ['--weights idw:1:1500:9: idw takes at most 2 numbers (idw:POWER or idw:POWER:CUTOFF), so "9" cannot be read']],
    ['band:2:3', ['band takes one number (band:DISTANCE), so "3" cannot be read']],
    ['knn:0x10', ['the number of neighbours K (knn:K) must be a whole number of at least 1; got "0x10"']],
    ['band:-1', ['--weights band:-1: the distance (band:DISTANCE) must be a number above 0', 'kilometres for longitude/latitude', 'got "-1"']],
    ['knn:-2', ['the number of neighbours K (knn:K) must be a whole number of at least 1; got "-2"']],
    ['idw:-1', ['the power (idw:POWER) must be a number above 0', 'got "-1"']],
    ['idw:2:0', ['the cut-off (idw:POWER:CUTOFF) must be a number above 0', 'got "0"']],
    ['band:', ['the distance (band:DISTANCE) must be a number above 0', 'none was given']],
    ['rook:', ['rook takes no number']],
  ] as const).map(([rule, expect]): BadInput => ({
    group: R, name: `rule syntax: --weights ${rule} (every part read, none ignored)`, engine: 'skip',
    files: () => ({ boundary: [gridFile()] }), cliExtra: ['--weights', rule], expect: [...expect],
  })),
  {
    group: R, name: 'rule syntax: --tolerance with a rule that has none', engine: 'skip',
    files: () => ({ boundary: [gridFile()] }), cliExtra: ['--weights', 'knn:4', '--tolerance', '0.1'], expect: ['--tolerance applies to queen or rook neighbours only'],
  },
  {
    group: R, name: 'rule syntax: --weights beside --neighbours (one would be ignored)', engine: 'skip',
    files: () => ({ boundary: [gridFile()], edgeList: text('links.csv', 'D01,D02\nD02,D01\n') }), cliExtra: ['--weights', 'rook'],
    expect: ['--neighbours reads the neighbours from a list, so --weights would be ignored'],
  },
  ...([2 ** 32, 1e300, 1e301].map((seed): BadInput => ({
    group: R, name: `seed ${seed} (outside the 32 bits the generator keeps)`, request: { seed },
    files: () => ({ boundary: [gridFile()] }), expect: ['must be a whole number from 0 to 4,294,967,295'],
  }))),
  {
    group: R, name: '--draws 1e8 (capped with a stated range, not minutes without progress)', request: { impactDraws: 1e8, models: ['ols', 'lag'] }, cliExtra: ['--draws', '1e8'],
    files: () => ({ boundary: [gridFile()] }), expect: ['from 2 to 100,000'],
  },
  {
    group: R, name: '--permutations 1e9', request: { permutations: 1e9 }, cliExtra: ['--permutations', '1e9'],
    files: () => ({ boundary: [gridFile()] }), expect: ['from 0 to 99,999'],
  },
  {
    group: R, name: '--tolerance 1e308 (would link every pair)', request: { weights: { method: 'queen', tolerance: 1e308 } },
    files: () => ({ boundary: [gridFile()] }), expect: ['With a snapping tolerance of 1e+308, every area is a queen neighbour of every other', 'the whole map spans 2 by 2'],
  },
  {
    group: R, name: 'a tolerance wider than the areas (links areas that do not touch: noted)', request: { weights: { method: 'rook', tolerance: 0.4 } }, outcome: 'warn',
    files: () => ({ boundary: [gridFile()] }), expect: ['The snapping tolerance 0.4 is more than half the width of a typical area (0.5'],
  },
  {
    group: R, name: 'distance band of 1e308 (links every pair)', request: { weights: { method: 'band', distance: 1e308 } },
    files: () => ({ boundary: [gridFile()] }), expect: ['every area is a neighbour of every other', 'Use a smaller distance'],
  },
  // --- geometry
  {
    group: G, name: 'coordinates of 1e300 (not "zero area")',
    files: () => ({ boundary: [gridFile('districts.geojson', (fc) => { fc.features[4].geometry.coordinates = [squareRing(1e300, 1e300, 1e299)]; })] }),
    expect: ['feature 5 (code D05) has a coordinate (1e+300, 1e+300) at ring 1, position 1 beyond ±1e12'],
  },
  {
    group: G, name: 'a polygon too small for its area to be computed (1e-200 wide)',
    files: () => ({ boundary: [gridFile('districts.geojson', (fc) => { fc.features[4].geometry.coordinates = [squareRing(1e-200, 1e-200, 1e-200)]; })] }),
    expect: ['feature 5 (code D05) has ring 1 spanning only 1e-200 by 1e-200 coordinate units, too small for its area to be computed'],
  },
  {
    group: G, name: '.dbf in code page 1251 named by its header byte (no .cpg): read with it, and the join works', outcome: 'warn', request: KNN3,
    files: () => ({
      boundary: villages(cyrillic1251, (b) => { b[29] = 0xc9; }),
      data: csvFile('table.csv', ['code', 'y', 'x1', 'x2'], gridRows().map((g, i) => [cyrillicText(i), g.y, g.x1, g.x2])),
    }),
    expect: ['villages.dbf has text that is not valid UTF-8 (first in field code, feature 1); it was read with code page 1251, which its header names'],
  },
  // MS-DOS code pages named by the header's language driver byte (0x01 437, 0x02 850, 0x64 852, 0x66 865),
  // decoded by src/geo/single-byte.ts; the byte strings were encoded with Python's codecs (cp437, cp850, cp852, cp865)
  ...([
    [437, 0x01, 'Müller', [77, 129, 108, 108, 101, 114]],
    [850, 0x02, 'Façade', [70, 97, 135, 97, 100, 101]],
    [852, 0x64, 'Łódź', [157, 162, 100, 171]],
    [865, 0x66, 'Ørsted', [157, 114, 115, 116, 101, 100]],
  ] as const).map(([cp, driver, word, bytes]): BadInput => ({
    group: G, name: `.dbf in the MS-DOS code page ${cp} named by its header byte: decoded by its table, and the join works`, outcome: 'warn', request: KNN3,
    files: () => ({
      boundary: villages((i) => Uint8Array.of(...bytes, 0x30 + Math.floor((i + 1) / 10), 0x30 + ((i + 1) % 10)), (b) => { b[29] = driver; }),
      data: csvFile('table.csv', ['code', 'y', 'x1', 'x2'], gridRows().map((g, i) => [`${word}${String(i + 1).padStart(2, '0')}`, g.y, g.x1, g.x2])),
    }),
    expect: [`it was read with the MS-DOS code page ${cp}, which its header names`],
  })),
  {
    group: G, name: '.dbf in an unnamed code page: the encoding note is shown with the join error, not hidden by it', request: KNN3,
    files: () => ({
      boundary: villages(cyrillic1251),
      data: csvFile('table.csv', ['code', 'y', 'x1', 'x2'], gridRows().map((g, i) => [cyrillicText(i), g.y, g.x1, g.x2])),
    }),
    expect: ['have an ID with no feature in villages.shp', 'Noted while reading the files: villages.dbf has text that is not valid UTF-8', 'read as Windows-1252'],
  },
  {
    group: G, name: 'dBASE records marked deleted: left out with their shapes, and named', outcome: 'warn', request: KNN3,
    files: () => ({ boundary: villages(undefined, (b) => { b[RECORD(2)] = 0x2a; b[RECORD(6)] = 0x2a; }) }),
    expect: ['villages.dbf marks 2 record(s) as deleted (feature 3, feature 7); they were left out with their shapes'],
  },
  {
    group: G, name: '20 points at one place with knn:3 (ties and coincidence named)', outcome: 'warn', request: { weights: { method: 'knn', k: 3 } },
    files: () => {
      const rows = gridRows(6, 6);
      return { boundary: [json('villages.geojson', { type: 'FeatureCollection', features: rows.map((r, i) => ({ type: 'Feature', properties: r, geometry: { type: 'Point', coordinates: i < 20 ? [12, 48] : [12 + (i % 6) * 0.3, 48 + Math.floor(i / 6) * 0.3] } })) })] };
    },
    expect: ['20 areas share their location with another area (1 place; D01 (feature 1), D02 (feature 2)', 'decided by ties', 'tied at the k-th nearest distance'],
  },
  {
    group: G, name: 'an exact duplicate polygon (warned)', outcome: 'warn',
    files: () => ({ boundary: [gridFile('districts.geojson', (fc) => { fc.features[5].geometry = structuredClone(fc.features[9].geometry); })] }),
    expect: ['1 pair(s) of areas have exactly the same shape: D06 (feature 6) and D10 (feature 10)'],
  },
  {
    group: G, name: 'a part overlapping another area (warned)', outcome: 'warn',
    files: () => ({
      boundary: [gridFile('districts.geojson', (fc) => {
        const g = fc.features[5].geometry;
        fc.features[5].geometry = { type: 'MultiPolygon', coordinates: [g.coordinates, [squareRing(12.6, 48.1, 0.2)]] };
      })],
    }),
    expect: ['1 overlap(s) between areas or between the parts of one area', 'D02 (feature 2) and D06 (feature 6)'],
  },
  {
    group: G, name: 'a duplicated part inside one area (warned)', outcome: 'warn',
    files: () => ({
      boundary: [gridFile('districts.geojson', (fc) => {
        const g = fc.features[5].geometry;
        fc.features[5].geometry = { type: 'MultiPolygon', coordinates: [g.coordinates, structuredClone(g.coordinates)] };
      })],
    }),
    expect: ['part 1 of D06 (feature 6) and another of its parts'],
  },
];
