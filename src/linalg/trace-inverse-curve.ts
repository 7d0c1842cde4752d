/**
 * tr(I − ρW)⁻¹ as a function of ρ on an interval [lo, hi], for the impact draws: the function is
 * evaluated at Chebyshev–Lobatto points and interpolated by the barycentric formula (Berrut &
 * Trefethen 2004, "Barycentric Lagrange interpolation", SIAM Review 46, eq. 5.2; Trefethen,
 * Approximation Theory and Approximation Practice, ch. 5). tr(I − ρW)⁻¹ = Σ 1/(1 − ρλ_i) is
 * analytic on the admissible range, so the interpolant converges geometrically; the points double
 * (9, 17, 33, 65, each set containing the one before) until the last two Chebyshev coefficients fall
 * below `tolerance` of the largest (default 1e-7, far below the Monte Carlo error of the draws), and
 * that figure is reported.
 * Each point costs one trace (exact from a factor, or Hutchinson probes shared by every point, so
 * that the curve's shape carries no probe noise from point to point).
 */
export interface TraceInverseCurve {
  evaluate(rho: number): number;
  readonly method: string;
}

export function chebyshevCurve(
  traceAt: (rho: number) => number,
  lo: number,
  hi: number,
  describe: string,
  opts: { tolerance?: number; maxPoints?: number } = {},
): TraceInverseCurve {
  const tolerance = opts.tolerance ?? 1e-7;
  const maxIntervals = (opts.maxPoints ?? 65) - 1;
  if (!(hi > lo)) {
    const v = traceAt(lo);
    return { evaluate: () => v, method: `${describe}, at the one value of ρ drawn` };
  }
  const mid = 0.5 * (lo + hi), half = 0.5 * (hi - lo);
  const at = (k: number, intervals: number) => mid + half * Math.cos((Math.PI * k) / intervals);
  let intervals = 8;
  let values = Array.from({ length: intervals + 1 }, (_, k) => traceAt(at(k, intervals)));
  let tail = chebyshevTail(values);
  while (tail > tolerance && intervals < maxIntervals) {
    const finer = 2 * intervals;
    const next = new Array<number>(finer + 1);
    for (let k = 0; k <= finer; k++) next[k] = k % 2 === 0 ? values[k / 2] : traceAt(at(k, finer));
    intervals = finer;
    values = next;
    tail = chebyshevTail(values);
  }
  const nodes = values.map((_, k) => at(k, intervals));
  const evaluate = barycentric(nodes, values);
  return {
    evaluate,
    method: `${describe} at ${intervals + 1} Chebyshev points on ρ ∈ [${lo.toPrecision(6)}, ${hi.toPrecision(6)}], barycentric interpolation between them (its last two Chebyshev coefficients, the usual estimate of its error, ${tail.toExponential(1)} of the largest)`,
  };
}

/**
 * |c_{N−1}| + |c_N| over max |c_k| for the Chebyshev coefficients of the interpolant through
 * values at the N + 1 Chebyshev–Lobatto points (a discrete cosine transform, O(N²) for these few
 * points): for an analytic function the coefficients fall geometrically, and the last ones bound
 * what the interpolant leaves out (Trefethen, ATAP, ch. 4 and 8).
 */
function chebyshevTail(values: number[]): number {
  const n = values.length - 1;
  const coefficient = (j: number) => {
    let s = 0;
    for (let k = 0; k <= n; k++) s += (k === 0 || k === n ? 0.5 : 1) * values[k] * Math.cos((Math.PI * j * k) / n);
    return ((j === 0 || j === n ? 1 : 2) / n) * s;
  };
  let largest = 0;
  for (let j = 0; j <= n; j++) largest = Math.max(largest, Math.abs(coefficient(j)));
  const tail = Math.abs(coefficient(n - 1)) + Math.abs(coefficient(n));
  return largest > 0 ? tail / largest : tail;
}

/** Barycentric interpolant through Chebyshev–Lobatto points (weights (−1)^k, halved at both ends). */
function barycentric(nodes: number[], values: number[]): (x: number) => number {
  const last = nodes.length - 1;
  const weight = nodes.map((_, k) => ((k % 2 === 0 ? 1 : -1) * (k === 0 || k === last ? 0.5 : 1)));
  return (x: number) => {
    let num = 0, den = 0;
    for (let k = 0; k <= last; k++) {
      const d = x - nodes[k];
      if (d === 0) return values[k];
      const t = weight[k] / d;
      num += t * values[k];
      den += t;
    }
    return num / den;
  };
}
