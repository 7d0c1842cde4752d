// Joining tables to boundaries, numeric columns and subsets. Inputs are invented: a small grid of
// unit squares whose IDs and values are written here, so every expected row/feature is known by construction.
import { describe, expect, it } from 'vitest';
import { joinAreas, numericColumn, readBoundary, readTable, subsetAreas, tableFromLayer, JoinError } from '../src/geo/index.js';
import type { AreaLayer, DataTable } from '../src/geo/index.js';
import { InputError } from '../src/errors.js';
import { thrown } from './helpers/input-error.js';
import { squareRing } from './fixtures/weights/shapes.js';

const square = (x: number) => [squareRing(x, 0)];

async function layerOf(ids: (string | number | null)[], opts: { noGeometry?: number[] } = {}): Promise<AreaLayer> {
  const features = ids.map((id, i) => ({
    type: 'Feature',
    properties: { zone: id, size: i + 10 },
    geometry: opts.noGeometry?.includes(i + 1) ? null : { type: 'Polygon', coordinates: square(i) },
  }));
  return readBoundary([{ name: 'zones.geojson', bytes: new TextEncoder().encode(JSON.stringify({ type: 'FeatureCollection', features })) }]);
}

const csv = (s: string) => readTable({ name: 'values.csv', bytes: new TextEncoder().encode(s) });

const joinFailure = (f: () => unknown) => thrown<JoinError>(f);

describe('joinAreas', () => {
  it('keeps the table row order, matches numbers to text without a trailing .0', async () => {
    const layer = await layerOf([101, 102, 103]);
    const table = await csv('zone,y\n103,3\n101.0,1\n 102 ,2\n');
    const j = joinAreas(layer, table, 'zone');
    expect(j.ids).toEqual(['103', '101', '102']);
    expect(j.rows).toEqual([2, 3, 4]);
    expect(j.column('y')).toEqual(['3', '1', '2']);
    expect(j.column('size')).toEqual([12, 10, 11]); // boundary-file property, in table order
    expect(j.geometries[0]).toEqual({ kind: 'polygon', polygons: [square(2)] });
    expect(j.columnNames).toEqual(['zone', 'y', 'size']);
  });

  it('reports features without a row as a warning and leaves them out', async () => {
    const layer = await layerOf(['a', 'b', 'c']);
    const j = joinAreas(layer, await csv('zone,y\nc,1\na,2\n'), 'zone');
    expect(j.ids).toEqual(['c', 'a']);
    expect(j.report.unmatchedFeatures).toEqual([{ feature: 2, id: 'b' }]);
    expect(j.warnings.join(' ')).toMatch(/1 feature\(s\) of zones\.geojson have no row .*feature 2 \(b\)/);
  });

  it('refuses rows without a feature, naming the rows, and reports zero-padding suspects', async () => {
    const layer = await layerOf(['01001', '01003', '02000']);
    const e = joinFailure(() => joinAreas(layer, { sourceName: 't.csv', columns: ['zone'], rows: [['1001'], ['01003'], ['9999']], firstRow: 2 }, 'zone'));
    expect(e.message).toMatch(/t\.csv: 2 row\(s\) have an ID with no feature in zones\.geojson: row 2 \(1001\), row 4 \(9999\)/);
    expect(e.message).toMatch(/1001 vs 01001/);
    expect(e.report.zeroPaddingSuspects).toEqual([{ tableId: '1001', featureId: '01001' }]);
  });

  it('refuses duplicated IDs on either side', async () => {
    const layer = await layerOf(['a', 'b']);
    const e1 = joinFailure(() => joinAreas(layer, { sourceName: 't.csv', columns: ['zone'], rows: [['a'], ['b'], ['a']], firstRow: 2 }, 'zone'));
    expect(e1.message).toMatch(/t\.csv: IDs appear more than once: a \(rows 2, 4\)/);
    const twice = await layerOf(['a', 'b', 'a']);
    const e2 = joinFailure(() => joinAreas(twice, null, 'zone'));
    expect(e2.message).toMatch(/zones\.geojson: IDs appear on more than one feature: a \(features 1, 3\)/);
  });

  it('refuses blank IDs in the table, naming the row; a feature with a blank ID is left out with a warning when a table is joined, refused when the features are the rows', async () => {
    const layer = await layerOf(['a', null, 'c']);
    const e = joinFailure(() => joinAreas(layer, { sourceName: 't.csv', columns: ['zone'], rows: [['a'], ['  '], ['c']], firstRow: 2 }, 'zone'));
    expect(e.message).toMatch(/t\.csv: the ID is blank in row 3/);
    expect(e.message).not.toMatch(/blank for feature/);
    const j = joinAreas(layer, { sourceName: 't.csv', columns: ['zone'], rows: [['a'], ['c']], firstRow: 2 }, 'zone');
    expect(j.ids).toEqual(['a', 'c']);
    expect(j.warnings.join(' ')).toMatch(/1 feature\(s\) of zones\.geojson have a blank ID and are left out: features 2/);
    expect(joinFailure(() => joinAreas(layer, null, 'zone')).message).toMatch(/zones\.geojson: the ID is blank for feature 2/);
  });

  it('an ID on two features stops the join only when a table row names it', async () => {
    const twice = await layerOf(['a', 'b', 'b']);
    const ok = joinAreas(twice, { sourceName: 't.csv', columns: ['zone'], rows: [['a']], firstRow: 2 }, 'zone');
    expect(ok.ids).toEqual(['a']);
    expect(ok.warnings.join(' ')).toMatch(/feature 2 \(b\), feature 3 \(b\)/);
    const e = joinFailure(() => joinAreas(twice, { sourceName: 't.csv', columns: ['zone'], rows: [['a'], ['b']], firstRow: 2 }, 'zone'));
    expect(e.message).toMatch(/IDs appear on more than one feature: b \(features 2, 3\)/);
  });

  it('refuses matched features without geometry', async () => {
    const layer = await layerOf(['a', 'b'], { noGeometry: [2] });
    const e = joinFailure(() => joinAreas(layer, { sourceName: 't.csv', columns: ['zone'], rows: [['a'], ['b']], firstRow: 2 }, 'zone'));
    expect(e.message).toMatch(/these features have no geometry: feature 2 \(b, row 3\)/);
    // not fatal when the table does not ask for that feature
    expect(joinAreas(layer, { sourceName: 't.csv', columns: ['zone'], rows: [['a']], firstRow: 2 }, 'zone').ids).toEqual(['a']);
  });

  it('names a missing ID column on either side, listing what exists', async () => {
    const layer = await layerOf(['a']);
    expect(joinFailure(() => joinAreas(layer, { sourceName: 't.csv', columns: ['zone'], rows: [['a']], firstRow: 2 }, 'code', { featureIdProperty: 'zone' })).message)
      .toMatch(/t\.csv has no column "code" to join by; its columns are "zone"/);
    expect(joinFailure(() => joinAreas(layer, null, 'GEOID')).message).toMatch(/zones\.geojson has no property "GEOID" .*"zone", "size"/);
    const j = joinAreas(layer, { sourceName: 't.csv', columns: ['code', 'v'], rows: [['a', 1]], firstRow: 2 }, 'code', { featureIdProperty: 'zone' });
    expect(j.ids).toEqual(['a']);
  });

  it('refuses IDs that differ only by leading zeros, naming the option that matches them; with it, matches and records them', async () => {
    const layer = await layerOf(['005', '017', '101']);
    const table: DataTable = { sourceName: 't.csv', columns: ['zone', 'v'], rows: [[5, 1], ['17', 2], ['101', 3]], firstRow: 2 };
    const e = joinFailure(() => joinAreas(layer, table, 'zone'));
    expect(e.message).toMatch(/5 vs 005, 17 vs 017/);
    expect(e.message).toMatch(/--ids-ignore-leading-zeros; in the sidebar, tick "match 01001 with 1001"/);
    const j = joinAreas(layer, table, 'zone', { ignoreLeadingZeros: true });
    expect(j.ids).toEqual(['5', '17', '101']); // the table's IDs, in its order
    expect(j.column('size')).toEqual([10, 11, 12]);
    expect(j.report.matchedIgnoringZeros).toEqual([{ tableId: '5', featureId: '005' }, { tableId: '17', featureId: '017' }]);
    expect(j.warnings.join(' ')).toMatch(/2 ID\(s\) were matched ignoring leading zeros, as asked .*5 with 005, 17 with 017/);
    // two rows that meet only under the option are a repeated ID, shown as written
    const twice: DataTable = { sourceName: 't.csv', columns: ['zone'], rows: [['5'], ['005']], firstRow: 2 };
    expect(joinFailure(() => joinAreas(layer, twice, 'zone', { ignoreLeadingZeros: true })).message).toMatch(/IDs appear more than once: 5 \(written 5, 005\) \(rows 2, 3\)/);
    // codes that are not all digits keep their zeros
    const letters = await layerOf(['A05']);
    expect(() => joinAreas(letters, { sourceName: 't.csv', columns: ['zone'], rows: [['A5']], firstRow: 2 }, 'zone', { ignoreLeadingZeros: true })).toThrow(/no feature/);
  });

  it('suggests the near column name (case, then edit distance) and points to --boundary-id when only the boundary file lacks the ID', async () => {
    const layer = await layerOf(['a', 'b']);
    const t: DataTable = { sourceName: 't.csv', columns: ['FIPS', 'NAME', 'rate'], rows: [['a', 'Alder', 1], ['b', 'Birch', 2]], firstRow: 2 };
    expect(joinFailure(() => joinAreas(layer, t, 'fips', { featureIdProperty: 'zone' })).message)
      .toBe('t.csv has no column "fips" to join by; did you mean "FIPS"? Its columns are "FIPS", "NAME", "rate".');
    // the table has the column; the boundary file holds the same IDs under "zone"
    const m = joinFailure(() => joinAreas(layer, t, 'FIPS')).message;
    expect(m).toMatch(/zones\.geojson has no property "FIPS" to join by; its properties are "zone", "size"\./);
    expect(m).toMatch(/Its property "zone" holds 2 of the 2 IDs in t\.csv's "FIPS": name it as the boundary file's ID \(--boundary-id zone; in the sidebar, "ID in the boundary file" under Areas\)/);
    // a misspelt --boundary-id
    expect(joinFailure(() => joinAreas(layer, t, 'FIPS', { featureIdProperty: 'zome' })).message).toMatch(/no property "zome" to join by; did you mean "zone"\? .*--boundary-id zone/);
    // nothing near: no guess
    expect(joinFailure(() => joinAreas(layer, t, 'district', { featureIdProperty: 'zone' })).message).not.toMatch(/did you mean/);
    // a model column: the table's columns only, with the near match
    const j = joinAreas(layer, t, 'FIPS', { featureIdProperty: 'zone' });
    const e = joinFailure(() => j.column('Rate'));
    expect(e.message).toBe('There is no column "Rate" in t.csv (nor a property "Rate" in zones.geojson); did you mean "rate"? Its columns are "FIPS", "NAME", "rate".');
    expect(joinFailure(() => j.column('rates_per_1000')).message).toMatch(/; its columns are "FIPS", "NAME", "rate"\.$/);
  });

  it('joins the boundary file to its own table, counting in features', async () => {
    const layer = await layerOf(['a', 'b']);
    const j = joinAreas(layer, tableFromLayer(layer), 'zone');
    expect(j.rows).toEqual([1, 2]);
    expect(j.rowKind).toBe('feature');
    expect(Array.from(numericColumn(j, 'size'))).toEqual([10, 11]);
  });
});

describe('numericColumn', () => {
  const layerP = layerOf(['a', 'b', 'c', 'd', 'e', 'f']);
  const table: DataTable = {
    sourceName: 't.xlsx', columns: ['zone', 'v'], firstRow: 2,
    rows: [['a', '1.5'], ['b', 'abc'], ['c', null], ['d', NaN], ['e', 'Infinity'], ['f', -2e3]],
  };

  it('names the rows holding text, blanks, NaN and Infinity', async () => {
    const j = joinAreas(await layerP, table, 'zone');
    let message = '';
    try {
      numericColumn(j, 'v');
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      message = (e as Error).message;
    }
    expect(message).toMatch(/Column "v" must hold a number/);
    expect(message).toMatch(/text in row 3 \("abc"\)/);
    expect(message).toMatch(/blank cells in row 4/);
    expect(message).toMatch(/NaN or infinite values in row 5 \(NaN\), row 6 \(Infinity\)/);
  });

  it('calls a column of text "not numeric", with or without leaving out missing values', async () => {
    const layer = await layerOf(['a', 'b', 'c']);
    const j = joinAreas(layer, { sourceName: 't.csv', columns: ['zone', 'name'], rows: [['a', 'Alder Vale'], ['b', null], ['c', 'Birch']], firstRow: 2 }, 'zone');
    for (const allowMissing of [false, true]) {
      const e = thrown<InputError>(() => numericColumn(j, 'name', { allowMissing }));
      expect(e.message).toBe('Column "name" is not numeric: it holds text in every row that is not blank (for example row 2 ("Alder Vale")). Choose a column of numbers for the model.');
      expect(e.message).not.toMatch(/missing/);
    }
  });

  it('returns NaN at those rows with allowMissing', async () => {
    const j = joinAreas(await layerP, table, 'zone');
    const v = Array.from(numericColumn(j, 'v', { allowMissing: true }));
    expect(v).toEqual([1.5, NaN, NaN, NaN, NaN, -2000]);
  });

  it('reads decimal commas in semicolon files and reports spreadsheet errors as text', async () => {
    const layer = await layerOf(['a', 'b']);
    const j = joinAreas(layer, await csv('zone;v\na;3,5\nb;#N/A\n'), 'zone');
    expect(() => numericColumn(j, 'v')).toThrow(/text in row 3 \("#N\/A"\)/);
    expect(numericColumn(j, 'v', { allowMissing: true })[0]).toBe(3.5);
  });

  it('names an unknown column', async () => {
    const j = joinAreas(await layerP, table, 'zone');
    expect(() => numericColumn(j, 'w')).toThrow(/no column "w" in t\.xlsx/);
  });
});

describe('subsetAreas', () => {
  it('keeps the chosen areas with their rows and columns', async () => {
    const layer = await layerOf(['a', 'b', 'c']);
    const j = joinAreas(layer, await csv('zone,v\na,1\nb,2\nc,3\n'), 'zone');
    const s = subsetAreas(j, [0, 2]);
    expect(s.ids).toEqual(['a', 'c']);
    expect(s.rows).toEqual([2, 4]);
    expect(Array.from(numericColumn(s, 'v'))).toEqual([1, 3]);
    expect(s.geometries).toEqual([j.geometries[0], j.geometries[2]]);
  });
});
