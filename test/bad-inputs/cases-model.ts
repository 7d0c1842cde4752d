/** Bad model setups and neighbour definitions: constant or collinear columns, n ≤ k, withoutNeighbours, k, bands, edge lists. */
import type { BadInput } from './case.js';
import { csvFile, gridCodesOnly, gridCsv, gridFile, text } from './make.js';

const M = 'model columns: constant, collinear, n ≤ k';
const W = 'neighbours: withoutNeighbours, k, bands';
const E = 'edge lists';

const withTable = (data: ReturnType<typeof gridCsv>) => ({ boundary: [gridCodesOnly()], data });
const grid = () => ({ boundary: [gridFile()] });
// The grid's cells squeezed north-south to the ground shape of squares at 48°N (cos 48° ≈ 0.67), so
// the file, which states no coordinate system, reads as longitude/latitude by its shapes too.
const degreeGrid = () => ({ boundary: [gridFile('districts.geojson', (fc) => {
  for (const f of fc.features) for (const p of f.geometry.coordinates[0]) p[1] = 48 + (p[1] - 48) * 0.67;
})] });
const edges = (lines: string) => ({ boundary: [gridFile()], edgeList: text('links.csv', lines) });

export const modelCases: BadInput[] = [
  { group: M, name: 'constant outcome', files: () => withTable(gridCsv('table.csv', (r) => r.forEach((row) => { row[1] = 5; }))), expect: ['The outcome column "y" has the same value (5) in every row'] },
  { group: M, name: 'constant explanatory column', files: () => withTable(gridCsv('table.csv', (r) => r.forEach((row) => { row[2] = 0.25; }))), expect: ['Column "x1" has the same value (0.25) in every area'] },
  {
    group: M, name: 'perfectly collinear columns (x2 = 3·x1)',
    files: () => withTable(gridCsv('table.csv', (r) => r.forEach((row) => { row[3] = 3 * Number(row[2]); }))),
    expect: ['Column "x2" is an exact combination of', '"x1"', 'perfect collinearity'],
  },
  {
    group: M, name: 'collinear with the intercept (x2 = 1 − x1)',
    files: () => withTable(gridCsv('table.csv', (r) => r.forEach((row) => { row[3] = Math.round((1 - Number(row[2])) * 100) / 100; }))),
    expect: ['Column "x2" is an exact combination of "constant", "x1"'],
  },
  {
    group: M, name: 'fewer areas than coefficients (n ≤ k)', request: { x: ['x1', 'x2', 'x3'], weights: { method: 'knn', k: 1 } },
    files: () => ({
      boundary: [gridCodesOnly()],
      data: csvFile('table.csv', ['code', 'y', 'x1', 'x2', 'x3'], [['D01', 1, 2, 3, 4], ['D02', 2, 1, 5, 3], ['D03', 4, 4, 1, 2], ['D04', 3, 2, 2, 9]]),
    }),
    expect: ['There are 4 areas and 4 coefficients', 'n = 4, k = 4'],
  },
  { group: M, name: 'one column named as both outcome and explanatory', request: { x: ['x1', 'y'] }, files: grid, expect: ['Column "y" is named twice'] },
  // --- neighbours
  {
    group: W, name: 'every area without neighbours under contiguity',
    files: () => ({ boundary: [gridFile('districts.geojson', undefined, { gap: 0.1 })] }),
    expect: ['No area has a neighbour under queen contiguity', 'distance band of at least'],
  },
  {
    group: W, name: 'every area without neighbours under rook contiguity (corners only touch)', request: { weights: { method: 'rook' } },
    files: () => ({
      boundary: [gridFile('districts.geojson', (fc) => {
        // keep the black squares of a checkerboard: they meet only at corners
        fc.features = fc.features.filter((_, i) => (Math.floor(i / 4) + (i % 4)) % 2 === 0);
      })],
    }),
    expect: ['No area has a neighbour under rook contiguity'],
  },
  { group: W, name: 'k for k-nearest equal to n', request: { weights: { method: 'knn', k: 16 } }, files: grid, expect: ['16 nearest neighbours need more than 16 areas; there are 16', 'at most 15'] },
  { group: W, name: 'k for k-nearest above n', request: { weights: { method: 'knn', k: 40 } }, files: grid, expect: ['there are 16', 'at most 15'] },
  { group: W, name: 'distance band that links nothing', request: { weights: { method: 'band', distance: 0.5 } }, files: degreeGrid, expect: ['No two areas are within 0.5 km', 'closest pair is'] },
  { group: W, name: 'inverse-distance cut-off that links nothing', request: { weights: { method: 'idw', power: 1, cutoff: 1 } }, files: degreeGrid, expect: ['No two areas are within 1 km', 'inverse distance'] },
  // --- edge lists
  { group: E, name: 'edge list naming an unknown ID', files: () => edges('origin,neighbour,weight\nD01,D02,1\nD02,D99,1\n'), expect: ['links.csv, line 3: the neighbour ID D99 is not one of the areas'] },
  { group: E, name: 'edge list with an unknown origin', files: () => edges('origin,neighbour,weight\nX7,D02,1\n'), expect: ['links.csv, line 2: the origin ID X7 is not one of the areas'] },
  { group: E, name: 'edge list with a self-link', files: () => edges('origin,neighbour,weight\nD01,D02,1\nD02,D01,1\nD05,D05,1\n'), expect: ['links.csv, line 4: area D05 is listed as its own neighbour'] },
  { group: E, name: 'edge list with a negative weight', files: () => edges('origin,neighbour,weight\nD01,D02,-1\n'), expect: ['links.csv, line 2: the weight "-1" is not a number of 0 or more'] },
  { group: E, name: 'edge list with a text weight', files: () => edges('origin,neighbour,weight\nD01,D02,1\nD02,D03,near\n'), expect: ['links.csv, line 3: the weight "near"'] },
  { group: E, name: 'edge list repeating a link', files: () => edges('origin,neighbour,weight\nD01,D02,1\nD03,D04,1\nD01,D02,0.5\n'), expect: ['links.csv, lines 2 and 4 both link D01 to D02'] },
  { group: E, name: 'edge list with only a header', files: () => edges('origin,neighbour,weight\n'), expect: ['links.csv has no links between the areas'] },
  { group: E, name: 'edge list line with one ID', files: () => edges('origin,neighbour,weight\nD01,D02,1\nD03\n'), expect: ['links.csv, line 3: expected an origin ID and a neighbour ID'] },
];
