// Property: the order of the rows is not data. Shuffling the table's rows together with the
// boundary's features must leave every estimate unchanged (each statistic is invariant under a
// simultaneous permutation of y, X and W: P y, P X, P W Pᵀ), and per-area results follow their IDs.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { runAnalysis, type AnalysisRequest, type AnalysisResult } from '../src/pipeline/index.js';
import type { WeightsSpec } from '../src/weights/index.js';
import { gridCollection, gridRows, json, csvFile } from './bad-inputs/make.js';

export const RUNS = { shuffle: 20 };

const R = 4, C = 5;
const rows = gridRows(R, C, 31);
const features = gridCollection({ rows: R, cols: C, props: rows.map((g) => ({ code: g.code })) }).features;

function files(order: number[]) {
  return {
    boundary: [json('districts.geojson', { type: 'FeatureCollection', features: order.map((i) => features[i]) })],
    data: csvFile('table.csv', ['code', 'y', 'x1', 'x2'], order.map((i) => [rows[i].code, rows[i].y, rows[i].x1, rows[i].x2])),
  };
}

function run(order: number[], weights: WeightsSpec): Promise<AnalysisResult> {
  const req: AnalysisRequest = {
    ...files(order), id: 'code', y: 'y', x: ['x1', 'x2'], weights, transform: 'row',
    models: ['ols', 'lag', 'error'], permutations: 0, impactDraws: 20, seed: 9,
  };
  return runAnalysis(req);
}

/** Closed-form quantities agree to 1e-9; ML ones to 1e-6, since Brent's search locates ρ only to about
 *  √ε·|ρ| (Brent 1973, ch. 5) and a different summation order may move it within that bracket. */
const TOLERANCE = (i: number, count: number) => (i >= 20 && i < count - 2 ? 1e-6 : 1e-9);

function summary(r: AnalysisResult): number[] {
  return [
    ...r.ols.coefficients.flatMap((c) => [c.estimate, c.se, c.p]), r.ols.r2, r.ols.logLik, r.ols.conditionNumber,
    r.ols.moran.I, r.ols.moran.z, r.ols.lm.lag.stat, r.ols.lm.error.stat, r.ols.lm.robustLag.stat, r.ols.lm.robustError.stat,
    r.ols.breuschPagan.stat, r.ols.jarqueBera.stat,
    r.fits.lag!.parameter, r.fits.lag!.parameterSe, r.fits.lag!.logLik, ...r.fits.lag!.coefficients.flatMap((c) => [c.estimate, c.se]),
    r.fits.error!.parameter, r.fits.error!.parameterSe, r.fits.error!.logLik, ...r.fits.error!.coefficients.flatMap((c) => [c.estimate, c.se]),
    r.moranY.I, r.weights.links,
  ];
}

function byId(r: AnalysisResult, v: Float64Array): Map<string, number> {
  return new Map(r.ids.map((id, i) => [id, v[i]]));
}

describe('property: shuffling rows with their geometry', () => {
  const identity = Array.from({ length: R * C }, (_, i) => i);
  // The lattice has exact ties among nearest neighbours; only the tie-inclusive rule is free of the
  // row order (the lower-row rule, the default, depends on it by definition and warns so).
  for (const weights of [{ method: 'queen' }, { method: 'knn', k: 3, ties: 'include' }] as WeightsSpec[]) {
    it(`leaves every estimate unchanged (${weights.method})`, async () => {
      const reference = await run(identity, weights);
      const ref = summary(reference);
      await fc.assert(
        fc.asyncProperty(fc.shuffledSubarray(identity, { minLength: R * C, maxLength: R * C }), async (order) => {
          const shuffled = await run(order, weights);
          const got = summary(shuffled);
          got.forEach((v, i) => expect(Math.abs(v - ref[i]), `quantity ${i}`).toBeLessThanOrEqual(TOLERANCE(i, got.length) * Math.max(1, Math.abs(ref[i]))));
          const a = byId(reference, reference.fits.lag!.residuals), b = byId(shuffled, shuffled.fits.lag!.residuals);
          for (const [id, v] of a) expect(Math.abs(b.get(id)! - v)).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(v)));
        }),
        { seed: 77, numRuns: RUNS.shuffle },
      );
    });
  }
});
