// Impacts under k-nearest-neighbour weights cost the same order as under contiguity: the draws take
// tr(I − ρW)⁻¹ from one curve built from a handful of factorisations, not from n solves per draw.
// Checked on the 500-plot wheat trial (test/fixtures/wheat, knn:4, row-standardised) against
// ml-matrix's dense inverse (tr(I − ρW)⁻¹ at three ρ) and against the same draws with exact traces
// recomputed at every draw (the former route). Binary (not row-standardised) k-nearest weights,
// where 1'(I − ρW)⁻¹1/n is no longer 1/(1 − ρ), against the same dense inverse: direct = β·mean of
// its diagonal, total = β·mean of its row sums (LeSage & Pace 2009, §2.7).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { Matrix, inverse } from 'ml-matrix';
import type { WeightsAlgebra } from '../src/linalg/algebra.js';
import { chooseAlgebra } from '../src/linalg/choose-algebra.js';
import { readBoundary, representativePoints } from '../src/geo/index.js';
import { buildWeights } from '../src/weights/index.js';
import { fitSpatialLag } from '../src/models/ml-lag.js';
import { lagImpacts } from '../src/models/impacts.js';
import { seededRandom } from '../src/linalg/random.js';

describe('k-nearest impacts on the 500 wheat plots', async () => {
  const dir = new URL('./fixtures/wheat/', import.meta.url);
  const bytes = (name: string) => new Uint8Array(readFileSync(new URL(name, dir)));
  const layer = await readBoundary([{ name: 'wheat.shp', bytes: bytes('wheat.shp') }, { name: 'wheat.dbf', bytes: bytes('wheat.dbf') }], { coordinates: 'projected' });
  const geometries = layer.areas.map((a) => a.geometry!);
  const points = representativePoints(geometries);
  const n = layer.areas.length;
  const w = buildWeights({ ids: layer.areas.map((a) => String(a.properties.SP_ID)), geometries, coordinates: 'projected', points }, { method: 'knn', k: 4 }, { transform: 'row' });
  const column = (name: string) => Float64Array.from(layer.areas, (a) => Number(a.properties[name]));
  const y = column('yield');
  const design = { names: ['constant', 'lat1', 'lon'], columns: [new Float64Array(n).fill(1), column('lat1'), column('lon')], intercept: 0 };

  it('builds the curve once; it equals the dense inverse\'s trace; draws need no per-draw traces', () => {
    const algebra = chooseAlgebra(w, null, { coordinates: points });
    expect(algebra.logdet.method).toMatch(/exact, sparse LU/);
    const fit = fitSpatialLag(y, design, algebra);
    let tracesCalls = 0;
    const counted: WeightsAlgebra = Object.assign(Object.create(algebra) as WeightsAlgebra, { traces: (rho: number) => { tracesCalls++; return algebra.traces(rho); } });
    const result = lagImpacts(fit, design, counted, { draws: 1000, seed: 3 });
    expect(tracesCalls).toBe(1); // at ρ̂ only (before: one set of n solves per draw)
    expect(result.method).toMatch(/Chebyshev points/);
    // the curve against ml-matrix's explicit inverse (a check, so the inverse is formed here)
    const curve = algebra.traceInverseCurve!(fit.parameter - 0.1, fit.parameter + 0.1);
    const W = Matrix.zeros(n, n);
    for (let i = 0; i < n; i++) for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) W.set(i, w.colIdx[p], w.values[p]);
    for (const rho of [fit.parameter - 0.07, fit.parameter, fit.parameter + 0.09]) {
      const want = inverse(Matrix.eye(n).sub(W.clone().mul(rho))).trace();
      expect(Math.abs(curve.evaluate(rho) - want)).toBeLessThan(1e-7 * want);
    }
  });

  it('gives the standard errors of the per-draw exact route to 1e-6', () => {
    const algebra = chooseAlgebra(w, null, { coordinates: points });
    const fit = fitSpatialLag(y, design, algebra);
    const fast = lagImpacts(fit, design, algebra, { draws: 40, seed: 5 });
    const perDraw: WeightsAlgebra = Object.assign(Object.create(algebra) as WeightsAlgebra, { traceInverseCurve: undefined });
    const slow = lagImpacts(fit, design, perDraw, { draws: 40, seed: 5 });
    expect(slow.method).not.toMatch(/Chebyshev/);
    fast.impacts.forEach((m, c) => {
      const s = slow.impacts[c];
      expect(m.direct).toBe(s.direct);
      for (const key of ['directSe', 'indirectSe', 'totalSe'] as const) expect(Math.abs(m[key] - s[key])).toBeLessThan(1e-6 * s[key]);
    });
  });
});

describe('the draws\' curve where traces are estimated (large n)', () => {
  it('one factorisation at the centre and the series in ρ − c follow the exact change of tr(I − ρW)⁻¹ to the probes\' noise', async () => {
    const { randomKnn } = await import('../bench/grid.js');
    const { SparseLuLogDet } = await import('../src/linalg/sparse/lu-logdet.js');
    const { traceInverseByFactor } = await import('../src/linalg/sparse/sparse-algebra.js');
    const g = randomKnn(1000, 5, 9);
    const lu = new SparseLuLogDet(g.w, { coordinates: { x: g.x, y: g.y } });
    const direct = { solveBlock: (rho: number, b: Float64Array, r: number, x: Float64Array) => lu.solveBlock(rho, b, r, x) };
    const series = traceInverseByFactor(g.w, direct, 0.4, 0.6, 1, false, 16, 1);
    expect(series.method).toMatch(/series Σ_k \(ρ − c\)ᵏ/);
    // the same probes at Chebyshev points over a wider interval (too wide for the series): the same
    // estimator, so the two agree to the series' truncation and the interpolation (an identity)
    const sameProbes = traceInverseByFactor(g.w, direct, 0, 0.9, 1, false, 16, 1);
    expect(sameProbes.method).toMatch(/Chebyshev points/);
    // the exact route (unit vectors at Chebyshev points), itself checked against ml-matrix above
    const exact = traceInverseByFactor(g.w, direct, 0.4, 0.6, 1, true, 16, 1);
    for (const rho of [0.4, 0.45, 0.6]) {
      expect(Math.abs(series.evaluate(rho) - sameProbes.evaluate(rho))).toBeLessThan(1e-7 * sameProbes.evaluate(rho));
      const got = series.evaluate(rho) - series.evaluate(0.5), want = exact.evaluate(rho) - exact.evaluate(0.5);
      // 16 Hutchinson probes on 1,000 areas: the change is right to the probes' noise (9% at most here)
      expect(Math.abs(got - want)).toBeLessThan(0.12 * Math.abs(want));
    }
  });
});

describe('impacts on binary k-nearest-neighbour weights (rows not summing to one)', () => {
  // random points in the unit square, 4 nearest neighbours, binary: W ≥ 0 with row sums 4, so
  // |ρ| < 1/4 is inside the range; y = (I − 0.15W)⁻¹(1 + 2x₁ − x₂ + e) by ml-matrix's inverse
  for (const n of [120, 400]) {
    it(`${n} areas (${n <= 150 ? 'dense eigenvalues' : 'sparse LU'}): direct and total agree with ml-matrix's dense inverse, and the draws give standard errors`, () => {
      const u = seededRandom(n);
      const normal = () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
      const px = Float64Array.from({ length: n }, () => u()), py = Float64Array.from({ length: n }, () => u());
      const geometries = Array.from({ length: n }, (_, i) => ({ kind: 'point' as const, point: [px[i], py[i]] as [number, number] }));
      const w = buildWeights({ ids: Array.from({ length: n }, (_, i) => `A${i}`), geometries, coordinates: 'projected', points: { x: px, y: py } }, { method: 'knn', k: 4 }, { transform: 'binary' });
      const W = Matrix.zeros(n, n);
      for (let i = 0; i < n; i++) for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) W.set(i, w.colIdx[p], w.values[p]);
      expect(W.getRow(0).reduce((a, b) => a + b, 0)).toBe(4);
      const x1 = new Float64Array(n).map(normal), x2 = new Float64Array(n).map(normal);
      const e = Matrix.columnVector(Array.from({ length: n }, (_, i) => 1 + 2 * x1[i] - x2[i] + normal()));
      const y = Float64Array.from(inverse(Matrix.eye(n).sub(W.clone().mul(0.15))).mmul(e).getColumn(0));
      const design = { names: ['constant', 'x1', 'x2'], columns: [new Float64Array(n).fill(1), x1, x2], intercept: 0 };
      const algebra = chooseAlgebra(w, null, { coordinates: { x: px, y: py } });
      expect(algebra.logdet.method).toMatch(n <= 150 ? /eigenvalues/ : /sparse LU/);
      const fit = fitSpatialLag(y, design, algebra);
      const rho = fit.parameter;
      expect(Math.abs(rho - 0.15)).toBeLessThan(0.1);
      const result = lagImpacts(fit, design, algebra, { draws: 200, seed: 11 });
      // the reference: (I − ρ̂W)⁻¹ formed densely (a check, so the inverse is formed here)
      const Ainv = inverse(Matrix.eye(n).sub(W.clone().mul(rho)));
      const meanDiag = Ainv.trace() / n;
      const meanRowSum = Ainv.sum() / n;
      expect(Math.abs(meanRowSum - 1 / (1 - rho))).toBeGreaterThan(0.1); // rows of W sum to 4: 1/(1 − ρ) would be wrong
      expect(result.impacts.map((m) => m.name)).toEqual(['x1', 'x2']);
      result.impacts.forEach((m, c) => {
        const beta = fit.coefficients[c + 1].estimate;
        expect(Math.abs(m.direct - beta * meanDiag)).toBeLessThan(1e-8 * Math.abs(beta * meanDiag));
        expect(Math.abs(m.total - beta * meanRowSum)).toBeLessThan(1e-8 * Math.abs(beta * meanRowSum));
        expect(Math.abs(m.indirect - beta * (meanRowSum - meanDiag))).toBeLessThan(1e-7 * Math.abs(beta * (meanRowSum - meanDiag)));
        for (const se of [m.directSe, m.indirectSe, m.totalSe]) expect(Number.isFinite(se) && se > 0).toBe(true);
      });
      expect(result.draws).toBe(200);
      expect(result.warnings ?? []).toEqual([]);
      // the same draws with tr(I − ρW)⁻¹ from the algebra at each draw's ρ (no curve): the same standard errors
      const perDraw: WeightsAlgebra = Object.assign(Object.create(algebra) as WeightsAlgebra, { traceInverseCurve: undefined });
      const fast = lagImpacts(fit, design, algebra, { draws: 40, seed: 11 });
      const slow = lagImpacts(fit, design, perDraw, { draws: 40, seed: 11 });
      fast.impacts.forEach((m, c) => {
        for (const key of ['directSe', 'indirectSe', 'totalSe'] as const) expect(Math.abs(m[key] - slow.impacts[c][key])).toBeLessThan(1e-6 * slow.impacts[c][key]);
      });
    });
  }
});
