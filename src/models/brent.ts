import type { Convergence } from './types.js';

/**
 * Maximises f on [lo, hi] by Brent's method (golden section with parabolic interpolation;
 * Brent 1973, Algorithms for Minimization without Derivatives, ch. 5, procedure localmin).
 * Written by hand: no installed library has a bounded 1-D optimiser. The bracket shrinks until
 * |x − midpoint| ≤ 2·tol1 − (b − a)/2 with tol1 = √ε|x| + tol/3, √ε ≈ 1.5e-8 being the limit at
 * which a smooth maximum can be located from function values alone.
 */
export function brentMaximise(
  f: (x: number) => number,
  lo: number,
  hi: number,
  opts: { tolerance?: number; maxIterations?: number } = {},
): { x: number; value: number; convergence: Convergence } {
  const tol = opts.tolerance ?? 1e-10;
  const maxIterations = opts.maxIterations ?? 500;
  const golden = 0.5 * (3 - Math.sqrt(5));
  const sqrtEps = Math.sqrt(Number.EPSILON);
  let a = lo;
  let b = hi;
  let x = a + golden * (b - a);
  let w = x;
  let v = x;
  let fx = -f(x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  let iterations = 0;
  let converged = false;
  for (; iterations < maxIterations; iterations++) {
    const m = 0.5 * (a + b);
    const tol1 = sqrtEps * Math.abs(x) + tol / 3;
    const tol2 = 2 * tol1;
    if (Math.abs(x - m) <= tol2 - 0.5 * (b - a)) {
      converged = true;
      break;
    }
    let useGolden = true;
    if (Math.abs(e) > tol1) {
      let r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      else q = -q;
      r = e;
      e = d;
      if (Math.abs(p) < Math.abs(0.5 * q * r) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = x < m ? tol1 : -tol1;
        useGolden = false;
      }
    }
    if (useGolden) {
      e = (x < m ? b : a) - x;
      d = golden * e;
    }
    const u = x + (Math.abs(d) >= tol1 ? d : d > 0 ? tol1 : -tol1);
    const fu = -f(u);
    if (fu <= fx) {
      if (u < x) b = x;
      else a = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  const width = b - a;
  const edge = Math.max(4 * (sqrtEps * Math.abs(x) + tol), 1e-9 * (hi - lo));
  const atBound = x - lo <= edge ? 'lower' : hi - x <= edge ? 'upper' : undefined;
  const convergence: Convergence = {
    converged,
    iterations,
    tolerance: width,
    message: converged
      ? `Brent search converged in ${iterations} iterations (final bracket ${width.toExponential(2)})`
      : `Brent search stopped after ${iterations} iterations without meeting the tolerance (bracket ${width.toExponential(2)})`,
  };
  if (atBound) {
    convergence.atBound = atBound;
    convergence.message += `; the maximum lies at the ${atBound} end of the admissible range, so the estimate is not an interior optimum`;
  }
  return { x, value: -fx, convergence };
}
