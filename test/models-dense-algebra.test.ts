import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, LuDecomposition, Matrix } from 'ml-matrix';
import { denseAlgebra } from '../src/linalg/dense-algebra.js';
import { symmetricEigenvalues } from '../src/linalg/dense-eigen.js';
import { solveShifted } from '../src/linalg/iterative.js';
import { seededRandom } from '../src/stats/random.js';
import { csrFromNeighbours, rookGrid, rookNeighbours, toDenseRows } from './helpers/grid.js';

/** ln|det(I − ρW)| from ml-matrix's LU (a general-purpose reference library). */
function referenceLogdet(rows: number[][], rho: number): number {
  const n = rows.length;
  const a = new Matrix(rows.map((r, i) => r.map((v, j) => (i === j ? 1 : 0) - rho * v)));
  const lu = new LuDecomposition(a);
  let s = 0;
  for (let i = 0; i < n; i++) s += Math.log(Math.abs(lu.upperTriangularMatrix.get(i, i)));
  return s;
}

function inverse(rows: number[][], rho: number): Matrix {
  const n = rows.length;
  const a = new Matrix(rows.map((r, i) => r.map((v, j) => (i === j ? 1 : 0) - rho * v)));
  return new LuDecomposition(a).solve(Matrix.eye(n));
}

describe('symmetric eigenvalues', () => {
  it('match ml-matrix on a random symmetric matrix', () => {
    const rand = seededRandom(7);
    const n = 40;
    const rows = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) rows[i][j] = rows[j][i] = rand() - 0.5;
    const ours = symmetricEigenvalues(Float64Array.from(rows.flat()), n);
    const ref = [...new EigenvalueDecomposition(new Matrix(rows), { assumeSymmetric: true }).realEigenvalues].sort((a, b) => a - b);
    for (let i = 0; i < n; i++) expect(ours[i]).toBeCloseTo(ref[i], 11);
  });

  it('match the closed form for the binary rook lattice: 2cos(πa/(r+1)) + 2cos(πb/(c+1))', () => {
    // identity: the rook lattice adjacency is the Kronecker sum of two path graphs
    const rows = 6;
    const cols = 9;
    const nb = rookNeighbours(rows, cols);
    const c = csrFromNeighbours(nb, 'binary');
    const dense = Float64Array.from(toDenseRows(c).flat());
    const ours = symmetricEigenvalues(dense, rows * cols);
    const exact: number[] = [];
    for (let a = 1; a <= rows; a++) for (let b = 1; b <= cols; b++) exact.push(2 * Math.cos((Math.PI * a) / (rows + 1)) + 2 * Math.cos((Math.PI * b) / (cols + 1)));
    exact.sort((x, y) => x - y);
    for (let i = 0; i < exact.length; i++) expect(ours[i]).toBeCloseTo(exact[i], 11);
  });
});

describe('dense weights algebra', () => {
  const { w, base } = rookGrid(5, 6);
  const rows = toDenseRows(w);

  it('log-determinant equals ln|det(I − ρW)| from ml-matrix LU (row-standardised rook, symmetric base)', () => {
    const alg = denseAlgebra(w, base);
    for (const rho of [-0.9, -0.3, 0, 0.4, 0.85]) expect(alg.logdet.evaluate(rho)).toBeCloseTo(referenceLogdet(rows, rho), 10);
    expect(alg.range.upper).toBeCloseTo(1, 12); // identity: row-standardised W has ω_max = 1
  });

  it('accepts the symmetric similar matrix D^-½CD^-½ as well as the base C', () => {
    const d = new Float64Array(base.n);
    for (let i = 0; i < base.n; i++) d[i] = base.rowPtr[i + 1] - base.rowPtr[i];
    const values = new Float64Array(base.values.length);
    for (let i = 0; i < base.n; i++) for (let p = base.rowPtr[i]; p < base.rowPtr[i + 1]; p++) values[p] = 1 / Math.sqrt(d[i] * d[base.colIdx[p]]);
    const s = { ...base, values };
    const a = denseAlgebra(w, s);
    const b = denseAlgebra(w, base);
    expect(a.logdet.evaluate(0.5)).toBeCloseTo(b.logdet.evaluate(0.5), 12);
  });

  it('general (no symmetric form) agrees with LU for an asymmetric W', () => {
    // nearest-two-neighbour style asymmetric weights on a ring with a skip
    const n = 12;
    const nb = Array.from({ length: n }, (_, i) => [(i + 1) % n, (i + 3) % n]);
    const wa = csrFromNeighbours(nb, 'row');
    const alg = denseAlgebra(wa, null);
    const r = toDenseRows(wa);
    for (const rho of [-0.5, 0.3, 0.7]) expect(alg.logdet.evaluate(rho)).toBeCloseTo(referenceLogdet(r, rho), 10);
  });

  it('traces at ρ equal those of the explicit inverse (ml-matrix), symmetric and general paths', () => {
    const nbAsym = Array.from({ length: 10 }, (_, i) => [(i + 1) % 10, (i + 4) % 10, (i + 7) % 10].slice(0, 2 + (i % 2)));
    for (const [wm, sym] of [[w, base], [csrFromNeighbours(nbAsym, 'row'), null]] as const) {
      const alg = denseAlgebra(wm, sym);
      const r = toDenseRows(wm);
      const rho = 0.55;
      const ainv = inverse(r, rho);
      const g = new Matrix(r).mmul(ainv);
      const t = alg.traces(rho);
      expect(t.trAinv).toBeCloseTo(ainv.trace(), 9);
      expect(t.trG).toBeCloseTo(g.trace(), 9);
      expect(t.trG2).toBeCloseTo(g.mmul(g).trace(), 9);
      expect(t.trGtG).toBeCloseTo(g.transpose().mmul(g).trace(), 8);
      const wmM = new Matrix(r);
      expect(alg.lmTrace).toBeCloseTo(wmM.transpose().mmul(wmM).trace() + wmM.mmul(wmM).trace(), 12);
      const pt = alg.powerTraces(3);
      expect(pt[1]).toBeCloseTo(wmM.mmul(wmM).trace(), 9);
      expect(pt[2]).toBeCloseTo(wmM.mmul(wmM).mmul(wmM).trace(), 9);
    }
  });

  it('GMRES solve of (I − ρW)x = b matches ml-matrix LU', () => {
    const rand = seededRandom(3);
    const b = Float64Array.from({ length: w.n }, () => rand());
    const { x, converged } = solveShifted(w, -1.2, b);
    expect(converged).toBe(true);
    const ref = inverse(rows, -1.2).mmul(Matrix.columnVector(Array.from(b)));
    for (let i = 0; i < w.n; i++) expect(x[i]).toBeCloseTo(ref.get(i, 0), 10);
  });
});
