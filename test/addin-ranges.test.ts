// Cell ranges as Excel passes them: whole columns and trailing blanks (issue 19, point 3), and the
// neighbour range given as an n × n weights matrix instead of a list of links (issue 16). Sources:
// the Columbus queen neighbours of the independent numpy reference (test/golden/columbus.json) and
// the identity that a matrix and the list of its non-zero cells describe the same weights.
import { describe, expect, it } from 'vitest';
import { InputError } from '../src/errors.js';
import { lagOfRange, moranOfRange, readColumns, weightsFromRange, type Grid } from '../addin/functions/logic.js';
import { localMoranRows } from '../addin/functions/local-logic.js';
import { neighbourForm } from '../addin/functions/neighbour-range.js';
import { columbusData, readGolden } from './helpers/columbus.js';

const golden = readGolden();
const nbs = golden.weights.neighbours as number[][];

async function columbus() {
  const { y } = await columbusData();
  const names = Array.from(y, (_, i) => `C${String(i + 1).padStart(2, '0')}`);
  const ids: Grid = [['area'], ...names.map((n) => [n])];
  const values: Grid = [['CRIME'], ...Array.from(y, (v) => [v])];
  const links: Grid = [['origin', 'neighbour', 'weight']];
  nbs.forEach((nb, i) => nb.forEach((j) => links.push([names[i], names[j], 1 / nb.length])));
  const matrix: number[][] = names.map((_, i) => names.map((__, j) => (nbs[i].includes(j) ? 1 / nbs[i].length : 0)));
  return { names, ids, values, links, matrix, y };
}

/** A whole column as Excel sends it: the cells, then empty cells down to `rows`. */
function wholeColumn(cells: Grid, rows: number, blank: null | '' = null): Grid {
  return [...cells, ...Array.from({ length: rows - cells.length }, () => cells[0].map(() => blank))];
}

describe('ranges with blank rows at the end (whole columns such as A:A)', () => {
  it('gives the same figures for whole columns as for the exact ranges', async () => {
    const { ids, values, links } = await columbus();
    const exact = moranOfRange(values, ids, links, true)[0];
    const whole = moranOfRange(wholeColumn(values, 5000), wholeColumn(ids, 5000, ''), wholeColumn(links, 5000), true)[0];
    expect(whole).toEqual(exact);
  });

  it('cuts the blank rows of all ranges of a call together, so ranges of different lengths line up', async () => {
    const { ids, values, links } = await columbus();
    const r = readColumns(wholeColumn(values, 80), wholeColumn(ids, 60));
    expect(r.ids).toHaveLength(49);
    expect(lagOfRange(values, wholeColumn(ids, 200), links)).toEqual(lagOfRange(values, ids, links));
  });

  it('still refuses a blank inside the data, naming its cell', async () => {
    const { ids, values, links } = await columbus();
    const holed = values.map((r) => [...r]);
    holed[10][0] = null;
    expect(() => moranOfRange(wholeColumn(holed, 300), wholeColumn(ids, 300), links)).toThrow(/Cell 11 of the values range is empty/);
    const noId = ids.map((r) => [...r]);
    noId[7][0] = '';
    expect(() => moranOfRange(values, noId, links)).toThrow(/Cell 8 of the ID range is empty/);
  });

  it('says so when a range holds only its header', () => {
    expect(() => readColumns([['CRIME'], [null]], [['area'], [null]])).toThrow(/only a header/);
  });
});

describe('the neighbour range as an n × n weights matrix (detected by its shape)', () => {
  it('an n × n matrix in the order of the IDs gives the same Moran, lag and local figures as the list of links', async () => {
    const { ids, values, links, matrix } = await columbus();
    expect(neighbourForm(matrix, 49)).toEqual({ kind: 'matrix', headerRow: false, headerColumn: false });
    expect(neighbourForm(links, 49)).toEqual({ kind: 'links' });
    const a = moranOfRange(values, ids, links, true)[0];
    const b = moranOfRange(values, ids, matrix, true)[0];
    b.forEach((x, k) => expect(x).toBeCloseTo(a[k], 12));
    const la = lagOfRange(values, ids, links).flat();
    lagOfRange(values, ids, matrix).flat().forEach((x, k) => expect(x).toBeCloseTo(la[k], 12));
    const ra = localMoranRows(values, ids, links, { permutations: 99, seed: 3 });
    expect(localMoranRows(values, ids, matrix, { permutations: 99, seed: 3 })).toEqual(ra);
  });

  it('reads the IDs along the top and down the left side in any order, and either header alone', async () => {
    const { names, ids, values, links, matrix } = await columbus();
    // rows and columns both in reverse order, headed by their IDs
    const order = names.map((_, i) => names.length - 1 - i);
    const headed: Grid = [['', ...order.map((j) => names[j])], ...order.map((i) => [names[i], ...order.map((j) => matrix[i][j])])];
    const expected = moranOfRange(values, ids, links)[0][0];
    expect(moranOfRange(values, ids, headed)[0][0]).toBeCloseTo(expected, 12);
    const topOnly: Grid = [names, ...matrix];
    const leftOnly: Grid = matrix.map((row, i) => [names[i], ...row]);
    expect(neighbourForm(topOnly, 49)).toMatchObject({ headerRow: true, headerColumn: false });
    expect(moranOfRange(values, ids, topOnly)[0][0]).toBeCloseTo(expected, 12);
    expect(moranOfRange(values, ids, leftOnly)[0][0]).toBeCloseTo(expected, 12);
  });

  it('reads blank matrix cells as no link, also in a last row and column that are all blank', async () => {
    const { ids, values, links, matrix } = await columbus();
    const blanks: Grid = matrix.map((row) => row.map((x) => (x === 0 ? null : x)));
    expect(moranOfRange(values, ids, blanks)[0][0]).toBeCloseTo(moranOfRange(values, ids, links)[0][0], 12);
    // a four-area path A–B–C plus an island D: its row and column are blank
    const path: Grid = [[0, 1, null, null], [1, 0, 1, null], [null, 1, 0, null], [null, null, null, null]];
    const w = weightsFromRange(['A', 'B', 'C', 'D'], path);
    expect(Array.from(w.rowPtr)).toEqual([0, 1, 3, 4, 4]);
  });

  it('is refused with the cell named when a weight is text or negative, or an area is its own neighbour', () => {
    const four = ['A', 'B', 'C', 'D'];
    const m = (): Grid => [[0, 1, 0, 0], [1, 0, 1, 0], [0, 1, 0, 1], [0, 0, 1, 0]];
    const text = m(); text[2][3] = 'near';
    expect(() => weightsFromRange(four, text)).toThrow(/row 3, column 4 of the neighbour range is "near"/);
    const negative = m(); negative[1][0] = -1;
    expect(() => weightsFromRange(four, negative)).toThrow(/row 2, column 1/);
    const self = m(); self[3][3] = 1;
    expect(() => weightsFromRange(four, self)).toThrow(InputError);
    expect(() => weightsFromRange(four, self)).toThrow(/area D a weight of 1 with itself/);
    const headed: Grid = [['', 'A', 'B', 'Z', 'D'], ...m().map((r, i) => [four[i], ...r])];
    expect(() => weightsFromRange(four, headed)).toThrow(/column 4 of the top row of the neighbour range holds Z/);
    expect(() => weightsFromRange(four, [[0, 1, 0, 0, 1], [1, 0, 1, 0, 1]])).toThrow(/2 rows by 5 columns, which is neither a list of links/);
  });

  it('with three areas, a range of three columns is a list of links unless it reads as a matrix', () => {
    const three = ['1', '2', '3'];
    // a list of links with numeric IDs: its first cell (1) sits on the diagonal, so it is no matrix
    const list: Grid = [[1, 2, 1], [2, 1, 1], [2, 3, 1]];
    expect(neighbourForm(list, 3)).toEqual({ kind: 'links' });
    const matrix: Grid = [[0, 1, 0], [1, 0, 1], [0, 1, 0]];
    expect(neighbourForm(matrix, 3)).toMatchObject({ kind: 'matrix' });
    expect(weightsFromRange(three, matrix).colIdx.length).toBe(4);
  });
});

describe('the request size the descriptions promise (Excel sends a call at most about 5 MB)', () => {
  // Excel passes range arguments as JSON; the sizes below are the JSON text of the ranges.
  const LIMIT = 5 * 1024 * 1024;

  it('a list of 100,000 links with eight-character IDs and full-precision weights fits', () => {
    const rows: Grid = [];
    for (let k = 0; k < 100_000; k++) rows.push([`T${String(k % 16_667).padStart(7, '0')}`, `T${String((k * 7919) % 16_667).padStart(7, '0')}`, 1 / 6 + k * 1e-9]);
    expect(JSON.stringify(rows).length).toBeLessThan(LIMIT);
  });

  it('a 1,000 × 1,000 matrix with six neighbours per row, blanks sent as null, fits', () => {
    const rows: Grid = Array.from({ length: 1000 }, (_, i) => Array.from({ length: 1000 }, (__, j) => (Math.abs(i - j) <= 3 && i !== j ? 1 / 6 : null)));
    expect(JSON.stringify(rows).length).toBeLessThan(LIMIT);
    // and one of 1,100 areas would not: the description's figure is the largest round size that fits
    const larger = 1100 * 1100 * 'null,'.length;
    expect(larger).toBeGreaterThan(LIMIT);
  });
});

describe('the rate functions on whole columns', () => {
  it('RATEGLOBAL and RATELOCAL give the same rates for whole columns as for the exact ranges', async () => {
    const { globalRateRows, localRateRows } = await import('../addin/functions/rate-logic.js');
    // invented counts for a path of four areas A–B–C–D
    const events: Grid = [['cases'], [3], [10], [0], [7]];
    const population: Grid = [['people'], [1200], [5400], [800], [3100]];
    const ids: Grid = [['area'], ['A'], ['B'], ['C'], ['D']];
    const links: Grid = [['A', 'B', 1], ['B', 'A', 1], ['B', 'C', 1], ['C', 'B', 1], ['C', 'D', 1], ['D', 'C', 1]];
    const whole = (g: Grid) => [...g, ...Array.from({ length: 3000 }, () => [null])];
    expect(globalRateRows(whole(events), whole(population), { detail: true })).toEqual(globalRateRows(events, population, { detail: true }));
    expect(localRateRows(whole(events), whole(population), whole(ids), links)).toEqual(localRateRows(events, population, ids, links));
  });
});
