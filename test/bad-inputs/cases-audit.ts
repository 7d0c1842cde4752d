/**
 * Further cases of issue #17's classes found by a later audit: look-alike IDs in a refused join,
 * TopoJSON arc indexes out of range, points under contiguity rules, rule numbers out of range (in
 * cases-reading.ts with the rule syntax), IDs a spreadsheet wrote as decimals in a neighbour list.
 */
import type { BadInput } from './case.js';
import { gridCodesOnly, gridCsv, gridFile, gridRows, json, text } from './make.js';

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
];
