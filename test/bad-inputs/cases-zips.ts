/**
 * Zips and sizes (issue #17 part 4, and its neighbours): encrypted and unsupported entries, two
 * entries of one name, a shapefile beside GeoJSON, entries that understate their size (refused the
 * moment they pass it, not after inflating everything), a GeoJSON past the longest string a
 * JavaScript engine holds, workbooks and zips given in each other's place. Offsets in the zip
 * headers: ZIP File Format Specification (APPNOTE 6.3).
 */
import type { BadInput } from './case.js';
import { claimSize, columbus, gridCodesOnly, gridCsv, gridFile, gridSheet, patchZipEntry, xlsxFile, zipOf } from './make.js';

const Z = 'zips and sizes: encrypted, misleading, ambiguous';

const cb = columbus();
const grid = () => gridFile().bytes;
const zipped = (entries: Record<string, Uint8Array>) => zipOf('districts.zip', entries);

/** GeoJSON of the grid followed by `pad` spaces (JSON allows trailing white space): large, and compresses to almost nothing. */
function paddedGrid(pad: number): Uint8Array {
  const g = grid();
  const out = new Uint8Array(g.length + pad).fill(0x20);
  out.set(g);
  return out;
}

export const zipCases: BadInput[] = [
  {
    group: Z, name: 'password-protected zip (named as such, not "invalid block type")',
    files: () => ({ boundary: [{ name: 'districts.zip', bytes: patchZipEntry(zipped({ 'districts.geojson': grid() }).bytes, 'districts.geojson', { flags: 1 }) }] }),
    expect: ['districts.zip is password-protected (its entry districts.geojson is encrypted)', 'Extract the files with the password'],
  },
  {
    group: Z, name: 'zip entry compressed with a method other than Deflate (Deflate64)',
    files: () => ({ boundary: [{ name: 'districts.zip', bytes: patchZipEntry(zipped({ 'districts.geojson': grid() }).bytes, 'districts.geojson', { method: 9 }) }] }),
    expect: ['districts.zip: its entry districts.geojson is compressed with Deflate64 (method 9)', 'standard (Deflate) compression'],
  },
  {
    group: Z, name: 'zip with two entries of one name',
    files: () => {
      const z = zipped({ 'districts.geojson': grid(), 'districtz.geojson': gridFile('x', (fc) => { fc.features.pop(); }).bytes });
      return { boundary: [{ name: 'districts.zip', bytes: patchZipEntry(z.bytes, 'districtz.geojson', { rename: 'districts.geojson' }) }] };
    },
    expect: ['districts.zip holds two entries named districts.geojson; which one is meant cannot be told'],
  },
  {
    group: Z, name: 'zip with two entries whose names differ only in letter case',
    files: () => ({ boundary: [zipped({ 'Districts.geojson': grid(), 'districts.geojson': grid() })] }),
    expect: ['districts.zip holds two entries named Districts.geojson and districts.geojson'],
  },
  {
    group: Z, name: 'zip with both a shapefile and a GeoJSON file',
    files: () => ({ boundary: [zipped({ 'districts.geojson': grid(), 'columbus.shp': cb.shp, 'columbus.shx': cb.shx, 'columbus.dbf': cb.dbf })] }),
    expect: ['districts.zip holds both a shapefile (districts.zip/columbus.shp) and districts.zip/districts.geojson', 'which one holds the areas cannot be told', '--layer'],
  },
  {
    group: Z, name: 'zip with both, and the layer naming the GeoJSON: read, the shapefile left alone', request: { layer: 'districts' }, outcome: 'warn',
    files: () => ({ boundary: [zipped({ 'districts.geojson': grid(), 'columbus.shp': cb.shp, 'columbus.shx': cb.shx, 'columbus.dbf': cb.dbf })] }),
    expect: ['districts.zip/districts.geojson: the file does not say what its coordinates are'],
  },
  {
    group: Z, name: 'two shapefiles of one name in two folders of a zip',
    files: () => ({ boundary: [zipped({ 'old/columbus.shp': cb.shp, 'old/columbus.dbf': cb.dbf, 'new/columbus.shp': cb.shp, 'new/columbus.dbf': cb.dbf })] }),
    request: { id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'] },
    expect: ['several shapefiles (districts.zip/old/columbus.shp, districts.zip/new/columbus.shp)', 'its path inside the zip'],
  },
  {
    group: Z, name: 'zip entry that understates its size (stopped as soon as it passes it)',
    files: () => {
      const z = zipped({ 'districts.geojson': paddedGrid(4 * 2 ** 20) });
      return { boundary: [{ name: 'districts.zip', bytes: claimSize(z.bytes, 'districts.geojson', 1000) }] };
    },
    expect: ['districts.zip: its entry districts.geojson expands beyond the 1000 bytes its header declares', 'was not expanded further'],
  },
  {
    group: Z, name: 'zipped GeoJSON that expands to 700 MiB (past the longest JavaScript string)',
    files: () => {
      const z = zipped({ 'districts.geojson': grid() });
      return { boundary: [{ name: 'districts.zip', bytes: claimSize(z.bytes, 'districts.geojson', 700 * 2 ** 20) }] };
    },
    expect: ['districts.zip: districts.geojson expands to 700 MiB; a GeoJSON or TopoJSON file can be read up to 512 MiB', 'shapefile'],
  },
  {
    group: Z, name: '.xlsx entry that understates its size',
    files: async () => {
      const book = await xlsxFile('book.xlsx', { Districts: gridSheet() });
      return { boundary: [gridCodesOnly()], data: { name: 'book.xlsx', bytes: claimSize(book.bytes, 'xl/worksheets/sheet1.xml', 100) } };
    },
    expect: ['book.xlsx: its entry xl/worksheets/sheet1.xml expands beyond the 100 bytes its header declares'],
  },
  {
    group: Z, name: 'an .xlsx workbook given as the boundary file',
    files: async () => ({ boundary: [await xlsxFile('areas.xlsx', { Districts: gridSheet() })], data: gridCsv() }),
    expect: ['areas.xlsx is an .xlsx workbook, not a boundary file; give it as the data table (--data)'],
  },
  {
    group: Z, name: 'a zip of boundary files given as the table',
    files: () => ({ boundary: [gridCodesOnly()], data: zipOf('table.zip', { 'districts.geojson': grid() }) }),
    expect: ['table.zip is a zip archive, not an .xlsx workbook; it holds boundary files, so give it as the boundary file (--boundary)'],
  },
  {
    group: Z, name: 'a password-protected .xlsx (not "an old-style .xls")',
    files: () => {
      // the compound-file signature, then the stream name a protected workbook carries, in UTF-16
      const name = 'EncryptedPackage';
      const bytes = new Uint8Array(2048);
      bytes.set([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]);
      for (let i = 0; i < name.length; i++) bytes[1024 + 2 * i] = name.charCodeAt(i);
      return { boundary: [gridCodesOnly()], data: { name: 'book.xlsx', bytes } };
    },
    expect: ['book.xlsx is a password-protected workbook', 'remove the password'],
  },
];
