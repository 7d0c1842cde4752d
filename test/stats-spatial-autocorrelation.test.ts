// Moran's I, Geary's C and local Moran. Sources beside each check: identities on a ±1 checkerboard,
// the randomisation moments of Cliff & Ord (1981) checked against all n! permutations, local Moran
// (Anselin 1995), and the residual moments evaluated with an explicit residual maker in ml-matrix.
import { describe, expect, it } from 'vitest';
import { LuDecomposition, Matrix } from 'ml-matrix';
import { InputError } from '../src/errors.js';
import { denseAlgebra } from '../src/linalg/dense-algebra.js';
import { fitOls } from '../src/models/index.js';
import { gearyC, localMoran, moranColumn, moranResidualTest } from '../src/stats/index.js';
import { normalSampler, seededRandom } from '../src/stats/random.js';
import { csrFromNeighbours, rookGrid, rookNeighbours, toDenseRows } from './helpers/grid.js';

const checkerboard = (rows: number, cols: number): Float64Array =>
  Float64Array.from({ length: rows * cols }, (_, i) => ((Math.floor(i / cols) + (i % cols)) % 2 ? 1 : -1));

describe("Moran's I of a column", () => {
  it('checkerboard ±1 with rook weights gives I = −1 exactly (binary and row-standardised)', () => {
    // identity: every rook neighbour has the opposite sign and the mean is 0 on an even lattice
    const v = checkerboard(6, 8);
    const nb = rookNeighbours(6, 8);
    expect(moranColumn(v, csrFromNeighbours(nb, 'binary')).I).toBeCloseTo(-1, 14);
    expect(moranColumn(v, csrFromNeighbours(nb, 'row')).I).toBeCloseTo(-1, 14);
  });

  it('E[I] = −1/(n − 1)', () => {
    // Cliff & Ord (1981): the expectation of I under randomisation, for any W
    const { w } = rookGrid(5, 7);
    const v = Float64Array.from({ length: 35 }, (_, i) => Math.sin(i) + i / 10);
    expect(moranColumn(v, w).expected).toBeCloseTo(-1 / 34, 15);
  });

  it('randomisation mean and variance equal the exact moments over all n! permutations (Cliff & Ord)', () => {
    // identity: the randomisation moments are the moments over every permutation of the values
    const nb = [[1, 2], [0, 3], [0, 3, 4], [1, 2, 5], [2, 5, 6], [3, 4], [4]];
    const w = csrFromNeighbours(nb, 'row');
    const v = Float64Array.from([3, 7, 1, 9, 4, 4.5, 12]);
    const res = moranColumn(v, w);
    const g = gearyC(v, w);
    const iValues: number[] = [];
    const cValues: number[] = [];
    const permute = (arr: number[], k: number): void => {
      if (k === arr.length) {
        const p = Float64Array.from(arr);
        iValues.push(moranColumn(p, w).I);
        cValues.push(gearyC(p, w).C);
        return;
      }
      for (let i = k; i < arr.length; i++) {
        [arr[k], arr[i]] = [arr[i], arr[k]];
        permute(arr, k + 1);
        [arr[k], arr[i]] = [arr[i], arr[k]];
      }
    };
    permute(Array.from(v), 0);
    const moments = (xs: number[]) => {
      const m = xs.reduce((s, x) => s + x, 0) / xs.length;
      return { mean: m, variance: xs.reduce((s, x) => s + (x - m) ** 2, 0) / xs.length };
    };
    const mi = moments(iValues);
    const mc = moments(cValues);
    expect(mi.mean).toBeCloseTo(res.expected, 12);
    expect(mi.variance).toBeCloseTo(res.variance, 12);
    expect(mc.mean).toBeCloseTo(1, 12);
    expect(mc.variance).toBeCloseTo(g.variance, 12);
  });

  it('permutation p lies in (0, 1] and is reproducible from its seed', () => {
    const { w } = rookGrid(6, 6);
    const normal = normalSampler(seededRandom(2));
    const v = Float64Array.from({ length: 36 }, () => normal());
    const a = moranColumn(v, w, { permutations: 199, seed: 3 });
    const b = moranColumn(v, w, { permutations: 199, seed: 3 });
    expect(a.permutationP).toBeGreaterThan(0);
    expect(a.permutationP).toBeLessThanOrEqual(1);
    expect(a.permutationP).toBe(b.permutationP);
    expect(a.permutations).toBe(199);
    // a strong pattern is more extreme than every permutation: p = 1/(R + 1), by the definition of
    // the permutation p-value (1 + #{at least as extreme})/(1 + R)
    expect(moranColumn(checkerboard(6, 6), w, { permutations: 99, seed: 1 }).permutationP).toBeCloseTo(0.01, 12);
  });

  it('constant column is an input error', () => {
    // identity: z'z = 0 for a constant column, so I is 0/0; project rule: refuse it as bad input
    const { w } = rookGrid(3, 3);
    expect(() => moranColumn(new Float64Array(9).fill(2), w)).toThrow(InputError);
  });
});

describe("Geary's C and local Moran", () => {
  it('checkerboard ±1 with rook weights: C = 2(n − 1)/n (identity: every neighbour pair differs by 2)', () => {
    const n = 48;
    expect(gearyC(checkerboard(6, 8), csrFromNeighbours(rookNeighbours(6, 8), 'binary')).C).toBeCloseTo((2 * (n - 1)) / n, 14);
  });

  it('mean of local I_i equals global I for row-standardised W (Anselin 1995)', () => {
    const { w } = rookGrid(7, 5);
    const v = Float64Array.from({ length: 35 }, (_, i) => Math.cos(i * 0.7) + (i % 5));
    const local = localMoran(v, w);
    expect(local.reduce((s, x) => s + x, 0) / 35).toBeCloseTo(moranColumn(v, w).I, 13);
  });
});

describe("Moran's I of regression residuals", () => {
  it('mean and variance equal the formulas evaluated with an explicit M = I − X(XᵀX)⁻¹Xᵀ (ml-matrix)', () => {
    // moments of I for regression residuals (Cliff & Ord 1981) evaluated with dense matrices;
    // asymmetric W to exercise tr(MWMWᵀ) ≠ tr((MW)²)
    const n = 30;
    const nb = Array.from({ length: n }, (_, i) => [(i + 1) % n, (i + 5) % n, (i + 11) % n].slice(0, 1 + (i % 3)));
    const w = csrFromNeighbours(nb, 'row');
    const algebra = denseAlgebra(w, null);
    const normal = normalSampler(seededRandom(77));
    const x = { intercept: 0, names: ['constant', 'a', 'b'], columns: [new Float64Array(n).fill(1), Float64Array.from({ length: n }, () => normal()), Float64Array.from({ length: n }, () => normal())] };
    const y = Float64Array.from({ length: n }, (_, i) => x.columns[1][i] - x.columns[2][i] + normal());
    const ols = fitOls(y, x);
    const res = moranResidualTest(ols, x, algebra);
    const X = new Matrix(Array.from({ length: n }, (_, i) => x.columns.map((c) => c[i])));
    const M = Matrix.eye(n).sub(X.mmul(new LuDecomposition(X.transpose().mmul(X)).solve(X.transpose())));
    const W = new Matrix(toDenseRows(w));
    const MW = M.mmul(W);
    const k = 3;
    const s0 = w.values.reduce((s, v) => s + v, 0);
    const c = n / s0;
    const e = Matrix.columnVector(Array.from(ols.residuals));
    const I = c * e.transpose().mmul(W).mmul(e).get(0, 0) / e.transpose().mmul(e).get(0, 0);
    const mean = (c * MW.trace()) / (n - k);
    const variance = (c * c * (MW.mmul(M).mmul(W.transpose()).trace() + MW.mmul(MW).trace() + MW.trace() ** 2)) / ((n - k) * (n - k + 2)) - mean * mean;
    expect(res.I).toBeCloseTo(I, 12);
    expect(res.expected).toBeCloseTo(mean, 12);
    expect(res.variance).toBeCloseTo(variance, 12);
  });
});
