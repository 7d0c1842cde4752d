// Numerical soundness on weights that are not row-standardised contiguity: binary and inverse-distance
// k-nearest weights (no symmetric form), the one admissible-range rule, the pivot check behind the
// sparse LU without pivoting. Every figure is checked against dense general-purpose algebra
// (ml-matrix: LU determinants, all eigenvalues) or a mathematical identity, named beside it.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { EigenvalueDecomposition, LuDecomposition, Matrix } from 'ml-matrix';
import { randomKnn } from '../bench/grid.js';
import type { CsrMatrix } from '../src/linalg/csr.js';
import { chooseAlgebra, sparseAlgebra } from '../src/linalg/choose-algebra.js';
import { denseAlgebra } from '../src/linalg/dense-algebra.js';
import { SparseLuLogDet } from '../src/linalg/sparse/lu-logdet.js';
import { eliminateFront, PivotError } from '../src/linalg/sparse/lu-front.js';
import { perronRoot } from '../src/linalg/range.js';
import { seededRandom } from '../src/linalg/random.js';
import { fitSpatialLag } from '../src/models/ml-lag.js';
import { readBoundary, representativePoints } from '../src/geo/index.js';
import { buildWeights } from '../src/weights/index.js';

function dense(w: CsrMatrix): Matrix {
  const m = Matrix.zeros(w.n, w.n);
  for (let i = 0; i < w.n; i++) for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) m.set(i, w.colIdx[p], w.values[p]);
  return m;
}

/** ln|det(I − ρW)| from ml-matrix's LU (partial pivoting): Σ ln|u_ii|. */
function luLogdet(W: Matrix, rho: number): number {
  const lu = new LuDecomposition(Matrix.eye(W.rows).sub(W.clone().mul(rho)));
  let s = 0;
  for (let i = 0; i < W.rows; i++) s += Math.log(Math.abs(lu.upperTriangularMatrix.get(i, i)));
  return s;
}

/** (1/λmin, 1/λmax) over the real eigenvalues from ml-matrix's complete eigendecomposition. */
function eigenRange(W: Matrix): { lower: number; upper: number } {
  const evd = new EigenvalueDecomposition(W);
  let min = Infinity, max = -Infinity;
  evd.realEigenvalues.forEach((r, i) => {
    if (Math.abs(evd.imaginaryEigenvalues[i]) > 1e-10) return;
    min = Math.min(min, r);
    max = Math.max(max, r);
  });
  return { lower: 1 / min, upper: 1 / max };
}

/**
 * The lower end of the range found by shift-and-invert Arnoldi against the true one from all
 * eigenvalues: never inside it (an estimate must never be cut off), and within the run's stated
 * tolerance (1e-7 relative, sparse/arnoldi.ts) plus rounding.
 */
function expectLowerEnd(got: number, want: number): void {
  expect(got).toBeLessThanOrEqual(want + 1e-12 * Math.abs(want));
  expect(got).toBeGreaterThan(want - 2e-7 * Math.abs(want));
}

const binaryOf = (w: CsrMatrix): CsrMatrix => ({ ...w, values: new Float64Array(w.values.length).fill(1) });

/** Inverse distance 1/d on the k-nearest pattern, not row-standardised (W ≥ 0, no symmetric form). */
function inverseDistanceOf(g: { w: CsrMatrix; x: Float64Array; y: Float64Array }): CsrMatrix {
  const values = new Float64Array(g.w.values.length);
  for (let i = 0; i < g.w.n; i++) {
    for (let p = g.w.rowPtr[i]; p < g.w.rowPtr[i + 1]; p++) {
      const j = g.w.colIdx[p];
      values[p] = 1 / Math.hypot(g.x[i] - g.x[j], g.y[i] - g.y[j]);
    }
  }
  return { ...g.w, values };
}

describe('exact log-determinant of nonnegative weights without row standardisation', () => {
  const g = randomKnn(200, 4, 31);
  for (const [label, w] of [['binary 4-nearest', binaryOf(g.w)], ['inverse distance on 4-nearest', inverseDistanceOf(g)]] as const) {
    it(`${label}: the sparse LU equals ml-matrix's dense LU to 1e-10 across the admissible range`, () => {
      const alg = sparseAlgebra(w, null);
      expect(alg.logdet.method).toMatch(/exact, sparse LU/);
      const W = dense(w);
      const want = eigenRange(W);
      // the range by the one rule (shift-and-invert Arnoldi for λmin, Collatz–Wielandt for λmax)
      expectLowerEnd(alg.range.lower, want.lower);
      expect(Math.abs(alg.range.upper - want.upper)).toBeLessThan(1e-9 * want.upper);
      const lu = new SparseLuLogDet(w);
      let viaSparse = 0;
      for (const t of [-0.98, -0.75, -0.5, -0.25, -0.05, 0.05, 0.25, 0.5, 0.75, 0.9, 0.98]) {
        const rho = t < 0 ? -t * alg.range.lower : t * alg.range.upper;
        const expected = luLogdet(W, rho);
        expect(Math.abs(alg.logdet.evaluate(rho) - expected)).toBeLessThan(1e-10 * Math.max(1, Math.abs(expected)));
        // the LU without pivoting itself wherever its pivots stay positive (always for |ρ|λmax < 1)
        try {
          expect(Math.abs(lu.evaluate(rho) - expected)).toBeLessThan(1e-10 * Math.max(1, Math.abs(expected)));
          viaSparse++;
        } catch (e) {
          expect(e).toBeInstanceOf(PivotError);
          expect(rho * alg.range.eigenMax).toBeLessThan(-1); // only below −1/λmax
        }
      }
      expect(viaSparse).toBeGreaterThanOrEqual(7);
    });
  }

  it('the Collatz–Wielandt bound brackets the Perron root (ml-matrix eigenvalues)', () => {
    const w = inverseDistanceOf(g);
    const lu = new SparseLuLogDet(w);
    const pr = perronRoot(w, (rho, b) => lu.solve(rho, b));
    const evd = new EigenvalueDecomposition(dense(w));
    const rho = Math.max(...evd.realEigenvalues.map((r, i) => Math.hypot(r, evd.imaginaryEigenvalues[i])));
    expect(pr.lower).toBeLessThanOrEqual(rho * (1 + 1e-12));
    expect(pr.upper).toBeGreaterThanOrEqual(rho * (1 - 1e-12));
    // the maximum ratio is the bound used (the minimum can stay loose: k-nearest graphs are often reducible)
    expect(pr.upper - rho).toBeLessThan(1e-10 * rho);
  });
});

describe('the pivot check behind the LU without pivoting', () => {
  it('a front whose second pivot is not positive raises PivotError naming the column', () => {
    // [[1, 2], [2, 1]]: the second pivot is 1 − 2·2 = −3 (Gaussian elimination by hand)
    const front = Float64Array.of(1, 2, 2, 1);
    expect(() => eliminateFront(front, 2, 2, 10)).toThrow(PivotError);
    try { eliminateFront(Float64Array.of(1, 2, 2, 1), 2, 2, 10); } catch (e) { expect((e as PivotError).column).toBe(11); }
    // positive pivots: ln|det| = ln 1 + ln(1 − 0.25) for [[1, 0.5], [0.5, 1]]
    expect(eliminateFront(Float64Array.of(1, 0.5, 0.5, 1), 2, 2, 0)).toBeCloseTo(Math.log(0.75), 15);
  });

  it('where the sparse LU meets a pivot that is not positive, the algebra still gives the exact value (dense LU with pivoting)', () => {
    const g = randomKnn(300, 5, 7);
    const alg = sparseAlgebra(g.w, null);
    const lu = new SparseLuLogDet(g.w);
    const W = dense(g.w);
    let found = 0;
    for (let t = 0.01; t < 1 && found < 2; t += 0.01) {
      const rho = t * alg.range.lower;
      try { lu.evaluate(rho); } catch (e) {
        expect(e).toBeInstanceOf(PivotError);
        const want = luLogdet(W, rho);
        expect(Math.abs(alg.logdet.evaluate(rho) - want)).toBeLessThan(1e-10 * Math.max(1, Math.abs(want)));
        found++;
      }
    }
    // this set of points does meet such a pivot below −1/λmax (seed chosen so that it does)
    expect(found).toBeGreaterThan(0);
  });
});

describe('lag fit on binary 4-nearest-neighbour weights', () => {
  it('the sparse exact fit equals the dense fit from all eigenvalues (ml-matrix) to 1e-7', () => {
    const g = randomKnn(300, 4, 44);
    const w = binaryOf(g.w);
    const n = w.n;
    const u = seededRandom(5);
    const normal = () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
    const x1 = new Float64Array(n).map(normal);
    const e = new Float64Array(n).map((_, i) => 1 + 2 * x1[i] + normal());
    // y = (I − 0.15W)⁻¹ e by ml-matrix's solve (|0.15|·4 < 1)
    const W = dense(w);
    const y = Float64Array.from(new LuDecomposition(Matrix.eye(n).sub(W.clone().mul(0.15))).solve(Matrix.columnVector(Array.from(e))).getColumn(0));
    const design = { names: ['constant', 'x1'], columns: [new Float64Array(n).fill(1), x1], intercept: 0 };
    const sparse = sparseAlgebra(w, null);
    const full = denseAlgebra(w, null);
    const a = fitSpatialLag(y, design, sparse), b = fitSpatialLag(y, design, full);
    expect(Math.abs(a.parameter - b.parameter)).toBeLessThan(1e-7);
    expect(Math.abs(a.logLik - b.logLik)).toBeLessThan(1e-7 * Math.abs(b.logLik));
    expect(Math.abs(a.parameterSe - b.parameterSe)).toBeLessThan(1e-6 * b.parameterSe);
    expect(Math.abs(a.lmRemainingError!.stat - b.lmRemainingError!.stat)).toBeLessThan(1e-6 * Math.max(1, b.lmRemainingError!.stat));
    expect(a.range).toEqual({ lower: sparse.range.lower, upper: sparse.range.upper });
    expectLowerEnd(sparse.range.lower, full.range.lower);
    expect(a.logDeterminantMethod).not.toMatch(/Infinity|Monte Carlo/);
  });
});

describe('one admissible-range rule at every size', () => {
  it('the bound does not jump between 150 and 151 areas (dense eigenvalues, then Arnoldi)', () => {
    const g = randomKnn(151, 4, 3);
    const w151 = g.w;
    const atDense = chooseAlgebra(w151, null, { method: 'dense' });
    const auto = chooseAlgebra(w151, null); // 151 > 150: the sparse path
    expect(auto.logdet.method).toMatch(/sparse LU/);
    expect(atDense.logdet.method).toMatch(/eigenvalues/);
    // the same W by both paths: the same range (before: −1.0000 above 150 areas)
    expectLowerEnd(auto.range.lower, atDense.range.lower);
    expect(auto.range.upper).toBe(1);
    expect(auto.range.lower).toBeLessThan(-1);
    // and 150 areas of the same layout, by the dense path, against ml-matrix's eigenvalues
    const g150 = randomKnn(150, 4, 3);
    const at150 = chooseAlgebra(g150.w, null);
    expect(at150.logdet.method).toMatch(/eigenvalues/);
    expect(Math.abs(at150.range.lower - eigenRange(dense(g150.w)).lower)).toBeLessThan(1e-8);
    expectLowerEnd(auto.range.lower, eigenRange(dense(w151)).lower);
  });
});

describe('the range by shift-and-invert Arnoldi contains the true one', () => {
  // random layouts of 300 points, 3 to 8 nearest neighbours, row-standardised and binary: the lower
  // end against ml-matrix's complete eigendecomposition (the run stops at 1e-7 relative and moves
  // the bound outward by the Ritz residual)
  for (const [k, seed] of [[3, 11], [5, 12], [8, 13]] as const) {
    it(`knn:${k}, 300 random points (seed ${seed})`, () => {
      const g = randomKnn(300, k, seed);
      for (const w of [g.w, binaryOf(g.w)]) {
        const alg = sparseAlgebra(w, null, { coordinates: { x: g.x, y: g.y } });
        expect(alg.range.method).toMatch(/shift-and-invert Arnoldi .* contains the true one/);
        expectLowerEnd(alg.range.lower, eigenRange(dense(w)).lower);
      }
    });
  }
});

describe('k-nearest weights on the 167 Auckland census area units (test/fixtures/auckland)', async () => {
  const dir = new URL('./fixtures/auckland/', import.meta.url);
  const bytes = (name: string) => new Uint8Array(readFileSync(new URL(name, dir)));
  const layer = await readBoundary([{ name: 'auckland.shp', bytes: bytes('auckland.shp') }, { name: 'auckland.dbf', bytes: bytes('auckland.dbf') }], { coordinates: 'projected' });
  const geometries = layer.areas.map((a) => a.geometry!);
  const points = representativePoints(geometries);
  const input = { ids: layer.areas.map((_, i) => `u${i + 1}`), geometries, coordinates: 'projected' as const, points };
  for (const transform of ['row', 'binary'] as const) {
    it(`knn:6, ${transform}: the range is the real-eigenvalue range (ml-matrix), not (−1, 1) or ±1/6`, () => {
      const w = buildWeights(input, { method: 'knn', k: 6 }, { transform });
      const alg = chooseAlgebra(w, null, { method: 'sparse', coordinates: points });
      const want = eigenRange(dense(w));
      expectLowerEnd(alg.range.lower, want.lower);
      expect(Math.abs(alg.range.upper - want.upper)).toBeLessThan(1e-9 * Math.abs(want.upper));
      if (transform === 'row') expect(alg.range.lower).toBeLessThan(-2);
      else expect(alg.range.lower).toBeLessThan(-1 / 6 - 0.1);
    });
  }
});
