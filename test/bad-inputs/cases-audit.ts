/**
 * Further cases of issue #17's classes found by a later audit: look-alike IDs in a refused join,
 * TopoJSON arc indexes out of range, points under contiguity rules, rule numbers out of range (in
 * cases-reading.ts with the rule syntax), IDs a spreadsheet wrote as decimals in a neighbour list.
 */
import ExcelJS from 'exceljs';
import type { BadInput } from './case.js';
import { gridCodesOnly, gridCsv, gridFile, gridRows, gridSheet, json, text } from './make.js';

const A = 'audit: look-alike IDs, TopoJSON arcs, points, neighbour lists';

const rows = gridRows();
const points = () => json('points.geojson', {
  type: 'FeatureCollection',
  features: rows.map((r, i) => ({ type: 'Feature', properties: r, geometry: { type: 'Point', coordinates: [12 + (i % 4) * 0.5, 48 + Math.floor(i / 4) * 0.5] } })),
});
/** A topology of one square arc; the second feature's ring names `arc`. */
const topology = (arc: unknown) => json('zones.topojson', {
  type: 'Topology',
  arcs: [[[0, 0], [1, 0], [1, 1], [0, 1], [0, 0]]],
  objects: { zones: { type: 'GeometryCollection', geometries: [
    { type: 'Polygon', arcs: [[0]], properties: { ...rows[0] } },
    { type: 'Polygon', id: 'Z2', arcs: [[arc]], properties: { ...rows[1] } },
  ] } },
});
const tableLines = rows.map((r) => [r.code, r.y, r.x1, r.x2].join(',')).join('\n');
/** The grid with whole-number codes 1001…1016 and a ring of links through them. */
const numbered = rows.map((r, i) => ({ ...r, code: String(1001 + i) }));

export const auditCases: BadInput[] = [
  {
    group: A, name: 'IDs differing by the letter O for zero (DO2 vs D02): pointed out, not guessed',
    files: () => ({ boundary: [gridCodesOnly()], data: gridCsv('table.csv', (r) => { r[1][0] = 'DO2'; r[9][0] = 'Dl0'; }) }),
    expect: ['row 3 (DO2)', 'look like a boundary ID apart from spaces, letter case, the letter O for zero or l/I for one', '"DO2" vs "D02"', '"Dl0" vs "D10"'],
  },
  {
    group: A, name: 'IDs differing by an inner space and letter case (d 04 vs D04): pointed out, not guessed',
    files: () => ({ boundary: [gridCodesOnly()], data: gridCsv('table.csv', (r) => { r[3][0] = 'd 04'; }) }),
    expect: ['row 5 (d 04)', '"d 04" vs "D04"'],
  },
  {
    group: A, name: 'TopoJSON arc index past the last arc',
    files: () => ({ boundary: [topology(7)] }),
    expect: ['zones.topojson: object "zones", feature 2 (id "Z2") refers to arc 7', 'has 1 arc'],
  },
  {
    group: A, name: 'TopoJSON reversed arc index past the last arc',
    files: () => ({ boundary: [topology(-5)] }),
    expect: ['feature 2 (id "Z2") refers to arc -5', 'or -1 to -1 for an arc reversed'],
  },
  {
    group: A, name: 'TopoJSON with no arcs list at all',
    files: () => ({ boundary: [json('zones.topojson', { type: 'Topology', objects: { zones: { type: 'GeometryCollection', geometries: [{ type: 'Polygon', arcs: [[0]], properties: { ...rows[0] } }] } } })] }),
    expect: ['zones.topojson: object "zones", feature 1 refers to arc 0, but the topology has no arcs'],
  },
  {
    group: A, name: 'TopoJSON arc index that is not a whole number',
    files: () => ({ boundary: [topology(0.5)] }),
    expect: ['feature 2 (id "Z2") refers to arc 0.5'],
  },
  {
    group: A, name: 'points with queen contiguity: the rule named, k-nearest or a band suggested',
    files: () => ({ boundary: [points()] }),
    expect: ['Queen contiguity needs areas with boundaries, but every area is a point', 'knn:6', '--weights band:'],
  },
  {
    group: A, name: 'points with rook contiguity',
    files: () => ({ boundary: [points()] }), request: { weights: { method: 'rook' } },
    expect: ['Rook contiguity needs areas with boundaries', 'k-nearest neighbours'],
  },
  {
    group: A, name: 'neighbour list with IDs written 1001.0 for the areas 1001…: matched, and said so', outcome: 'warn',
    files: () => ({
      boundary: [gridFile('districts.geojson', undefined, { props: numbered })],
      edgeList: text('links.csv', 'from,to\n' + numbered.map((r, i) => `${r.code}.0,${numbered[(i + 1) % 16].code}\n${numbered[(i + 1) % 16].code},${r.code}.0`).join('\n') + '\n'),
    }),
    expect: ['links.csv writes 16 ID(s) with a decimal point (such as 1001.0', 'matched to the areas of the same whole number'],
  },
  {
    group: A, name: 'a title row above the header: skipped, and the row used as header named', outcome: 'warn',
    files: () => ({ boundary: [gridCodesOnly()], data: text('table.csv', `District survey (invented),,,\ncode,y,x1,x2\n${tableLines}\n`) }),
    expect: ['table.csv: row 1 ("District survey (invented)") looks like a title above the table and was skipped; row 2 was used as the header'],
  },
  {
    group: A, name: 'two title rows and a blank line above the header', outcome: 'warn',
    files: () => ({ boundary: [gridCodesOnly()], data: text('table.csv', `Survey of districts\nSource: invented\n\ncode,y,x1,x2\n${tableLines}\n`) }),
    expect: ['row 1 ("Survey of districts") and row 2 ("Source: invented") look like titles', 'row 4 was used as the header'],
  },
  {
    group: A, name: 'blank leading columns: skipped, and the first column named', outcome: 'warn',
    files: () => ({ boundary: [gridCodesOnly()], data: text('table.csv', `,,code,y,x1,x2\n${rows.map((r) => `,,${r.code},${r.y},${r.x1},${r.x2}`).join('\n')}\n`) }),
    expect: ['table.csv: columns A to B are empty and were skipped; the table starts in column C'],
  },
  {
    group: A, name: 'blank leading column with a text value under it: still refused, naming the column', 
    files: () => ({ boundary: [gridCodesOnly()], data: text('table.csv', `,code,y,x1,x2\n${rows.map((r, i) => `${i === 3 ? 'note' : ''},${r.code},${r.y},${r.x1},${r.x2}`).join('\n')}\n`) }),
    expect: ['table.csv: the header (row 1) has no name in column 1 (A)'],
  },
  {
    group: A, name: 'a workbook with a merged title row and an empty column A above and beside the table', outcome: 'warn',
    files: async () => {
      const wb = new ExcelJS.Workbook();
      const ws = wb.addWorksheet('Districts');
      ws.addRow([null, 'Districts of the invented region']);
      ws.mergeCells('B1:E1');
      for (const r of gridSheet()) ws.addRow([null, ...r]);
      return { boundary: [gridCodesOnly()], data: { name: 'book.xlsx', bytes: new Uint8Array(await wb.xlsx.writeBuffer() as ArrayBuffer) } };
    },
    expect: ['row 1 ("Districts of the invented region") looks like a title above the table and was skipped; row 2 was used as the header', 'column A is empty and was skipped'],
  },
  {
    group: A, name: 'neighbour list naming d0l for the area D01: refused, the look-alike pointed out',
    files: () => ({ boundary: [gridFile()], edgeList: text('links.csv', 'D02,D01\nd0l,D02\n') }),
    expect: ['links.csv, line 2: the origin ID d0l is not one of the areas. It looks like the area D01'],
  },
  {
    group: A, name: 'a negative number after an option (--draws -1): read as an option; the way to give it is named', engine: 'skip',
    files: () => ({ boundary: [gridFile()] }), cliExtra: ['--draws', '-1'],
    expect: ['--draws is followed by "-1", which starts with "-" and so reads as another option', 'write --draws=-1'],
  },
];
