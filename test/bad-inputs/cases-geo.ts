/** Bad boundary files: JSON and TopoJSON, GeoJSON structure, rings, coordinates, shapefiles, zips, caps. */
import type { BadInput } from './case.js';
import {
  claimSize, columbus, dbfWithRecords, gridCollection, gridFile, gridRows, json, squareRing, text, zipOf,
} from './make.js';
import { dbf, pointShp } from '../fixtures/geo/make-shapefile.js';

const G = 'malformed JSON / TopoJSON';
const T = 'GeoJSON of the wrong type or shape';
const R = 'rings and zero-area polygons';
const C = 'coordinates';
const S = 'shapefiles and zips';
const CAP = 'size caps';

const enc = new TextEncoder();
const grid = gridCollection;
const one = (f: ReturnType<typeof json>) => ({ boundary: [f] });

/** A small topology of two squares sharing an arc (TopoJSON specification 1.0 layout). */
function topology(objects: Record<string, unknown>, arcs: number[][][] = [[[0, 0], [1, 0]], [[1, 0], [1, 1], [0, 1], [0, 0]]]) {
  return { type: 'Topology', objects, arcs };
}

/** Point shapefile of the 4 × 4 grid's cell centres with a .dbf of `records` rows (codes, y, x1, x2). */
function pointSet(records = 16, codeBytes?: (i: number) => Uint8Array | string) {
  const rows = gridRows();
  const shp = pointShp(rows.map((_, i) => ({ x: 12.25 + (i % 4) * 0.5, y: 48.25 + Math.floor(i / 4) * 0.5 })));
  const table = dbf(
    [{ name: 'code', type: 'C', length: 8 }, { name: 'y', type: 'N', length: 10 }, { name: 'x1', type: 'N', length: 10 }, { name: 'x2', type: 'N', length: 10 }],
    rows.slice(0, records).map((g, i) => [codeBytes ? codeBytes(i) : g.code, String(g.y), String(g.x1), String(g.x2)]),
  );
  return { shp, dbf: table };
}

const cb = columbus();
const columbusRequest = { id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'] };

export const geoCases: BadInput[] = [
  // --- malformed JSON / TopoJSON
  { group: G, name: 'JSON cut off mid-way', files: () => one(text('districts.geojson', JSON.stringify(grid()).slice(0, 300))), expect: ['districts.geojson is not valid JSON', /ends too early|line 1, column/] },
  { group: G, name: 'trailing comma on line 3', files: () => one(text('districts.geojson', '{\n "type": "FeatureCollection",\n "features": [],\n}')), expect: ['not valid JSON at line 4, column 1'] },
  { group: G, name: 'empty file', files: () => one({ name: 'districts.geojson', bytes: new Uint8Array(0) }), expect: ['districts.geojson', 'empty'] },
  { group: G, name: 'only white space', files: () => one(text('districts.geojson', ' \n\t \n')), expect: ['districts.geojson is empty'] },
  { group: G, name: 'TopoJSON without objects', files: () => one(json('zones.topojson', topology({}))), expect: ['zones.topojson: the TopoJSON file has no objects'] },
  {
    group: G, name: 'TopoJSON layer that is not there', request: { layer: 'parishes' },
    files: () => one(json('zones.topojson', topology({ zones: { type: 'GeometryCollection', geometries: [] } }))),
    expect: ['has no object named "parishes"; it has "zones"'],
  },
  {
    group: G, name: 'TopoJSON arc index out of range',
    files: () => one(json('zones.topojson', topology({ zones: { type: 'GeometryCollection', geometries: [{ type: 'Polygon', arcs: [[0, 7]], properties: { code: 'A' } }] } }))),
    expect: ['zones.topojson', 'object "zones"'],
  },
  // --- GeoJSON of the wrong type
  { group: T, name: 'a JSON list, not an object', files: () => one(json('districts.geojson', [1, 2, 3])), expect: ['districts.geojson is not a GeoJSON object'] },
  { group: T, name: 'unknown top-level type', files: () => one(json('districts.geojson', { type: 'Atlas', features: [] })), expect: ['type "Atlas" is not GeoJSON'] },
  { group: T, name: 'FeatureCollection without features list', files: () => one(json('districts.geojson', { type: 'FeatureCollection', features: {} })), expect: ['has no "features" list'] },
  { group: T, name: 'empty FeatureCollection', files: () => one(json('districts.geojson', { type: 'FeatureCollection', features: [] })), expect: ['empty (0 features)'] },
  {
    group: T, name: 'a bare geometry in the features list',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[2] = fc.features[2].geometry; })),
    expect: ['feature 3 has type "Polygon" where "Feature" was expected'],
  },
  {
    group: T, name: 'line features',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[4].geometry = { type: 'LineString', coordinates: [[0, 0], [1, 1]] }; })),
    expect: ['feature 5', 'is a LineString', 'only polygons'],
  },
  {
    group: T, name: 'points mixed with polygons',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[6].geometry = { type: 'Point', coordinates: [12.1, 48.1] }; })),
    expect: ['feature 7', 'is a point but feature 1 is a polygon'],
  },
  {
    group: T, name: 'MultiPoint of several points',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[1].geometry = { type: 'MultiPoint', coordinates: [[12, 48], [12.5, 48], [13, 48]] }; })),
    expect: ['feature 2', 'MultiPoint of 3 points'],
  },
  {
    group: T, name: 'no feature has a geometry',
    files: () => one(gridFile('districts.geojson', (fc) => { for (const f of fc.features) f.geometry = null; })),
    expect: ['none of its 16 features has a geometry'],
  },
  {
    group: T, name: 'one feature without geometry',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[4].geometry = null; })),
    expect: ['these features have no geometry: feature 5 (D05'],
  },
  {
    group: T, name: 'properties that are not an object',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[9].properties = [1, 2]; })),
    expect: ['feature 10 has properties that are not an object'],
  },
  // --- rings
  {
    group: R, name: 'open ring',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[3].geometry.coordinates[0].pop(); })),
    expect: ['feature 4', 'ring 1 that is not closed'],
  },
  {
    group: R, name: 'ring of three positions',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[8].geometry.coordinates[0] = [[12, 49], [12.5, 49], [12, 49]]; })),
    expect: ['feature 9', 'ring 1 with 3 position(s)'],
  },
  {
    group: R, name: 'zero-area polygon (points on a line)',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[10].geometry.coordinates[0] = [[13, 49], [13.2, 49.2], [13.4, 49.4], [13.1, 49.1], [13, 49]]; })),
    expect: ['feature 11', 'has zero area in ring 1'],
  },
  {
    group: R, name: 'figure-eight whose halves cancel',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[0].geometry.coordinates[0] = [[12, 48], [12.5, 48.5], [12.5, 48], [12, 48.5], [12, 48]]; })),
    expect: ['feature 1', 'has zero area'],
  },
  {
    group: R, name: 'self-crossing ring (kept, with a warning)', outcome: 'warn',
    files: () => one(gridFile('districts.geojson', (fc) => {
      fc.features[5].geometry.coordinates[0] = [[12.5, 48.5], [13, 48.5], [13, 49], [12.75, 48.4], [12.5, 49], [12.5, 48.5]];
    })),
    expect: ['ring that crosses or touches itself: feature 6'],
  },
  {
    group: R, name: 'polygon without rings',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[2].geometry = { type: 'MultiPolygon', coordinates: [[]] }; })),
    expect: ['feature 3', 'without rings'],
  },
  // --- coordinates
  {
    group: C, name: 'text where a coordinate should be',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[12].geometry.coordinates[0][2] = ['13', 49.5]; })),
    expect: ['feature 13', 'non-numeric or non-finite coordinate', 'ring 1, position 3'],
  },
  {
    group: C, name: 'position with one number',
    files: () => one(gridFile('districts.geojson', (fc) => { fc.features[7].geometry.coordinates[0][1] = [12]; })),
    expect: ['feature 8', 'position that is not [x, y] at ring 1, position 2'],
  },
  {
    group: C, name: 'latitude and longitude swapped',
    files: () => one(gridFile('districts.geojson', undefined, { x0: 48, y0: 120 })),
    expect: ['swapped', 'y runs 120'],
  },
  {
    group: C, name: 'degrees and metres in one file',
    files: () => one(gridFile('districts.geojson', (fc) => {
      fc.features.slice(8).forEach((f, k) => { f.geometry.coordinates = [squareRing(650000 + (k % 4) * 1000, 5300000 + Math.floor(k / 4) * 1000, 1000)]; });
    })),
    expect: ['feature 1 (code D01)', 'feature 9 (code D09)', 'longitude/latitude', 'planar'],
  },
  {
    group: C, name: 'crs says degrees but coordinates are metres',
    files: () => one(gridFile('districts.geojson', (fc) => {
      (fc as any).crs = { type: 'name', properties: { name: 'urn:ogc:def:crs:EPSG::4326' } };
    }, { x0: 650000, y0: 5300000, size: 1000 })),
    expect: ['names EPSG:4326', 'far beyond longitude/latitude degrees'],
  },
  // --- shapefiles and zips
  {
    group: S, name: 'zip without the .dbf', request: columbusRequest,
    files: () => ({ boundary: [zipOf('columbus.zip', { 'columbus.shp': cb.shp, 'columbus.shx': cb.shx })] }),
    expect: ['columbus.zip holds columbus.zip/columbus.shp but no matching .dbf'],
  },
  {
    group: S, name: 'zip without the .shp', request: columbusRequest,
    files: () => ({ boundary: [zipOf('columbus.zip', { 'columbus.dbf': cb.dbf, 'columbus.shx': cb.shx })] }),
    expect: ['columbus.zip holds', 'no .shp file'],
  },
  {
    group: S, name: '.dbf with fewer rows than the .shp has shapes', request: columbusRequest,
    files: () => ({ boundary: [{ name: 'columbus.shp', bytes: cb.shp }, { name: 'columbus.dbf', bytes: dbfWithRecords(cb.dbf, 48) }] }),
    expect: ['columbus.shp has 49 shapes but columbus.dbf has 48 attribute rows'],
  },
  {
    group: S, name: '.shp cut short', request: columbusRequest,
    files: () => ({ boundary: [{ name: 'columbus.shp', bytes: cb.shp.slice(0, 5000) }, { name: 'columbus.dbf', bytes: cb.dbf }] }),
    expect: ['columbus.shp is damaged or truncated at record'],
  },
  {
    group: S, name: '.shp with a broken header', request: columbusRequest,
    files: () => ({ boundary: [{ name: 'columbus.shp', bytes: new Uint8Array(200) }, { name: 'columbus.dbf', bytes: cb.dbf }] }),
    expect: ['columbus.shp is not a shapefile main file'],
  },
  {
    group: S, name: '.shp of lines', request: columbusRequest,
    files: () => {
      const shp = cb.shp.slice();
      new DataView(shp.buffer).setInt32(32, 3, true);
      return { boundary: [{ name: 'columbus.shp', bytes: shp }, { name: 'columbus.dbf', bytes: cb.dbf }] };
    },
    expect: ['columbus.shp holds lines (shape type 3)'],
  },
  {
    group: S, name: '.dbf cut short', request: columbusRequest,
    files: () => ({ boundary: [{ name: 'columbus.shp', bytes: cb.shp }, { name: 'columbus.dbf', bytes: cb.dbf.slice(0, 3000) }] }),
    expect: ['columbus.dbf says it holds 49 records but its bytes end after'],
  },
  {
    group: S, name: 'attribute text that is not UTF-8 (read as Windows-1252, with a warning)', outcome: 'warn',
    request: { weights: { method: 'knn', k: 3 } },
    files: () => {
      const p = pointSet(16, (i) => (i === 2 ? Uint8Array.of(0x44, 0xfc, 0x72, 0x6e) : gridRows()[i].code));
      return { boundary: [{ name: 'villages.shp', bytes: p.shp }, { name: 'villages.dbf', bytes: p.dbf }] };
    },
    expect: ['villages.dbf has text that is not valid UTF-8 (first in field code, feature 3)'],
  },
  {
    group: S, name: 'point .shp whose .dbf has one row too many', request: { weights: { method: 'knn', k: 3 } },
    files: () => {
      const shp = pointShp(gridRows().slice(0, 15).map((_, i) => ({ x: 12 + (i % 4) * 0.5, y: 48 + Math.floor(i / 4) * 0.5 })));
      return { boundary: [{ name: 'villages.shp', bytes: shp }, { name: 'villages.dbf', bytes: pointSet(16).dbf }] };
    },
    expect: ['villages.shp has 15 shapes but villages.dbf has 16 attribute rows'],
  },
  { group: S, name: 'a .zip that is not a zip', files: () => one(text('districts.zip', 'PK\u0003\u0004 this is not really an archive')), expect: ['districts.zip could not be opened as a .zip archive'] },
  { group: S, name: 'a zip with no boundary inside', files: () => one(zipOf('districts.zip', { 'readme.txt': enc.encode('nothing here') })), expect: ['districts.zip holds no boundary files'] },
  { group: S, name: 'not a boundary format', files: () => one(text('districts.txt', 'code;y\nD01;3\n')), expect: ['districts.txt: not a boundary file this tool reads'] },
  // --- caps
  {
    group: CAP, name: 'zip that would expand past the cap (claimed 3.75 GiB)',
    files: () => {
      const z = zipOf('districts.zip', { 'districts.geojson': gridFile().bytes });
      return one({ name: 'districts.zip', bytes: claimSize(z.bytes, 'districts.geojson', 0xf0000000) });
    },
    expect: ['districts.zip would expand to 3.75 GiB, more than the 1 GiB limit'],
  },
  {
    group: CAP, name: 'boundary file over a stated cap', request: { maxBytes: 1024 }, cli: 'skip',
    cliNote: 'the command line refuses files over 1 GiB before reading them: see "boundary file over the command line\'s 1 GiB cap" (a sparse file) in corpus.test.ts',
    files: () => one(gridFile()),
    expect: ['districts.geojson: the boundary files exceed the 1 KiB size limit'],
  },
];
