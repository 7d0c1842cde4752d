// GeoJSON reading and validation. Inputs are hand-made here; expected structure follows RFC 7946
// (GeoJSON: FeatureCollection/Feature/geometry types, rings closed with first = last, at least 4 positions).
import { describe, expect, it } from 'vitest';
import { readBoundary } from '../src/geo/index.js';
import { failure } from './helpers/input-error.js';
import { squareRing } from './fixtures/weights/shapes.js';

const enc = (o: unknown) => new TextEncoder().encode(typeof o === 'string' ? o : JSON.stringify(o));
const file = (o: unknown, name = 'areas.geojson') => [{ name, bytes: enc(o) }];
const square = (x: number, y: number, d = 1) => [squareRing(x, y, d)];
const fc = (...features: unknown[]) => ({ type: 'FeatureCollection', features });
const poly = (props: object, coordinates: unknown) => ({ type: 'Feature', properties: props, geometry: { type: 'Polygon', coordinates } });

describe('readBoundary: GeoJSON', () => {
  it('round-trips polygons, properties and the id member', async () => {
    const layer = await readBoundary(file(fc(
      { ...poly({ code: 'A1', pop: 10 }, square(0, 0)), id: 7 },
      { type: 'Feature', properties: { code: 'B2', pop: 20 }, geometry: { type: 'MultiPolygon', coordinates: [square(1, 0), square(5, 5)] } },
    )));
    expect(layer.areas).toHaveLength(2);
    expect(layer.propertyNames).toEqual(['id', 'code', 'pop']);
    expect(layer.areas[0].properties).toEqual({ id: 7, code: 'A1', pop: 10 });
    expect(layer.areas[0].geometry).toEqual({ kind: 'polygon', polygons: [square(0, 0)] });
    expect(layer.areas[1].geometry).toEqual({ kind: 'polygon', polygons: [square(1, 0), square(5, 5)] });
    expect(layer.areas[1].feature).toBe(2);
    expect(layer.coordinates).toBe('geographic'); // all within ±180/±90
    expect(layer.coordinateEvidence).toMatch(/±180\/±90/);
  });

  it('reads points, a MultiPoint of one point, a bare Feature and a bare geometry', async () => {
    const pts = await readBoundary(file(fc(
      { type: 'Feature', properties: { k: 1 }, geometry: { type: 'Point', coordinates: [10, 20, 5] } },
      { type: 'Feature', properties: { k: 2 }, geometry: { type: 'MultiPoint', coordinates: [[11, 21]] } },
    )));
    expect(pts.areas.map((a) => a.geometry)).toEqual([{ kind: 'point', point: [10, 20] }, { kind: 'point', point: [11, 21] }]);
    const one = await readBoundary(file(poly({ a: 1 }, square(0, 0))));
    expect(one.areas).toHaveLength(1);
    const bare = await readBoundary(file({ type: 'Polygon', coordinates: square(0, 0) }));
    expect(bare.areas[0].properties).toEqual({});
  });

  it('keeps a feature without geometry as null', async () => {
    const layer = await readBoundary(file(fc(poly({ id: 'a' }, square(0, 0)), { type: 'Feature', properties: { id: 'b' }, geometry: null })));
    expect(layer.areas[1].geometry).toBeNull();
  });

  it('accepts a ring closed within 1e-12 relative and makes it exact', async () => {
    const ring = [[100, 10], [101, 10], [101, 11], [100, 11], [100 + 1e-11, 10]];
    const layer = await readBoundary(file(fc(poly({}, [ring]))));
    const g = layer.areas[0].geometry!;
    expect(g.kind === 'polygon' && g.polygons[0][0][4]).toEqual([100, 10]);
  });

  it('says where malformed JSON breaks (line and column)', async () => {
    const e = await failure(readBoundary(file('{\n  "type": "FeatureCollection",\n  "features": [,]\n}')));
    expect(e.message).toMatch(/areas\.geojson is not valid JSON at line 3, column 16/); // counted by hand: the comma is the 16th character of line 3
  });

  it('refuses lines, naming the feature', async () => {
    const e = await failure(readBoundary(file(fc(poly({}, square(0, 0)), { type: 'Feature', properties: { GEOID: 'X9' }, geometry: { type: 'LineString', coordinates: [[0, 0], [1, 1]] } }))));
    expect(e.message).toMatch(/feature 2 \(GEOID X9\) is a LineString; only polygons .* and points .* are supported/);
    expect(e.where.feature).toBe(2);
  });

  it('refuses an empty collection, and a file where no feature has geometry', async () => {
    expect((await failure(readBoundary(file(fc())))).message).toMatch(/empty \(0 features\)/);
    expect((await failure(readBoundary(file(fc({ type: 'Feature', properties: {}, geometry: null }))))).message).toMatch(/none of its 1 features has a geometry/);
  });

  it('refuses an open ring, naming feature and ring', async () => {
    const open = [[0, 0], [1, 0], [1, 1], [0, 1], [0, 0.5]];
    const e = await failure(readBoundary(file(fc(poly({}, square(5, 5)), poly({ id: 'q' }, [square(0, 0)[0], open])))));
    expect(e.message).toMatch(/feature 2 \(id q\) has ring 2 that is not closed/);
  });

  it('refuses rings with fewer than 4 positions', async () => {
    const e = await failure(readBoundary(file(fc(poly({}, [[[0, 0], [1, 0], [0, 0]]])))));
    expect(e.message).toMatch(/feature 1 has ring 1 with 3 position\(s\)/);
  });

  it('refuses non-finite coordinates (1e999 parses to Infinity)', async () => {
    const text = '{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1e999,0],[1,1],[0,0]]]}}';
    const e = await failure(readBoundary(file(text)));
    expect(e.message).toMatch(/feature 1 has a non-numeric or non-finite coordinate \(Infinity, 0\) at ring 1, position 2/);
  });

  it('refuses a zero-area polygon, naming the feature', async () => {
    const flat = [[[0, 0], [1, 1], [2, 2], [0, 0]]];
    const e = await failure(readBoundary(file(fc(poly({}, square(0, 0)), poly({}, square(3, 3)), poly({ name: 'Flat' }, flat)))));
    expect(e.message).toMatch(/feature 3 has zero area/);
  });

  it('warns about a self-crossing ring, naming the feature', async () => {
    const bowtie = [[[0, 0], [4, 0], [4, 4], [2, -1], [0, 4], [0, 0]]]; // edge 3 crosses edge 1
    const layer = await readBoundary(file(fc(poly({}, square(5, 5)), poly({ code: 'BT' }, bowtie))));
    expect(layer.warnings.join(' ')).toMatch(/1 feature\(s\) have a ring that crosses or touches itself: feature 2 \(code BT\)/);
  });

  it('refuses a MultiPoint of several points and a mix of points and polygons', async () => {
    expect((await failure(readBoundary(file(fc({ type: 'Feature', properties: {}, geometry: { type: 'MultiPoint', coordinates: [[0, 0], [1, 1]] } }))))).message)
      .toMatch(/feature 1 is a MultiPoint of 2 points/);
    expect((await failure(readBoundary(file(fc(poly({}, square(0, 0)), { type: 'Feature', properties: {}, geometry: { type: 'Point', coordinates: [0, 0] } }))))).message)
      .toMatch(/feature 2 is a point but feature 1 is a polygon/);
  });

  it('refuses empty files and names them; enforces the size cap', async () => {
    expect((await failure(readBoundary([{ name: 'none.geojson', bytes: new Uint8Array(0) }]))).message).toMatch(/none\.geojson is empty/);
    expect((await failure(readBoundary(file(fc(poly({}, square(0, 0)))), { maxBytes: 50 }))).message).toMatch(/50 bytes size limit/);
    expect((await failure(readBoundary([{ name: 'notes.txt', bytes: enc('hello') }]))).message).toMatch(/notes\.txt: not a boundary file/);
  });
});

describe('readBoundary: geographic or projected', () => {
  it('takes planar units when values exceed degree ranges', async () => {
    const layer = await readBoundary(file(fc(poly({}, square(500000, 4000000, 1000)))));
    expect(layer.coordinates).toBe('projected');
    expect(layer.coordinateEvidence).toMatch(/beyond longitude\/latitude ranges/);
  });

  it('suggests swapped coordinates when |y| > 90 but |x| ≤ 90', async () => {
    const e = await failure(readBoundary(file(fc(poly({}, square(40, 120))))));
    expect(e.message).toMatch(/swapped/);
  });

  it('follows a crs member, and refuses one that contradicts the values', async () => {
    const utm = { ...fc(poly({}, square(10, 10))), crs: { type: 'name', properties: { name: 'urn:ogc:def:crs:EPSG::32617' } } };
    const projected = await readBoundary(file(utm));
    expect(projected.coordinates).toBe('projected');
    expect(projected.coordinateEvidence).toMatch(/EPSG:32617/);
    expect(projected.warnings.join(' ')).toMatch(/within ±180\/±90; check/);
    const lonlat = { ...fc(poly({}, square(500000, 4000000, 1000))), crs: { type: 'name', properties: { name: 'urn:ogc:def:crs:OGC:1.3:CRS84' } } };
    const e = await failure(readBoundary(file(lonlat)));
    expect(e.message).toMatch(/CRS84.*far beyond longitude\/latitude degrees/);
  });

  it('keeps the stated length unit of projected coordinates (for scale bars): a metre EPSG code, our own statement; else none', async () => {
    const utm = { ...fc(poly({}, square(500000, 4000000, 1000))), crs: { type: 'name', properties: { name: 'urn:ogc:def:crs:EPSG::32617' } } };
    expect((await readBoundary(file(utm))).coordinateUnit).toBe('metre');
    const own = { ...fc(poly({}, square(500000, 4000000, 1000))), 'spillway:coordinates': 'projected metres, invented local grid' };
    const layer = await readBoundary(file(own));
    expect(layer).toMatchObject({ coordinates: 'projected', coordinateUnit: 'metre' });
    expect(layer.coordinateEvidence).toMatch(/states "projected metres, invented local grid"/);
    expect((await readBoundary(file(fc(poly({}, square(500000, 4000000, 1000)))))).coordinateUnit).toBeUndefined();
  });

  it('lets the analyst state projected coordinates', async () => {
    const layer = await readBoundary(file(fc(poly({}, square(3, 3)))), { coordinates: 'projected' });
    expect(layer.coordinates).toBe('projected');
  });
});
