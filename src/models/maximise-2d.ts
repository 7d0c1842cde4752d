import { NotPositiveDefiniteError, PivotError, type LogDeterminant } from '../linalg/index.js';
import { brentMaximise } from './brent.js';
import { parabola } from './bracket-polish.js';
import type { Convergence } from './types.js';

/** A box [xlo, xhi] × [ylo, yhi]. */
export interface Box {
  xlo: number;
  xhi: number;
  ylo: number;
  yhi: number;
}

export interface Search2d {
  x: number;
  y: number;
  value: number;
  convergence: Convergence;
  /** evaluations of the objective (the bounded search) or of the exact log-determinant (the polish) */
  evaluations: number;
}

const GRID = 16;

/**
 * Maximises f(x, y) on a box: a 17 × 17 grid finds the best cell (a guard against a second, lower
 * hump), then Brent's method nested — for each x the best y by Brent (Brent 1973, ch. 5), and x by
 * Brent on that profile — within two grid steps of it; when that lands on the edge of the small box
 * (but not of the whole one) the nested search is run again on the whole box. Bounded, derivative
 * free, and it reports how it went: iterations of the outer search, whether each inner search met
 * its tolerance, and whether the maximum lies on a bound.
 */
export function maximise2d(f: (x: number, y: number) => number, box: Box, opts: { maxIterations?: number; tolerance?: number } = {}): Search2d {
  let evaluations = 0;
  const g = (x: number, y: number) => { evaluations++; return f(x, y); };
  const dx = (box.xhi - box.xlo) / GRID, dy = (box.yhi - box.ylo) / GRID;
  let best = { i: 0, j: 0, v: -Infinity };
  for (let i = 0; i <= GRID; i++) {
    for (let j = 0; j <= GRID; j++) {
      const v = g(box.xlo + i * dx, box.ylo + j * dy);
      if (v > best.v) best = { i, j, v };
    }
  }
  const near: Box = {
    xlo: Math.max(box.xlo, box.xlo + (best.i - 2) * dx), xhi: Math.min(box.xhi, box.xlo + (best.i + 2) * dx),
    ylo: Math.max(box.ylo, box.ylo + (best.j - 2) * dy), yhi: Math.min(box.yhi, box.ylo + (best.j + 2) * dy),
  };
  let found = nestedBrent(g, near, opts);
  const onInnerEdge = (v: number, lo: number, hi: number, blo: number, bhi: number) =>
    (Math.abs(v - lo) < 1e-6 * (hi - lo) && lo > blo) || (Math.abs(v - hi) < 1e-6 * (hi - lo) && hi < bhi);
  if (onInnerEdge(found.x, near.xlo, near.xhi, box.xlo, box.xhi) || onInnerEdge(found.y, near.ylo, near.yhi, box.ylo, box.yhi)) {
    found = nestedBrent(g, box, opts);
  }
  const c = found.convergence;
  c.message = `${c.message}, after a ${GRID + 1} × ${GRID + 1} grid; ${evaluations} evaluations of the likelihood`;
  return { ...found, evaluations };
}

/** Brent over x of the best value over y (itself by Brent). */
export function nestedBrent(f: (x: number, y: number) => number, box: Box, opts: { maxIterations?: number; tolerance?: number } = {}): Omit<Search2d, 'evaluations'> {
  const innerAt = new Map<number, { y: number; value: number; converged: boolean }>();
  const profile = (x: number): number => {
    const inner = brentMaximise((y) => f(x, y), box.ylo, box.yhi, { tolerance: opts.tolerance ?? 1e-12, maxIterations: opts.maxIterations });
    innerAt.set(x, { y: inner.x, value: inner.value, converged: inner.convergence.converged });
    return inner.value;
  };
  const outer = brentMaximise(profile, box.xlo, box.xhi, { tolerance: opts.tolerance ?? 1e-12, maxIterations: opts.maxIterations });
  const inner = innerAt.get(outer.x) ?? (profile(outer.x), innerAt.get(outer.x)!);
  const innerFailures = [...innerAt.values()].filter((v) => !v.converged).length;
  const span = box.yhi - box.ylo;
  const edge = 1e-9 * span + 4e-8 * Math.max(1, Math.abs(inner.y));
  const yBound = inner.y - box.ylo <= edge ? 'lower' : box.yhi - inner.y <= edge ? 'upper' : undefined;
  const convergence: Convergence = {
    converged: outer.convergence.converged && innerFailures === 0,
    iterations: outer.convergence.iterations,
    tolerance: outer.convergence.tolerance,
    message: `nested Brent search: ${outer.convergence.converged ? `converged in ${outer.convergence.iterations} outer iterations` : `stopped after ${outer.convergence.iterations} outer iterations without meeting the tolerance`}${innerFailures ? ` (${innerFailures} inner searches did not meet theirs)` : ''}`,
  };
  const atBound = outer.convergence.atBound ?? yBound;
  if (atBound) {
    convergence.atBound = atBound;
    convergence.message += `; the maximum lies at the ${atBound} end of the admissible range of ${outer.convergence.atBound ? 'the first' : 'the second'} parameter`;
  }
  return { x: outer.x, y: inner.y, value: inner.value, convergence };
}

/**
 * Maximises c(x, y) + g(x) + g(y) on a box, where c is cheap and g = ln|I − tW| is exact but costly,
 * with few evaluations of g (the two-parameter form of `bracket-polish.ts`): a cheap approximation
 * a ≈ g brackets the maximum (maximise2d of c + a(x) + a(y)); the exact g then polishes it through
 * the correction δ = g − a, one value of which serves both parameters since g is the same function:
 *   1. δ at x₀ ± h, x₀, y₀ ± h, y₀;
 *   2. in each coordinate, δ̃ = the parabola through the three cached points of δ nearest the current
 *      value; the next point maximises c + a + δ̃ (nested Brent in a trust region around the points);
 *      δ is evaluated there (two exact evaluations per step);
 *   3. stop when a step moves neither parameter by more than `tolerance` (relative) and the points
 *      behind each parabola lie within 1e-4 of it (otherwise points closer in are added first).
 * This is the model-correction idea of surrogate optimisation (Alexandrov et al. 1998): where it
 * stops the corrected model interpolates g, so its maximiser is that of the exact objective, and
 * the value reported is exact there. If it has not settled after `maxExact` evaluations, or the
 * bracket lies at an end of the range, the nested search runs on the exact objective instead.
 */
export function polishSeparable2d(
  cheap: (x: number, y: number) => number,
  exact: LogDeterminant,
  rough: LogDeterminant,
  box: Box,
  opts: { tolerance?: number; maxExact?: number } = {},
): Search2d {
  const tolerance = opts.tolerance ?? 1e-8;
  const maxExact = opts.maxExact ?? 30;
  const cache = new Map<number, number>();
  let evaluations = 0;
  const g = (t: number): number => {
    let v = cache.get(t);
    if (v === undefined) { evaluations++; v = exact.evaluate(t); cache.set(t, v); }
    return v;
  };
  const fullSearch = (why: string): Search2d => {
    const found = maximise2d((x, y) => cheap(x, y) + g(x) + g(y), box);
    found.convergence.message += ` (exact log-determinant at every step: ${why})`;
    return { ...found, evaluations };
  };
  const start = maximise2d((x, y) => cheap(x, y) + rough.evaluate(x) + rough.evaluate(y), box);
  let cx = start.x, cy = start.y;
  const width = Math.min(box.xhi - box.xlo, box.yhi - box.ylo);
  const h = (t: number) => Math.min(1e-3 * Math.max(1, Math.abs(t)), 0.01 * width);
  const inside = (t: number, lo: number, hi: number) => t - 2 * h(t) > lo && t + 2 * h(t) < hi;
  if (!inside(cx, box.xlo, box.xhi) || !inside(cy, box.ylo, box.yhi)) return fullSearch('the approximate maximum lies at an end of the range');

  const points = new Map<number, number>(); // t → δ(t)
  const add = (t: number) => { if (!points.has(t)) points.set(t, g(t) - rough.evaluate(t)); };
  const nearest = (at: number): [number, number][] => {
    const gap = 1e-7 * Math.max(1, Math.abs(at));
    const chosen: [number, number][] = [];
    for (const [t, d] of [...points].sort((a, b) => Math.abs(a[0] - at) - Math.abs(b[0] - at))) {
      if (chosen.every(([u]) => Math.abs(u - t) >= gap)) chosen.push([t, d]);
      if (chosen.length === 3) break;
    }
    return chosen;
  };
  try {
    for (const t of [cx - h(cx), cx, cx + h(cx), cy - h(cy), cy, cy + h(cy)]) add(t);
    for (;;) {
      const px = nearest(cx), py = nearest(cy);
      const mx = parabola(px), my = parabola(py);
      const spanX = spread(px), spanY = spread(py);
      const rx = Math.max(20 * h(cx), 2 * spanX), ry = Math.max(20 * h(cy), 2 * spanY);
      const trust: Box = {
        xlo: Math.max(box.xlo, cx - rx), xhi: Math.min(box.xhi, cx + rx),
        ylo: Math.max(box.ylo, cy - ry), yhi: Math.min(box.yhi, cy + ry),
      };
      const step = nestedBrent((x, y) => cheap(x, y) + rough.evaluate(x) + mx(x) + rough.evaluate(y) + my(y), trust, { tolerance: 1e-13 });
      const settled = Math.abs(step.x - cx) <= tolerance * Math.max(1, Math.abs(cx)) && Math.abs(step.y - cy) <= tolerance * Math.max(1, Math.abs(cy));
      const localX = spanX <= 1e-4 * Math.max(1, Math.abs(cx)), localY = spanY <= 1e-4 * Math.max(1, Math.abs(cy));
      if (settled && localX && localY) {
        const edge = (t: number, lo: number, hi: number) => t - lo <= 1e-9 * (hi - lo) + 4 * tolerance || hi - t <= 1e-9 * (hi - lo) + 4 * tolerance;
        if (edge(cx, box.xlo, box.xhi) || edge(cy, box.ylo, box.yhi)) return fullSearch('the maximum lies at an end of the range');
        return {
          x: cx,
          y: cy,
          value: cheap(cx, cy) + g(cx) + g(cy),
          evaluations,
          convergence: {
            converged: true,
            iterations: evaluations,
            tolerance: Math.max(Math.abs(step.x - cx), Math.abs(step.y - cy)),
            message: `maximum bracketed with an approximate log-determinant (${rough.method}), then polished with ${evaluations} exact evaluations of the log-determinant; last step ${Math.max(Math.abs(step.x - cx), Math.abs(step.y - cy)).toExponential(1)}`,
          },
        };
      }
      if (evaluations >= maxExact) return fullSearch(`the polish had not settled after ${evaluations} exact evaluations`);
      if (settled) {
        // the parabolas are not local enough: one point closer in for each that is not
        for (const [c, local] of [[cx, localX], [cy, localY]] as const) {
          if (!local) for (const side of [-1, 1]) add(c + side * 1e-5 * Math.max(1, Math.abs(c)));
        }
        continue;
      }
      cx = step.x;
      cy = step.y;
      add(cx);
      add(cy);
    }
  } catch (e) {
    // a pivot that is not positive at a point the approximation wrongly thought admissible; anything else is a fault
    if (!(e instanceof PivotError || e instanceof NotPositiveDefiniteError)) throw e;
    return fullSearch(`the polish failed: ${e.message}`);
  }
}

function spread(points: [number, number][]): number {
  const xs = points.map(([x]) => x);
  return Math.max(...xs) - Math.min(...xs);
}
