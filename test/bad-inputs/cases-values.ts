/**
 * Numbers the calculations cannot carry and setups whose answer would be rounding noise: each is
 * refused with a message naming the cause (src/pipeline/check-values.ts), never an internal error.
 */
import type { BadInput } from './case.js';
import { csvFile, gridCodesOnly, gridCsv, gridFile, gridRows, text } from './make.js';

const V = 'odd values: magnitudes, exact fits, too few areas, overflowing weights';

const withTable = (edit: (rows: (string | number)[][]) => void) => ({ boundary: [gridCodesOnly()], data: gridCsv('table.csv', edit) });
const edges = (lines: string) => ({ boundary: [gridFile()], edgeList: text('links.csv', lines) });
const code = (i: number) => `D${String(i + 1).padStart(2, '0')}`;
/** D01 → D02 → … → D16, each link in one direction only: no loop. */
const chain = 'origin,neighbour,weight\n' + Array.from({ length: 15 }, (_, i) => `${code(i)},${code(i + 1)},1`).join('\n') + '\n';

export const valueCases: BadInput[] = [
  {
    group: V, name: 'outcome near 1e155 (its squares overflow)',
    files: () => withTable((r) => r.forEach((row) => { row[1] = Number(row[1]) * 1e155; })),
    expect: ['Column "y", row 3 (area D02)', 'beyond the range the calculations can carry', 'rescale the column'],
  },
  {
    group: V, name: 'outcome near 1e308',
    files: () => withTable((r) => r.forEach((row) => { row[1] = Number(row[1]) * 1e306; })),
    expect: ['Column "y", row', 'beyond the range the calculations can carry'],
  },
  {
    group: V, name: 'explanatory column of huge values (1e120)',
    files: () => withTable((r) => r.forEach((row) => { row[2] = Number(row[2]) * 1e120; })),
    expect: ['Column "x1", row', 'beyond the range'],
  },
  {
    group: V, name: 'explanatory column of -0 and subnormal values',
    files: () => withTable((r) => r.forEach((row, i) => { row[2] = i % 2 ? '-0' : `${i}e-320`; })),
    expect: ['Column "x1" holds only zeros and values smaller than 1e-100', 'in effect constant'],
  },
  {
    group: V, name: 'explanatory column of tiny values (1e-200)',
    files: () => withTable((r) => r.forEach((row) => { row[2] = `${row[2]}e-200`; })),
    expect: ['Column "x1" holds only zeros and values smaller than 1e-100'],
  },
  {
    group: V, name: 'explanatory column varying only in its last digits (1e9 + 1e-6·i)',
    files: () => withTable((r) => r.forEach((row, i) => { row[2] = 1e9 + i * 1e-6; })),
    expect: ['Column "x1" varies only in its last digits', 'in effect constant'],
  },
  {
    group: V, name: 'duplicate explanatory columns (x2 = x1)',
    files: () => withTable((r) => r.forEach((row) => { row[3] = row[2]; })),
    expect: ['Column "x2" is an exact combination of "x1"', 'perfect collinearity'],
  },
  {
    group: V, name: 'explanatory column constant once rows with a missing outcome are dropped', request: { dropMissing: true },
    files: () => withTable((r) => r.forEach((row, i) => { row[2] = i === 0 ? 9 : 4; if (i === 0) row[1] = ''; })),
    expect: ['Column "x1" has the same value (4) in every area'],
  },
  {
    group: V, name: 'perfect fit: y exactly linear in x1 and x2',
    files: () => withTable((r) => r.forEach((row) => { row[1] = 3 + 2 * Number(row[2]) - Number(row[3]); })),
    expect: ['The outcome "y" is exactly a straight-line combination of "x1", "x2"', 'R² = 1', 'rounding noise'],
  },
  {
    group: V, name: 'n = k + 1 (4 areas, 3 coefficients) with the error model', request: { models: ['ols', 'error'], weights: { method: 'knn', k: 1 } },
    files: () => ({ boundary: [gridCodesOnly()], data: gridCsv('table.csv', (r) => r.splice(4)) }),
    expect: ['There are 4 areas for 3 coefficients (n = 4, k = 3)', 'spatial error model', 'at least 6 areas'],
  },
  {
    group: V, name: 'n = k + 2 (5 areas, 3 coefficients) with the lag model', request: { models: ['ols', 'lag'], weights: { method: 'knn', k: 1 } },
    files: () => ({ boundary: [gridCodesOnly()], data: gridCsv('table.csv', (r) => r.splice(5)) }),
    expect: ['There are 5 areas for 3 coefficients', 'spatial lag model'],
  },
  {
    group: V, name: 'contiguity of order 5 on a 5×5 grid (no area has a neighbour)', request: { weights: { method: 'queen', order: 5 } },
    files: () => ({ boundary: [gridFile('districts.geojson', undefined, { rows: 5, cols: 5, props: gridRows(5, 5) as unknown as Record<string, unknown>[] })] }),
    expect: ['No area has a neighbour under neighbours exactly 5 steps away', 'lower order'],
  },
  {
    group: V, name: 'inverse distance of power 1e308 (weights overflow)', request: { weights: { method: 'idw', power: 1e308 } },
    files: () => ({ boundary: [gridFile()] }),
    expect: ['under inverse distance', 'beyond the range the calculations can carry', 'smaller power'],
  },
  {
    group: V, name: 'edge weights of 1e308 (their row total overflows)',
    files: () => edges('origin,neighbour,weight\nD01,D02,1e308\nD01,D05,1e308\nD02,D01,1\nD05,D01,1\n'),
    expect: ['The weights of area D01 under neighbours read from links.csv', 'overflow or underflow'],
  },
  {
    group: V, name: 'edge weight 1e200 with binary links (every link weighs 1): accepted', request: { transform: 'binary' },
    files: () => edges('origin,neighbour,weight\nD01,D02,1e200\nD02,D01,1\nD03,D04,1\nD04,D03,1\n'),
    outcome: 'warn', expect: ['have no neighbours'],
  },
  { group: V, name: 'edge weight NaN', files: () => edges('origin,neighbour,weight\nD01,D02,NaN\n'), expect: ['links.csv, line 2: the weight "NaN" is not a number of 0 or more'] },
  { group: V, name: 'edge weight Infinity', files: () => edges('origin,neighbour,weight\nD01,D02,1\nD02,D01,Infinity\n'), expect: ['links.csv, line 3: the weight "Infinity"'] },
  { group: V, name: 'edge weight -1e308', files: () => edges('origin,neighbour,weight\nD01,D02,-1e308\n'), expect: ['links.csv, line 2: the weight "-1e308"'] },
  {
    group: V, name: 'directed edge list with no loop (a one-way chain) and the spatial models', request: { models: ['ols', 'lag', 'error'] },
    files: () => edges(chain),
    expect: ['the links never lead back to an area', 'List each link in both directions'],
  },
  {
    group: V, name: 'one-column table of tiny outcome values', request: { x: ['x1'] },
    files: () => ({ boundary: [gridCodesOnly()], data: csvFile('table.csv', ['code', 'y', 'x1'], gridRows().map((g, i) => [g.code, `${g.y}e-250`, i])) }),
    expect: ['Column "y" holds only zeros and values smaller than 1e-100'],
  },
];
