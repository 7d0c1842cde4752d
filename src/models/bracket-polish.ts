import { NotPositiveDefiniteError, PivotError, type LogDeterminant } from '../linalg/index.js';
import { brentMaximise } from './brent.js';
import type { Convergence } from './types.js';

/**
 * Maximises f(ρ) = c(ρ) + g(ρ) on [lo, hi], where c is cheap and g = ln|I − ρW| is exact but costly,
 * with few evaluations of g. A cheap approximation a ≈ g brackets the maximum; the exact g then
 * polishes it through the correction δ = g − a, which is small and smooth:
 *   1. ρ₀ = argmax c + a (Brent, no exact evaluation);
 *   2. δ at ρ₀ − h, ρ₀, ρ₀ + h (exact); δ̃ = the parabola through the three points of δ nearest the
 *      current estimate (kept at least 1e-5 apart, so rounding in g is not divided by a tiny step);
 *   3. ρ_{k+1} = argmax c + a + δ̃ (Brent within a trust region around those points, refined as the
 *      zero of the derivative); evaluate δ there; stop when two successive estimates agree to
 *      `tolerance` and the parabola's slope error (estimated from a fourth point's divided
 *      difference) moves the maximiser by less than `tolerance`; when only the latter fails, add a
 *      point closer in and go on.
 * This is the model-correction idea of surrogate optimisation (Alexandrov et al. 1998, "A trust
 * region framework for managing the use of approximation models"): at the stopping point the
 * corrected model interpolates g, so its maximiser is the maximiser of the exact f. The result is the
 * last exactly evaluated point, so the reported likelihood is exact there. If the polish does not
 * settle within `maxExact` evaluations, or the maximum sits at an end of the interval, the search
 * falls back to Brent on the exact f over the whole interval.
 */
export function bracketAndPolish(
  cheap: (rho: number) => number,
  exact: LogDeterminant,
  rough: LogDeterminant,
  lo: number,
  hi: number,
  opts: { tolerance?: number; maxExact?: number; maxIterations?: number } = {},
): { x: number; value: number; convergence: Convergence; exactEvaluations: number } {
  const tolerance = opts.tolerance ?? 1e-8;
  const maxExact = opts.maxExact ?? 10;
  let evaluations = 0;
  const g = (rho: number): number => { evaluations++; return exact.evaluate(rho); };
  const fullSearch = (why: string) => {
    const best = brentMaximise((r) => cheap(r) + g(r), lo, hi, { maxIterations: opts.maxIterations });
    best.convergence.message += ` (exact log-determinant at every step: ${why})`;
    return { ...best, exactEvaluations: evaluations };
  };
  // the approximation is searched only where it means something (a series inside its radius of
  // convergence); a maximum at the edge of that domain sends the search to the exact evaluations
  const roughLo = Math.max(lo, rough.domain ? rough.domain.lower + 1e-6 * Math.abs(rough.domain.lower) : lo);
  const roughHi = Math.min(hi, rough.domain ? rough.domain.upper - 1e-6 * Math.abs(rough.domain.upper) : hi);
  const start = brentMaximise((r) => cheap(r) + rough.evaluate(r), roughLo, roughHi, { tolerance: 1e-12 });
  const rho0 = start.x;
  const width = hi - lo;
  const h = Math.min(1e-3 * Math.max(1, Math.abs(rho0)), 0.01 * width);
  if (rho0 - 2 * h <= lo || rho0 + 2 * h >= hi) return fullSearch('the approximate maximum lies at an end of the range');
  if (rho0 - 2 * h <= roughLo || rho0 + 2 * h >= roughHi) return fullSearch('the approximate maximum lies where the approximation stops converging');

  // closest spacing of model points: rounding in g (at most ≈ 1e-16 · n) divided by it stays far
  // below the likelihood's curvature (≈ n)
  const gap = 1e-7 * Math.max(1, Math.abs(rho0));
  const xs: number[] = [], ds: number[] = [];
  const add = (rho: number) => { const v = g(rho); xs.push(rho); ds.push(v - rough.evaluate(rho)); return v; };
  const known = (r: number) => cheap(r) + rough.evaluate(r);
  try {
    add(rho0 - h);
    add(rho0 + h);
    let current = rho0;
    let currentValue = cheap(rho0) + add(rho0);
    for (;;) {
      const points = nearest(xs, ds, current, gap, 3);
      const model = parabola(points);
      // trust region: the parabola is believed only near the points it interpolates
      const span = Math.max(...points.map(([x]) => x)) - Math.min(...points.map(([x]) => x));
      const radius = Math.max(20 * h, 2 * span);
      const a = Math.max(lo, current - radius), b = Math.min(hi, current + radius);
      const step = brentMaximise((r) => known(r) + model(r), a, b, { tolerance: 1e-13 });
      const next = stationaryPoint(known, points, step.x, a, b);
      const settled = Math.abs(next - current) <= tolerance * Math.max(1, Math.abs(current));
      // a-posteriori check: the parabola through current, x₂, x₃ misstates δ' at current by about
      // δ'''·(current − x₂)(current − x₃)/6 (δ''' from the fourth-nearest point's divided
      // difference), which moves the maximiser by that over the curvature
      const misstated = settled ? slopeError(xs, ds, current, gap, known, model) : 0;
      if (settled && misstated <= tolerance * Math.max(1, Math.abs(current))) {
        const edge = Math.max(1e-9 * width, 4 * tolerance);
        const atBound = current - lo <= edge ? 'lower' : hi - current <= edge ? 'upper' : undefined;
        if (atBound) return fullSearch('the maximum lies at an end of the range');
        const convergence: Convergence = {
          converged: true,
          iterations: evaluations,
          tolerance: Math.abs(next - current),
          message: `maximum bracketed with an approximate log-determinant (${rough.method}), then polished with ${evaluations} exact evaluations; last step ${Math.abs(next - current).toExponential(1)}`,
        };
        return { x: current, value: currentValue, convergence, exactEvaluations: evaluations };
      }
      if (evaluations >= maxExact) return fullSearch(`the polish had not settled after ${evaluations} exact evaluations`);
      if (settled) {
        // the model is not local enough: add a point a quarter of the way to the next-nearest one
        const other = points.filter(([x]) => x !== current).sort((p, q) => Math.abs(p[0] - current) - Math.abs(q[0] - current))[0][0];
        add(current + 0.25 * (other - current));
        continue;
      }
      current = next;
      currentValue = cheap(next) + add(next);
    }
  } catch (e) {
    // a pivot that is not positive at a point the approximation wrongly thought admissible; any
    // other error is a fault and goes on up
    if (!(e instanceof PivotError || e instanceof NotPositiveDefiniteError)) throw e;
    return fullSearch(`the polish failed: ${e.message}`);
  }
}

/**
 * Function values locate a smooth maximum only to about √ε relative (Brent's own limit), which at
 * large n is 1e-8 in ρ. Refine the model's maximiser as the zero of its derivative instead:
 * c + a by central differences (step 1e-5: rounding over the step and the cubic term both stay far
 * below the curvature of a likelihood), the parabola exactly; a few secant steps from `start`.
 */
function stationaryPoint(known: (x: number) => number, points: [number, number][], start: number, a: number, b: number): number {
  const d = 1e-5 * Math.max(1, Math.abs(start));
  const slope = (x: number) => (known(x + d) - known(x - d)) / (2 * d) + parabolaSlope(points, x);
  let x0 = start, x1 = start + 1e-7 * Math.max(1, Math.abs(start));
  let f0 = slope(x0), f1 = slope(x1);
  for (let it = 0; it < 6; it++) {
    if (f1 === f0) break;
    const x2 = x1 - (f1 * (x1 - x0)) / (f1 - f0);
    if (!(x2 > a + d && x2 < b - d) || Math.abs(x2 - start) > 1e-4 * Math.max(1, Math.abs(start))) return start;
    x0 = x1; f0 = f1; x1 = x2; f1 = slope(x2);
    if (Math.abs(x1 - x0) <= 1e-13 * Math.max(1, Math.abs(x1))) break;
  }
  return x1;
}

/** Derivative of the Lagrange interpolant through the points. */
function parabolaSlope(points: [number, number][], x: number): number {
  let sum = 0;
  for (let i = 0; i < points.length; i++) {
    const [xi, di] = points[i];
    let denom = 1;
    for (let j = 0; j < points.length; j++) if (j !== i) denom *= xi - points[j][0];
    // d/dx Π_{j≠i} (x − x_j) = Σ_{l≠i} Π_{j≠i,l} (x − x_j)
    let derivative = 0;
    for (let l = 0; l < points.length; l++) {
      if (l === i) continue;
      let prod = 1;
      for (let j = 0; j < points.length; j++) if (j !== i && j !== l) prod *= x - points[j][0];
      derivative += prod;
    }
    sum += (di * derivative) / denom;
  }
  return sum;
}

/** `count` points of (x, d) nearest `at`, each at least `gap` from the others already chosen. */
function nearest(xs: number[], ds: number[], at: number, gap: number, count: number): [number, number][] {
  const order = xs.map((_, i) => i).sort((a, b) => Math.abs(xs[a] - at) - Math.abs(xs[b] - at));
  const chosen: [number, number][] = [];
  for (const i of order) {
    if (chosen.every(([x]) => Math.abs(x - xs[i]) >= gap)) chosen.push([xs[i], ds[i]]);
    if (chosen.length === count) break;
  }
  return chosen;
}

/**
 * Estimated error in the maximiser from the parabola's slope at `at` (the nearest point): with four
 * points, |δ[x₁..x₄]|·|(at − x₂)(at − x₃)| over the curvature of the corrected model; Infinity
 * with fewer than four points (no estimate yet).
 */
function slopeError(xs: number[], ds: number[], at: number, gap: number, known: (x: number) => number, model: (x: number) => number): number {
  const four = nearest(xs, ds, at, gap, 4);
  if (four.length < 4) return Infinity;
  const third = dividedDifference(four);
  const [, p2, p3] = four;
  const slopeMiss = Math.abs(third * (at - p2[0]) * (at - p3[0]));
  const d = 1e-4 * Math.max(1, Math.abs(at));
  const f = (x: number) => known(x) + model(x);
  const curvature = Math.abs((f(at + d) - 2 * f(at) + f(at - d)) / (d * d));
  return curvature > 0 ? slopeMiss / curvature : Infinity;
}

/** The highest divided difference of the points (for four points, ≈ δ'''/6). */
function dividedDifference(points: [number, number][]): number {
  let values = points.map(([, d]) => d);
  for (let level = 1; level < points.length; level++) {
    const next: number[] = [];
    for (let i = 0; i + level < points.length; i++) next.push((values[i + 1] - values[i]) / (points[i + level][0] - points[i][0]));
    values = next;
  }
  return values[0];
}

/** Lagrange interpolant through up to three points (a constant, a line or a parabola). */
export function parabola(points: [number, number][]): (x: number) => number {
  return (x: number) => {
    let sum = 0;
    for (let i = 0; i < points.length; i++) {
      let term = points[i][1];
      for (let j = 0; j < points.length; j++) if (j !== i) term *= (x - points[j][0]) / (points[i][0] - points[j][0]);
      sum += term;
    }
    return sum;
  };
}
