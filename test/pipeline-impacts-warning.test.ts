// A warning from the spillover effects reaches the run's warnings through the pipeline
// (src/pipeline/run-analysis.ts, runWarnings), the JSON and the text summary. The lag model's fit is
// wrapped here to hand back the covariance that a non-positive-definite information matrix leaves
// (every entry NaN: ml-lag.ts's own fallback); the effects' reaction to it is checked against
// ml-matrix in test/numerics-reporting.test.ts. Data: Columbus (Anselin 1988, test/fixtures/columbus).
import { describe, expect, it, vi } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

vi.mock('../src/models/ml-lag.js', async (importOriginal) => {
  const original = await importOriginal<typeof import('../src/models/ml-lag.js')>();
  return {
    ...original,
    fitSpatialLag: (...args: Parameters<typeof original.fitSpatialLag>) => {
      const fit = original.fitSpatialLag(...args);
      return { ...fit, covariance: new Float64Array(fit.covariance.length).fill(NaN) };
    },
  };
});

const { runAnalysis, resultToJson } = await import('../src/pipeline/index.js');
const { formatSummary } = await import('../src/cli/summary.js');

const ROOT = join(import.meta.dirname, '..');
const dir = join(ROOT, 'test/fixtures/columbus');
const boundary = ['columbus.shp', 'columbus.dbf', 'columbus.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(dir, name))) }));

describe('an impacts warning reaches the run', () => {
  it('the information matrix not positive definite: the effects come without standard errors, and the run says why, once', async () => {
    const r = await runAnalysis({
      boundary, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
      models: ['ols', 'lag'], permutations: 0, impactDraws: 50,
    });
    const impacts = r.fits.lag!.impacts!;
    expect(impacts.draws).toBe(0);
    for (const m of impacts.impacts) expect(m.directSe).toBeNaN();
    const said = r.warnings.filter((w) => /spillover effects are given without standard errors/.test(w));
    expect(said).toHaveLength(1);
    expect(said[0]).toMatch(/information matrix of the lag model is not positive definite/);
    // the same words wherever the run's warnings go
    expect((resultToJson(r) as { warnings: string[] }).warnings).toContain(said[0]);
    expect(formatSummary(r)).toContain(`  - ${said[0]}`);
  });
});
