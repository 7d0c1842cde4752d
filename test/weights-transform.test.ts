// Weight transforms, the spatial lag, summaries and subsets. Sources beside each group: the similarity
// transform of row-standardised weights (Ord 1975) with eigenvalues from ml-matrix, the definition of
// the spatial lag, counting on small lattices, and restriction identities for subsets.
import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import type { CsrMatrix } from '../src/linalg/csr.js';
import { InputError } from '../src/errors.js';
import {
  buildWeights,
  connectedComponents,
  spatialLag,
  subsetWeights,
  summarizeWeights,
  symmetricForm,
} from '../src/weights/index.js';
import { lcg, polygon, row, squareGrid, squareRing } from './fixtures/weights/shapes.js';

const ids = (n: number) => Array.from({ length: n }, (_, i) => `R${i + 1}`);

function dense(m: CsrMatrix): number[][] {
  const out = Array.from({ length: m.n }, () => new Array<number>(m.n).fill(0));
  for (let i = 0; i < m.n; i++) for (let p = m.rowPtr[i]; p < m.rowPtr[i + 1]; p++) out[i][m.colIdx[p]] = m.values[p];
  return out;
}

function sortedEigenvalues(a: number[][], symmetric: boolean): number[] {
  const e = new EigenvalueDecomposition(new Matrix(a), { assumeSymmetric: symmetric });
  return [...e.realEigenvalues].sort((x, y) => x - y);
}

describe('symmetric form of row-standardised weights', () => {
  // Source: W = D⁻¹C with C symmetric is similar to S = D^{-1/2} C D^{-1/2} = D^{1/2} W D^{-1/2}
  // (similarity transform; Ord 1975, JASA 70). Eigenvalues from ml-matrix, a general-purpose library.
  const w = buildWeights({ ids: ids(20), geometries: squareGrid(4, 5), coordinates: 'projected' }, { method: 'queen' });

  it('S = D^{1/2} W D^{-1/2} entry by entry, and S is symmetric', () => {
    const s = symmetricForm(w)!;
    const wd = dense(w), sd = dense(s);
    const degree = Array.from({ length: 20 }, (_, i) => w.rowPtr[i + 1] - w.rowPtr[i]);
    for (let i = 0; i < 20; i++) {
      for (let j = 0; j < 20; j++) {
        expect(sd[i][j]).toBeCloseTo((Math.sqrt(degree[i]) * wd[i][j]) / Math.sqrt(degree[j]), 14);
        expect(sd[i][j]).toBeCloseTo(sd[j][i], 15);
      }
    }
  });

  it('W and S have the same eigenvalues; the largest is 1', () => {
    const ew = sortedEigenvalues(dense(w), false);
    const es = sortedEigenvalues(dense(symmetricForm(w)!), true);
    for (let k = 0; k < 20; k++) expect(ew[k]).toBeCloseTo(es[k], 10);
    expect(es[19]).toBeCloseTo(1, 12);
  });

  it('binary contiguity is symmetric already and comes back unchanged', () => {
    const b = buildWeights({ ids: ids(20), geometries: squareGrid(4, 5), coordinates: 'projected' }, { method: 'rook' }, { transform: 'binary' });
    expect(symmetricForm(b)!.values).toBe(b.values);
  });

  it('row-standardised inverse distance has one too; k-nearest has none', () => {
    const u = lcg(3);
    const x = Float64Array.from({ length: 30 }, u), y = Float64Array.from({ length: 30 }, u);
    const geometries = Array.from({ length: 30 }, (_, i) => ({ kind: 'point' as const, point: [x[i], y[i]] as [number, number] }));
    const idw = buildWeights({ ids: ids(30), geometries, coordinates: 'projected', points: { x, y } }, { method: 'idw', power: 2 });
    const ew = sortedEigenvalues(dense(idw), false);
    const es = sortedEigenvalues(dense(symmetricForm(idw)!), true);
    for (let k = 0; k < 30; k++) expect(ew[k]).toBeCloseTo(es[k], 9);
    const knn = buildWeights({ ids: ids(30), geometries, coordinates: 'projected', points: { x, y } }, { method: 'knn', k: 3 });
    expect(symmetricForm(knn)).toBeNull();
  });

  it('withoutNeighbours: zero rows and columns in S', () => {
    const geoms = [...squareGrid(2, 2), polygon(squareRing(9, 9))];
    const wi = buildWeights({ ids: ids(5), geometries: geoms, coordinates: 'projected' }, { method: 'rook' });
    const s = dense(symmetricForm(wi)!);
    expect(s[4].every((v) => v === 0)).toBe(true);
    expect(s.every((r) => r[4] === 0)).toBe(true);
  });
});

describe('spatial lag and summaries', () => {
  const w = buildWeights({ ids: ids(9), geometries: squareGrid(3, 3), coordinates: 'projected' }, { method: 'rook' });

  it('row-standardised lag is the mean of the neighbours', () => {
    // Source: definition of the spatial lag with row-standardised weights (mean of neighbours).
    const v = Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8, 9]);
    const lag = spatialLag(w, v);
    expect(lag[4]).toBeCloseTo((2 + 4 + 6 + 8) / 4, 15);
    expect(lag[0]).toBeCloseTo((2 + 4) / 2, 15);
    const out = new Float64Array(9);
    expect(spatialLag(w, v, out)).toBe(out);
  });

  it('3 × 3 rook grid: corners 2, sides 3, centre 4 neighbours', () => {
    // Source: counting on the lattice (4 corners, 4 side cells, 1 centre).
    const s = summarizeWeights(w);
    expect(s.n).toBe(9);
    expect(s.links).toBe(24);
    expect(s.density).toBeCloseTo(24 / 81, 15);
    expect(s.histogram).toEqual([[2, 4], [3, 4], [4, 1]]);
    expect([s.minNeighbours, s.medianNeighbours, s.maxNeighbours]).toEqual([2, 3, 4]);
    expect(s.meanNeighbours).toBeCloseTo(24 / 9, 15);
    expect(s.withoutNeighbours).toEqual([]);
    expect(s.components).toBe(1);
    expect(s.symmetric).toBe(false); // row-standardised: corner rows weigh 1/2, side rows 1/3
  });

  it('components: two separate blocks and an island', () => {
    const geoms = [...squareGrid(2, 2), polygon(squareRing(10, 0)), polygon(squareRing(11, 0)), polygon(squareRing(20, 20))];
    const wc = buildWeights({ ids: ids(7), geometries: geoms, coordinates: 'projected' }, { method: 'rook' });
    const c = connectedComponents(wc);
    expect(c.count).toBe(3);
    expect(Array.from(c.label)).toEqual([0, 0, 0, 0, 1, 1, 2]);
  });
});

describe('subsets', () => {
  it('dropping areas equals building on the remaining areas (contiguity), rows re-standardised', () => {
    // Source: contiguity of a subset of areas is the restriction of the full contiguity (identity).
    const geoms = squareGrid(4, 4);
    const full = buildWeights({ ids: ids(16), geometries: geoms, coordinates: 'projected' }, { method: 'queen' });
    const keep = [0, 1, 2, 4, 6, 9, 15];
    const sub = subsetWeights(full, keep);
    const direct = buildWeights({ ids: keep.map((i) => `R${i + 1}`), geometries: keep.map((i) => geoms[i]), coordinates: 'projected' }, { method: 'queen' });
    expect(sub.ids).toEqual(direct.ids);
    expect(Array.from(sub.rowPtr)).toEqual(Array.from(direct.rowPtr));
    expect(Array.from(sub.colIdx)).toEqual(Array.from(direct.colIdx));
    for (let p = 0; p < sub.values.length; p++) expect(sub.values[p]).toBeCloseTo(direct.values[p], 15);
    expect(Array.from(sub.symmetricBase!.colIdx)).toEqual(Array.from(direct.symmetricBase!.colIdx));
    expect(summarizeWeights(sub).withoutNeighbours).toEqual(['R16']);
    expect(sub.description).toContain('9 areas left out');
  });

  it('a repeated index is refused', () => {
    const w = buildWeights({ ids: ids(4), geometries: squareGrid(2, 2), coordinates: 'projected' }, { method: 'rook' });
    expect(() => subsetWeights(w, [0, 1, 1])).toThrow(InputError);
    expect(row(subsetWeights(w, [3, 0]), 0)).toEqual([]);
  });
});
