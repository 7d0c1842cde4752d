import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readBoundary, representativePoints } from '../src/geo/index.js';
import { buildWeights, type WeightsSpec } from '../src/weights/index.js';
import { denseAlgebra } from '../src/linalg/dense-algebra.js';
import { fitOls, fitSpatialError, fitSpatialLag, lagImpacts } from '../src/models/index.js';
import { lmTests, moranResidualTest } from '../src/stats/index.js';
import { columbusData, readGolden } from './helpers/columbus.js';
import { csrFromNeighbours } from './helpers/grid.js';

// Golden values: test/golden/columbus.json, written by scripts/reference/columbus.py (numpy + scipy,
// independent of the engine). Compared to 6 significant digits.
// readGolden throws when the file is missing, so the comparisons fail rather than skip.
const golden = readGolden();

/** The engine's own neighbours on the Columbus shapefile (readBoundary, then buildWeights). */
async function engineNeighbours(spec: WeightsSpec): Promise<number[][]> {
  const dir = new URL('./fixtures/columbus/', import.meta.url);
  const files = ['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(new URL(name, dir))) }));
  const layer = await readBoundary(files);
  const geometries = layer.areas.map((a) => a.geometry!);
  const w = buildWeights(
    { ids: layer.areas.map((_, i) => String(i)), geometries, coordinates: layer.coordinates, points: representativePoints(geometries) },
    spec,
  );
  const rows: number[][] = [];
  for (let i = 0; i < w.n; i++) rows.push(Array.from(w.colIdx.subarray(w.rowPtr[i], w.rowPtr[i + 1])));
  return rows;
}

function sig(actual: number, expected: number, relative: number): void {
  const scale = Math.max(Math.abs(expected), 1e-300);
  expect(Math.abs(actual - expected) / scale, `${actual} vs ${expected}`).toBeLessThan(relative);
}
function sig6(actual: number, expected: number): void {
  sig(actual, expected, 5e-6);
}
function sig6p(actual: number, expected: number): void {
  // p-values too, down to the far tail (e.g. 2.8e-29): both sides compute them from tail functions
  sig6(actual, expected);
}
function compareTest(actual: { stat: number; df: number; p: number }, expected: { stat: number; df: number; p: number }): void {
  sig6(actual.stat, expected.stat);
  expect(actual.df).toBe(expected.df);
  sig6p(actual.p, expected.p);
}
function compareCoefficients(actual: { name: string; estimate: number; se: number; stat: number; p: number }[], expected: any[]): void {
  expect(actual.map((c) => c.name)).toEqual(expected.map((c: any) => c.name));
  actual.forEach((c, i) => {
    sig6(c.estimate, expected[i].estimate);
    sig6(c.se, expected[i].se);
    sig6(c.stat, expected[i].stat);
    sig6p(c.p, expected[i].p);
  });
}

describe('Columbus OLS, published figures (recalled from memory)', () => {
  it('β = 68.619, −1.5973, −0.2739; R² = 0.5524 (to the printed digits)', async () => {
    const { y, x } = await columbusData();
    const fit = fitOls(y, x);
    expect(fit.coefficients[0].estimate).toBeCloseTo(68.619, 3);
    expect(fit.coefficients[1].estimate).toBeCloseTo(-1.5973, 4);
    expect(fit.coefficients[2].estimate).toBeCloseTo(-0.2739, 4);
    expect(fit.r2).toBeCloseTo(0.5524, 4);
  });
});

for (const key of ['queen', 'knn4'] as const) {
  describe(`Columbus against the numpy/scipy reference (${key} weights)`, () => {
    const g = key === 'queen' ? golden : golden.knn4;
    const setup = async () => {
      const { y, x } = await columbusData();
      const w = csrFromNeighbours(g.weights.neighbours, 'row');
      const symmetricBase = key === 'queen' ? csrFromNeighbours(g.weights.neighbours, 'binary') : null;
      const algebra = denseAlgebra(w, symmetricBase);
      const ols = fitOls(y, x);
      return { y, x, w, algebra, ols };
    };

    it('the engine builds the golden neighbours and link count from the shapefile', async () => {
      const rows = await engineNeighbours(key === 'queen' ? { method: 'queen' } : { method: 'knn', k: 4 });
      expect(rows.reduce((s, r) => s + r.length, 0)).toBe(g.weights.links);
      const sorted = (list: number[][]) => list.map((r) => [...r].sort((a, b) => a - b).join(' '));
      const differing = sorted(rows).flatMap((r, i) => (r === sorted(g.weights.neighbours)[i] ? [] : [i]));
      // 4 nearest: the reference takes each area's first-ring centroid, the engine the area-weighted
      // centroid of all parts; areas 31, 35 and 45 (1-based) get a different fourth neighbour.
      expect(differing).toEqual(key === 'queen' ? [] : [30, 34, 44]);
    });

    it('OLS and its diagnostics', async () => {
      const { x, algebra, ols } = await setup();
      const o = g.ols;
      compareCoefficients(ols.coefficients, o.coefficients);
      for (const f of ['r2', 'adjR2', 'sigma2', 'logLik', 'aic', 'bic', 'conditionNumber'] as const) sig6(ols[f], o[f]);
      compareTest(ols.jarqueBera, o.jarqueBera);
      compareTest(ols.breuschPagan, o.breuschPagan);
      compareTest(ols.breuschPaganStudentised, o.breuschPaganStudentised);
      const m = moranResidualTest(ols, x, algebra);
      for (const f of ['I', 'expected', 'variance', 'z', 'p'] as const) sig6(m[f], o.moran[f]);
      const lm = lmTests(ols, x, algebra);
      for (const f of ['error', 'lag', 'robustError', 'robustLag', 'joint'] as const) compareTest(lm[f], o.lm[f]);
    });

    it('ML lag', async () => {
      const { y, x, algebra, ols } = await setup();
      const fit = fitSpatialLag(y, x, algebra, ols);
      const l = g.lag;
      expect(fit.convergence.converged).toBe(true);
      sig6(fit.parameter, l.rho);
      sig6(fit.parameterSe, l.rhoSe);
      compareCoefficients(fit.coefficients, l.coefficients);
      for (const f of ['sigma2', 'logLik', 'aic', 'bic', 'pseudoR2'] as const) sig6(fit[f], l[f]);
      compareTest(fit.lr, l.lr);
      compareTest(fit.lmRemainingError!, l.lmRemainingError);
      compareTest(fit.breuschPagan, l.breuschPagan);
    });

    it('ML error', async () => {
      const { y, x, algebra, ols } = await setup();
      const fit = fitSpatialError(y, x, algebra, ols);
      const e = g.error;
      expect(fit.convergence.converged).toBe(true);
      sig6(fit.parameter, e.lambda);
      sig6(fit.parameterSe, e.lambdaSe);
      compareCoefficients(fit.coefficients, e.coefficients);
      for (const f of ['sigma2', 'logLik', 'aic', 'bic', 'pseudoR2'] as const) sig6(fit[f], e[f]);
      compareTest(fit.lr, e.lr);
      compareTest(fit.breuschPagan, e.breuschPagan);
    });

    if (key === 'queen') {
      it('lag impacts (point estimates)', async () => {
        const { y, x, algebra, ols } = await setup();
        const fit = fitSpatialLag(y, x, algebra, ols);
        const res = lagImpacts(fit, x, algebra, { draws: 200, seed: 5 });
        expect(res.impacts.map((i) => i.name)).toEqual(g.impacts.map((i: any) => i.name));
        res.impacts.forEach((imp, i) => {
          sig6(imp.direct, g.impacts[i].direct);
          sig6(imp.indirect, g.impacts[i].indirect);
          sig6(imp.total, g.impacts[i].total);
          expect(imp.directSe).toBeGreaterThan(0);
        });
      });

      it('ML lag, published figures (recalled from memory): ρ = 0.4233, β = 45.603, −1.0487, −0.2663, logL = −182.674', async () => {
        const { y, x, algebra, ols } = await setup();
        const fit = fitSpatialLag(y, x, algebra, ols);
        expect(fit.parameter).toBeCloseTo(0.4233, 4);
        expect(fit.coefficients[0].estimate).toBeCloseTo(45.603, 3);
        expect(fit.coefficients[1].estimate).toBeCloseTo(-1.0487, 4);
        expect(fit.coefficients[2].estimate).toBeCloseTo(-0.2663, 4);
        expect(fit.logLik).toBeCloseTo(-182.674, 3);
      });
    }
  });
}
