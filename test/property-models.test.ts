// Property tests of the estimators (fast-check, fixed seeds). Each property is a mathematical
// identity of the method, not a recorded number:
// - least squares residuals are orthogonal to every regressor: X'(y − Xβ̂) = 0 (normal equations);
// - Moran's I = (n/S0)·z'Wz / z'z with z = y − ȳ is unchanged by y → a·y + b, a > 0 (Cliff & Ord 1981);
// - a permutation p-value (count + 1)/(permutations + 1) lies in (0, 1];
// - the spatial lag model with ρ held at 0 is OLS (Anselin 1988, ch. 6: A = I);
// - the reported ML estimate maximises the concentrated log-likelihood: no ρ ± ε beats it.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fitOls, fitSpatialLag, fitSpatialError, denseAlgebra, type Design } from '../src/models/index.js';
import { moranColumn } from '../src/stats/index.js';
import { buildWeights, symmetricForm, type SpatialWeights } from '../src/weights/index.js';
import { squareGrid } from './fixtures/weights/shapes.js';
import { lcg } from './bad-inputs/make.js';

export const RUNS = { normal: 100, moran: 60, lag: 25, maximum: 20 };

/** Standard normal draws by Box–Muller from the LCG. */
function normals(u: () => number, n: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
  return out;
}

function design(u: () => number, n: number, k: number, scale = 1): Design {
  const columns = [new Float64Array(n).fill(1)];
  for (let j = 1; j < k; j++) columns.push(normals(u, n).map((v) => (v * (j + 1) + j) * scale));
  return { intercept: 0, names: ['constant', ...Array.from({ length: k - 1 }, (_, j) => `x${j + 1}`)], columns };
}

const weightsCache = new Map<string, SpatialWeights>();
function gridWeights(r: number, c: number, rule: 'queen' | 'rook'): SpatialWeights {
  const key = `${r}x${c}${rule}`;
  if (!weightsCache.has(key)) {
    const geometries = squareGrid(r, c);
    weightsCache.set(key, buildWeights({ ids: geometries.map((_, i) => `a${i}`), geometries, coordinates: 'projected' }, { method: rule }, { transform: 'row' }));
  }
  return weightsCache.get(key)!;
}

/** y from the lag model y = (I − ρW)⁻¹(Xβ + ε), by fixed-point iteration (|ρ| < 1, row-standardised W). */
function lagData(w: SpatialWeights, x: Design, rho: number, u: () => number): Float64Array {
  const n = w.n;
  const xb = new Float64Array(n);
  x.columns.forEach((col, j) => col.forEach((v, i) => { xb[i] += v * (j % 2 ? -1 : 1) * (1 + j); }));
  const eps = normals(u, n);
  const base = xb.map((v, i) => v + eps[i]);
  let y = Float64Array.from(base);
  for (let it = 0; it < 2000; it++) {
    const next = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) s += w.values[p] * y[w.colIdx[p]];
      next[i] = base[i] + rho * s;
    }
    y = next;
  }
  return y;
}

const seedArb = fc.integer({ min: 1, max: 2 ** 31 - 1 });

describe('property: OLS', () => {
  it('estimates satisfy the normal equations X\'(y − Xβ̂) = 0', () => {
    fc.assert(
      fc.property(seedArb, fc.integer({ min: 6, max: 60 }), fc.integer({ min: 2, max: 5 }), fc.constantFrom(1e-6, 1, 1e6), (seed, n, k, scale) => {
        fc.pre(n > k + 1);
        const u = lcg(seed);
        const x = design(u, n, k, scale);
        const y = normals(u, n).map((v, i) => v + 3 * x.columns[k - 1][i]);
        const fit = fitOls(y, x);
        const yNorm = Math.hypot(...y);
        for (const col of x.columns) {
          let g = 0;
          for (let i = 0; i < n; i++) g += col[i] * fit.residuals[i];
          expect(Math.abs(g)).toBeLessThanOrEqual(1e-11 * Math.hypot(...col) * yNorm);
        }
      }),
      { seed: 1, numRuns: RUNS.normal },
    );
  });
});

describe("property: Moran's I", () => {
  it('is unchanged by y → a·y + b (a > 0), and permutation p-values lie in (0, 1]', () => {
    fc.assert(
      fc.property(
        seedArb,
        fc.integer({ min: 2, max: 7 }),
        fc.integer({ min: 2, max: 7 }),
        fc.double({ min: 1e-3, max: 1e3, noNaN: true }),
        fc.double({ min: -1e4, max: 1e4, noNaN: true }),
        fc.integer({ min: 1, max: 99 }),
        (seed, r, c, a, b, permutations) => {
          fc.pre(r * c >= 4);
          const w = gridWeights(r, c, 'rook');
          const y = normals(lcg(seed), w.n);
          const m1 = moranColumn(y, w, { permutations, seed });
          const m2 = moranColumn(y.map((v) => a * v + b), w, { permutations, seed });
          expect(Math.abs(m2.I - m1.I)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(m1.I)));
          expect(m2.z).toBeCloseTo(m1.z, 7);
          for (const m of [m1, m2]) {
            expect(m.permutationP).toBeGreaterThan(0);
            expect(m.permutationP).toBeLessThanOrEqual(1);
            expect(m.permutationP! * (permutations + 1)).toBeCloseTo(Math.round(m.permutationP! * (permutations + 1)), 9);
          }
        },
      ),
      { seed: 2, numRuns: RUNS.moran },
    );
  });
});

describe('property: ML spatial lag', () => {
  it('with ρ held at 0 gives the OLS estimates, and σ² = e\'e/n', () => {
    fc.assert(
      fc.property(seedArb, fc.integer({ min: 3, max: 7 }), fc.integer({ min: 2, max: 4 }), (seed, side, k) => {
        const w = gridWeights(side, side + 1, 'queen');
        const u = lcg(seed);
        const x = design(u, w.n, k);
        const y = lagData(w, x, 0.4, u);
        const ols = fitOls(y, x);
        const lag = fitSpatialLag(y, x, denseAlgebra(w, symmetricForm(w)), ols, { fixedRho: 0 });
        lag.coefficients.forEach((c, j) => {
          const o = ols.coefficients[j].estimate;
          expect(Math.abs(c.estimate - o)).toBeLessThanOrEqual(1e-10 * Math.max(1, Math.abs(o)));
        });
        expect(lag.sigma2).toBeCloseTo(ols.sigma2ML, 10);
        expect(lag.logLik).toBeCloseTo(ols.logLik, 9);
      }),
      { seed: 3, numRuns: RUNS.lag },
    );
  });

  it('reports a log-likelihood that no ρ ± ε beats (ε = 1e-3, 1e-2, 1e-1 inside the range)', () => {
    fc.assert(
      fc.property(seedArb, fc.integer({ min: 3, max: 7 }), fc.double({ min: -0.6, max: 0.8, noNaN: true }), (seed, side, rho) => {
        const w = gridWeights(side, side, 'rook');
        const algebra = denseAlgebra(w, symmetricForm(w));
        const u = lcg(seed);
        const x = design(u, w.n, 2);
        const y = lagData(w, x, rho, u);
        const ols = fitOls(y, x);
        const fit = fitSpatialLag(y, x, algebra, ols);
        expect(fit.convergence.converged).toBe(true);
        for (const eps of [1e-3, 1e-2, 1e-1]) {
          for (const at of [fit.parameter - eps, fit.parameter + eps]) {
            if (at <= algebra.range.lower || at >= algebra.range.upper) continue;
            const other = fitSpatialLag(y, x, algebra, ols, { fixedRho: at });
            expect(other.logLik).toBeLessThanOrEqual(fit.logLik + 1e-9 * Math.abs(fit.logLik));
          }
        }
      }),
      { seed: 4, numRuns: RUNS.maximum },
    );
  });
});

describe('property: ML spatial error', () => {
  it('lies inside the admissible range and improves on OLS (LR ≥ 0: OLS is the λ = 0 member of the family)', () => {
    fc.assert(
      fc.property(seedArb, fc.integer({ min: 3, max: 6 }), (seed, side) => {
        const w = gridWeights(side, side, 'queen');
        const algebra = denseAlgebra(w, symmetricForm(w));
        const u = lcg(seed);
        const x = design(u, w.n, 3);
        const y = lagData(w, x, 0.3, u);
        const ols = fitOls(y, x);
        const fit = fitSpatialError(y, x, algebra, ols);
        expect(fit.parameter).toBeGreaterThan(algebra.range.lower);
        expect(fit.parameter).toBeLessThan(algebra.range.upper);
        expect(fit.lr.stat).toBeGreaterThanOrEqual(-1e-8);
      }),
      { seed: 5, numRuns: RUNS.lag },
    );
  });
});
