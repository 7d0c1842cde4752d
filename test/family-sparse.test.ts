/**
 * The family on the sparse path (large n): the same maximiser as the exact search. On invented rook
 * grids (seeded), the lag-and-error model bracketed with the cheap log-determinant and polished with
 * exact evaluations lands where the bounded search on the exact likelihood does; the Durbin models
 * by the sparse algebra agree with the dense (all eigenvalues) one. Mathematical identity: the
 * polish changes how the maximum is found, not where it is.
 */
import { describe, expect, it } from 'vitest';
import type { WeightsAlgebra } from '../src/linalg/algebra.js';
import { denseAlgebra } from '../src/linalg/dense-algebra.js';
import { sparseAlgebra } from '../src/linalg/choose-algebra.js';
import { csrMultiply, type CsrMatrix } from '../src/linalg/csr.js';
import { solveShifted } from '../src/linalg/index.js';
import { fitOls, type PreparedInputs } from '../src/models/index.js';
import { fitLagError } from '../src/models/lag-error.js';
import { fitDurbin, fitDurbinError } from '../src/models/durbin.js';
import { normalSampler, seededRandom } from '../src/stats/index.js';
import { rookGrid } from './helpers/grid.js';

/** y = (I − ρW)⁻¹(1 + 2x₁ − x₂ + u), u = (I − λW)⁻¹ε: a process with both spillovers. */
function data(w: CsrMatrix, rho: number, lambda: number, seed: number) {
  const n = w.n;
  const normal = normalSampler(seededRandom(seed));
  const x1 = Float64Array.from({ length: n }, normal);
  const x2 = Float64Array.from({ length: n }, normal);
  const u = solveShifted(w, lambda, Float64Array.from({ length: n }, normal)).x;
  const y = solveShifted(w, rho, Float64Array.from({ length: n }, (_, i) => 1 + 2 * x1[i] - x2[i] + u[i])).x;
  return { y, design: { names: ['constant', 'x1', 'x2'], columns: [new Float64Array(n).fill(1), x1, x2], intercept: 0 } };
}

function prepared(w: CsrMatrix, algebra: WeightsAlgebra, d: ReturnType<typeof data>): PreparedInputs {
  return { y: d.y, design: d.design, w, algebra, ols: fitOls(d.y, d.design) };
}

describe('the lag-and-error model on the sparse path (2,500 areas)', () => {
  const { w, base } = rookGrid(50, 50);
  const algebra = sparseAlgebra(w, base, { seed: 3 });
  const d = data(w, 0.4, 0.3, 11);

  it('the polish with exact log-determinants lands on the exact search’s maximum, with far fewer exact evaluations', () => {
    expect(algebra.roughLogdet).toBeDefined();
    let exactCalls = 0;
    const counted = Object.assign(Object.create(algebra) as WeightsAlgebra, {
      logdet: { evaluate: (r: number) => { exactCalls++; return algebra.logdet.evaluate(r); }, method: algebra.logdet.method, accuracy: algebra.logdet.accuracy },
    });
    const polished = fitLagError(prepared(w, counted, d));
    const polishCalls = exactCalls;
    exactCalls = 0;
    const plain = Object.assign(Object.create(counted) as WeightsAlgebra, { roughLogdet: undefined });
    const exact = fitLagError(prepared(w, plain, d));
    expect(polished.convergence.converged).toBe(true);
    expect(polished.convergence.message).toContain('polished with');
    expect(Math.abs(polished.rho - exact.rho)).toBeLessThan(1e-7);
    expect(Math.abs(polished.lambda - exact.lambda)).toBeLessThan(1e-7);
    expect(Math.abs(polished.logLik - exact.logLik)).toBeLessThan(1e-8 * Math.abs(exact.logLik));
    expect(polished.evaluations).toBe(polishCalls);
    expect(polishCalls).toBeLessThan(40);
    expect(exactCalls).toBeGreaterThan(5 * polishCalls);
    // and it finds the process it was given (within 4 standard errors)
    expect(Math.abs(polished.rho - 0.4)).toBeLessThan(4 * polished.rhoSe);
    expect(Math.abs(polished.lambda - 0.3)).toBeLessThan(4 * polished.lambdaSe);
  }, 120_000);
});

describe('the Durbin models: sparse algebra against all eigenvalues (400 areas)', () => {
  const { w, base } = rookGrid(20, 20);
  const d = data(w, 0.5, 0, 5);
  const wx = csrMultiply(w, d.design.columns[1]);
  d.y.forEach((_, i) => { d.y[i] += 0.7 * wx[i]; });
  const dense = prepared(w, denseAlgebra(w, base), d);
  const sparse = prepared(w, sparseAlgebra(w, base, { seed: 3 }), d);

  for (const [name, fit] of [['spatial Durbin', fitDurbin], ['spatial Durbin error', fitDurbinError]] as const) {
    it(`${name}: the same estimates, standard errors and log-likelihood`, () => {
      const a = fit(dense);
      const b = fit(sparse);
      expect(Math.abs(a.parameter - b.parameter)).toBeLessThan(1e-7);
      expect(Math.abs(a.logLik - b.logLik)).toBeLessThan(1e-8 * Math.abs(a.logLik));
      a.coefficients.forEach((c, j) => {
        expect(Math.abs(c.estimate - b.coefficients[j].estimate)).toBeLessThan(1e-6 * Math.max(1, Math.abs(c.estimate)));
        // exact traces on both paths at this size
        expect(Math.abs(c.se - b.coefficients[j].se)).toBeLessThan(1e-6 * c.se);
      });
    }, 60_000);
  }
});
