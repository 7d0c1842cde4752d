// Shapefile and TopoJSON reading. Sources: the Columbus fixture (test/fixtures/columbus, see its
// LICENCE.md), checked against its own .dbf/.shx bytes parsed here by hand following the dBASE III
// layout and the 1998 shapefile technical description; us-atlas 3.0.1 counties-10m.json
// (TopoJSON), checked against the topology's own geometry list.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { zipSync } from 'fflate';
import { readBoundary } from '../src/geo/index.js';
import { failure } from './helpers/input-error.js';
import { dbf, pointShp } from './fixtures/geo/make-shapefile.js';

const dir = new URL('./fixtures/columbus/', import.meta.url);
const bytesOf = (name: string) => new Uint8Array(readFileSync(new URL(name, dir)));
const columbus = () => ['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((name) => ({ name, bytes: bytesOf(name) }));

/** Independent dBASE III reader: field descriptors from byte 32, records after the header. */
function dbfByHand(b: Uint8Array) {
  const v = new DataView(b.buffer, b.byteOffset, b.byteLength);
  const count = v.getUint32(4, true);
  const headerLength = v.getUint16(8, true);
  const recordLength = v.getUint16(10, true);
  const fields: { name: string; offset: number; length: number }[] = [];
  let offset = 1;
  for (let p = 32; b[p] !== 0x0d; p += 32) {
    const name = String.fromCharCode(...b.subarray(p, p + 11)).replace(/\0.*$/, '');
    fields.push({ name, offset, length: b[p + 16] });
    offset += b[p + 16];
  }
  const cell = (record: number, field: string) => {
    const f = fields.find((x) => x.name === field)!;
    const start = headerLength + (record - 1) * recordLength + f.offset;
    return String.fromCharCode(...b.subarray(start, start + f.length)).trim();
  };
  return { count, fields: fields.map((f) => f.name), cell };
}

describe('readBoundary: Columbus shapefile', () => {
  it('reads 49 features whose attributes match the .dbf bytes', async () => {
    const layer = await readBoundary(columbus());
    const hand = dbfByHand(bytesOf('columbus.dbf'));
    expect(hand.count).toBe(49);
    // .shx: 100-byte header, then 8 bytes per record
    expect((bytesOf('columbus.shx').length - 100) / 8).toBe(49);
    expect(layer.areas).toHaveLength(49);
    expect(layer.propertyNames).toEqual(hand.fields);
    for (const name of ['POLYID', 'CRIME', 'INC', 'HOVAL']) expect(layer.propertyNames).toContain(name);
    for (const record of [1, 2, 25, 49]) {
      for (const field of ['POLYID', 'CRIME', 'INC', 'HOVAL']) {
        expect(layer.areas[record - 1].properties[field]).toBe(Number(hand.cell(record, field)));
      }
    }
    expect(layer.areas.every((a) => a.geometry?.kind === 'polygon')).toBe(true);
  });

  it('matches feature 1 to the bounding box stored in its .shp record', async () => {
    const layer = await readBoundary(columbus());
    const shp = bytesOf('columbus.shp');
    const v = new DataView(shp.buffer, shp.byteOffset, shp.byteLength);
    // record 1 content starts at byte 108: shape type, then Xmin, Ymin, Xmax, Ymax (little-endian doubles)
    const box = [0, 1, 2, 3].map((k) => v.getFloat64(112 + 8 * k, true));
    const g = layer.areas[0].geometry!;
    if (g.kind !== 'polygon') throw new Error('polygon expected');
    const pts = g.polygons.flat(2);
    expect(Math.min(...pts.map((p) => p[0]))).toBe(box[0]);
    expect(Math.min(...pts.map((p) => p[1]))).toBe(box[1]);
    expect(Math.max(...pts.map((p) => p[0]))).toBe(box[2]);
    expect(Math.max(...pts.map((p) => p[1]))).toBe(box[3]);
  });

  it('says there is no .prj and decides from the ranges', async () => {
    const layer = await readBoundary(columbus());
    expect(layer.coordinateEvidence).toMatch(/without a \.prj/);
    expect(layer.coordinates).toBe('geographic'); // Columbus values are small (x ≈ 6..11, y ≈ 11..15)
  });

  it('reads a zip holding the set, and names what a zip lacks', async () => {
    const files = Object.fromEntries(columbus().map((f) => [`columbus/${f.name}`, f.bytes]));
    const zipped = await readBoundary([{ name: 'columbus.zip', bytes: zipSync(files) }]);
    expect(zipped.areas).toHaveLength(49);
    const noDbf = { ...files };
    delete noDbf['columbus/columbus.dbf'];
    const e1 = await failure(readBoundary([{ name: 'part.zip', bytes: zipSync(noDbf) }]));
    expect(e1.message).toMatch(/part\.zip holds .*columbus\.shp but no matching \.dbf/);
    const noShp = { ...files };
    delete noShp['columbus/columbus.shp'];
    const e2 = await failure(readBoundary([{ name: 'part.zip', bytes: zipSync(noShp) }]));
    expect(e2.message).toMatch(/part\.zip holds .*columbus\.dbf but no \.shp file/);
  });

  it('refuses a zip that would expand past the cap before inflating it', async () => {
    const big = new Uint8Array(5_000_000); // zeros compress to a few kB
    const e = await failure(readBoundary([{ name: 'bomb.zip', bytes: zipSync({ 'a.shp': big, 'a.dbf': big }) }], { maxBytes: 1_000_000 }));
    expect(e.message).toMatch(/bomb\.zip would expand to 9\.54 MiB, more than the 976\.56 KiB limit/);
  });

  it('refuses a .dbf whose row count differs from the .shp, with both counts', async () => {
    const d = bytesOf('columbus.dbf').slice();
    new DataView(d.buffer).setUint32(4, 48, true); // claim 48 records
    const e = await failure(readBoundary([{ name: 'columbus.shp', bytes: bytesOf('columbus.shp') }, { name: 'columbus.dbf', bytes: d }]));
    expect(e.message).toMatch(/columbus\.shp has 49 shapes but columbus\.dbf has 48 attribute rows/);
  });
});

describe('readBoundary: hand-made point shapefiles', () => {
  const pts = pointShp([{ x: 1, y: 2 }, { x: 3, y: 4 }]);
  it('reads points with a .prj claim and a .cpg encoding', async () => {
    const table = dbf([{ name: 'CODE', type: 'C', length: 8 }], [['P1'], [new TextEncoder().encode('Zürich')]]);
    const layer = await readBoundary([
      { name: 'p.shp', bytes: pts },
      { name: 'p.dbf', bytes: table },
      { name: 'p.prj', bytes: new TextEncoder().encode('GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984"]]') },
      { name: 'p.cpg', bytes: new TextEncoder().encode('UTF-8') },
    ]);
    expect(layer.areas.map((a) => a.geometry)).toEqual([{ kind: 'point', point: [1, 2] }, { kind: 'point', point: [3, 4] }]);
    expect(layer.areas[1].properties.CODE).toBe('Zürich');
    expect(layer.coordinates).toBe('geographic');
    expect(layer.coordinateEvidence).toMatch(/p\.prj describes a longitude\/latitude system \(GEOGCS "GCS_WGS_1984"\)/);
    expect(layer.warnings).toEqual([]);
  });

  it('falls back to Windows-1252 for bad UTF-8 and names field and feature', async () => {
    // 0xFC is "ü" in Windows-1252 and invalid on its own in UTF-8
    const table = dbf([{ name: 'NAME', type: 'C', length: 8 }], [['Bern'], [Uint8Array.from([0x5a, 0xfc, 0x72, 0x69, 0x63, 0x68])]]);
    const layer = await readBoundary([{ name: 'p.shp', bytes: pts }, { name: 'p.dbf', bytes: table }]);
    expect(layer.areas[1].properties.NAME).toBe('Zürich');
    expect(layer.warnings.join(' ')).toMatch(/not valid UTF-8 \(first in field NAME, feature 2\); it was read as Windows-1252/);
  });

  it('refuses a geographic .prj with coordinates in the millions', async () => {
    const far = pointShp([{ x: 500000, y: 4000000 }]);
    const e = await failure(readBoundary([
      { name: 'f.shp', bytes: far },
      { name: 'f.dbf', bytes: dbf([{ name: 'K', type: 'N', length: 4 }], [['1']]) },
      { name: 'f.prj', bytes: new TextEncoder().encode('GEOGCS["GCS_WGS_1984"]') },
    ]));
    expect(e.message).toMatch(/f\.prj describes a longitude\/latitude system .* far beyond longitude\/latitude degrees/);
  });

  it('refuses a line shapefile', async () => {
    const lines = pointShp([{ x: 1, y: 2 }]);
    new DataView(lines.buffer).setInt32(32, 3, true);
    const e = await failure(readBoundary([{ name: 'l.shp', bytes: lines }, { name: 'l.dbf', bytes: dbf([{ name: 'K', type: 'N', length: 4 }], [['1']]) }]));
    expect(e.message).toMatch(/l\.shp holds lines \(shape type 3\)/);
  });
});

describe('readBoundary: us-atlas counties TopoJSON', () => {
  const path = new URL('../node_modules/us-atlas/counties-10m.json', import.meta.url);
  const bytes = new Uint8Array(readFileSync(path));
  const topology = JSON.parse(new TextDecoder().decode(bytes));

  it('has one feature per geometry of the first object and reads as geographic', async () => {
    const layer = await readBoundary([{ name: 'counties-10m.json', bytes }]);
    expect(layer.areas).toHaveLength(topology.objects.counties.geometries.length);
    expect(layer.coordinates).toBe('geographic');
    expect(layer.coordinateEvidence).toMatch(/TopoJSON bbox/);
    // the GeoJSON id member (county FIPS code) is kept as the property "id"
    expect(layer.areas[0].properties.id).toBe(topology.objects.counties.geometries[0].id);
  });

  it('reads a named object and lists the objects when the name is wrong', async () => {
    const states = await readBoundary([{ name: 'counties-10m.json', bytes }], { layer: 'states' });
    expect(states.areas).toHaveLength(topology.objects.states.geometries.length);
    // In this file one decoded ring of state 17 ends one quantization step from its start (seen by
    // decoding with topojson-client directly); it is closed with a warning rather than refused.
    expect(states.warnings.join(' ')).toMatch(/missed each other by one grid step.*feature 20 \(id 17\)/);
    const e = await failure(readBoundary([{ name: 'counties-10m.json', bytes }], { layer: 'provinces' }));
    expect(e.message).toMatch(/no object named "provinces"; it has "counties", "states", "nation"/);
  });
});
