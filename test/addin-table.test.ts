// The sidebar's data step, checked against spreadsheet conventions: A1 column letters (A…Z, AA…,
// as Excel and every spreadsheet program address cells), sheet row numbers as the sheet shows them,
// and the engine's own CSV reader for the hand-over (the same rules as a CSV file, RFC 4180).
import { describe, expect, it } from 'vitest';
import { readBoundary, readTable } from '../src/geo/index.js';
import { cellOf, columnLetters, pointsLayer, profileTable, tableAsCsv } from '../addin/shared/table-profile.js';
import { sheetGrid, address } from '../addin/excel/report-grid.js';
import type { TableSnapshot } from '../addin/shared/types.js';

// A table whose header sits on sheet row 3, starting in column B, with a blank sheet row 5 between rows.
const TABLE: TableSnapshot = {
  sheet: 'Areas', headerRow: 3, firstColumn: 2,
  headers: ['name', 'area_code', 'rate', 'x', 'y'],
  rows: [['North', 'A-01', 3.5, 10, 20], ['South', 'A-02', '4,0', 11, 21], ['East', 'A-03', null, 12, 'n/a']],
  rowNumbers: [4, 6, 7],
};

describe('the data step', () => {
  it('names column kinds, blanks, and suggests the ID column by its name and unique values', () => {
    const p = profileTable(TABLE);
    expect(p.n).toBe(3);
    expect(p.suggestedId).toBe('area_code');
    expect(p.columns.find((c) => c.name === 'rate')).toMatchObject({ kind: 'mixed', blanks: 1 });
    expect(p.numeric).toEqual(['x']);
  });

  it('hands the table to the engine as CSV whose row numbers are the sheet’s (read back with the engine’s own reader)', async () => {
    const t = await readTable(tableAsCsv(TABLE));
    expect(t.columns).toEqual(TABLE.headers);
    expect(t.rowNumbers ?? t.rows.map((_, i) => t.firstRow + i)).toEqual([4, 6, 7]);
    expect(t.rows[0][1]).toBe('A-01');
  });

  it('addresses cells as the sheet shows them: spreadsheet column letters (A, Z, AA, AZ, BA)', () => {
    expect([1, 26, 27, 52, 53].map(columnLetters)).toEqual(['A', 'Z', 'AA', 'AZ', 'BA']);
    expect(cellOf(TABLE, 6, 'rate')).toBe('D6');
    expect(address(0, 27, 2, 2)).toBe('AB1:AC2');
  });

  it('makes points from coordinate columns and names the cell with no coordinate', async () => {
    const good = { ...TABLE, rows: TABLE.rows.slice(0, 2), rowNumbers: [4, 6] };
    const layer = await readBoundary([pointsLayer(good, 'area_code', 'x', 'y')]);
    expect(layer.areas.map((a) => a.geometry)).toEqual([{ kind: 'point', point: [10, 20] }, { kind: 'point', point: [11, 21] }]);
    expect(() => pointsLayer(TABLE, 'area_code', 'x', 'y')).toThrow(/Cell F7 of sheet "Areas" has no number/);
  });
});

describe('the sheet\'s table meets the engine\'s rules (issue #17: the same as a file\'s)', () => {
  const codes = ['D01', 'D\u000102', 'D03', 'D04'];
  const sheetTable = (ids: string[], extra: Partial<TableSnapshot> = {}): TableSnapshot => ({
    sheet: 'Areas', headerRow: 1, firstColumn: 1, headers: ['code', 'y', 'x'],
    rows: ids.map((id, i) => [id, i + 1.5, i * 2]), rowNumbers: ids.map((_, i) => i + 2), ...extra,
  });
  const squares = (ids: string[]) => ({
    name: 'areas.geojson',
    bytes: new TextEncoder().encode(JSON.stringify({
      type: 'FeatureCollection',
      features: ids.map((id, i) => ({ type: 'Feature', properties: { code: id }, geometry: { type: 'Polygon', coordinates: [[[i, 0], [i + 1, 0], [i + 1, 1], [i, 1], [i, 0]]] } })),
    })),
  });

  it('an ID holding a control character is refused with its sheet row, as in a file', async () => {
    const { runAnalysis } = await import('../src/pipeline/index.js');
    const run = runAnalysis({
      boundary: [squares(codes)], data: tableAsCsv(sheetTable(codes)), id: 'code', y: 'y', x: ['x'], weights: { method: 'rook' }, transform: 'row', models: ['ols'], permutations: 0,
    });
    await expect(run).rejects.toThrow(/sheet "Areas": the ID column "code" holds characters that are not text .*row 3 \("D\u000102": U\+0001\)/);
  });

  it('a column named after an object-prototype member is data like any other', async () => {
    const t = await readTable(tableAsCsv({ ...sheetTable(['A', 'B']), headers: ['__proto__', 'constructor', 'toString'] }));
    expect(t.columns).toEqual(['__proto__', 'constructor', 'toString']);
    const layer = await readBoundary([pointsLayer({ ...sheetTable(['A', 'B']), headers: ['constructor', 'y', 'x'] }, 'constructor', 'x', 'y')]);
    expect(layer.areas.map((a) => a.properties.constructor)).toEqual(['A', 'B']);
  });
});

describe('a report sheet laid out for Office.js', () => {
  it('puts blocks where the report layout says, one blank row apart, with number formats beside the values', () => {
    const grid = sheetGrid({
      name: 'T', role: 'model', blocks: [
        { kind: 'title', text: 'Title' },
        { kind: 'table', title: 'Numbers', columns: [{ header: 'id', format: 'text' }, { header: 'p', format: 'pvalue' }], rows: [['007', 0.00001]] },
      ],
    });
    expect(grid.values[0][0]).toBe('Title');
    expect(grid.values[2][0]).toBe('Numbers');
    expect(grid.values[3]).toEqual(['id', 'p']);
    expect(grid.values[4]).toEqual(['007', 0.00001]);
    expect(grid.formats[4]).toEqual(['@', '[<0.0001]"<0.0001";0.0000']);
    expect(grid.rows).toBe(5);
    expect(grid.styles.map((s) => s.style)).toEqual(['title', 'blockTitle', 'header']);
  });
});
