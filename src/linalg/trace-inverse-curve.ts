/**
 * tr(I − ρW)⁻¹ as a function of ρ on an interval [lo, hi], for the impact draws: the function is
 * evaluated at Chebyshev–Lobatto points and interpolated by the barycentric formula (Berrut &
 * Trefethen 2004, "Barycentric Lagrange interpolation", SIAM Review 46, eq. 5.2; Trefethen,
 * Approximation Theory and Approximation Practice, ch. 5). tr(I − ρW)⁻¹ = Σ 1/(1 − ρλ_i) is
 * analytic on the admissible range, so the interpolant converges geometrically; the points double
 * (9, 17, 33, 65, each set containing the one before) until the interpolant of the previous set
 * misses the new points by less than `tolerance` relative (default 1e-7, far below the Monte Carlo
 * error of the draws), and that miss — an upper estimate of the final interpolant's error — is
 * reported.
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
  let miss = Infinity;
  while (intervals < maxIntervals) {
    const finer = 2 * intervals;
    const next = new Array<number>(finer + 1);
    let worst = 0, scale = 0;
    const coarse = barycentric(values.map((_, k) => at(k, intervals)), values);
    for (let k = 0; k <= finer; k++) {
      if (k % 2 === 0) { next[k] = values[k / 2]; continue; }
      const x = at(k, finer);
      next[k] = traceAt(x);
      worst = Math.max(worst, Math.abs(coarse(x) - next[k]));
      scale = Math.max(scale, Math.abs(next[k]));
    }
    intervals = finer;
    values = next;
    miss = scale > 0 ? worst / scale : worst;
    if (miss <= tolerance) break;
  }
  const nodes = values.map((_, k) => at(k, intervals));
  const evaluate = barycentric(nodes, values);
  return {
    evaluate,
    method: `${describe} at ${intervals + 1} Chebyshev points on ρ ∈ [${lo.toPrecision(6)}, ${hi.toPrecision(6)}], barycentric interpolation between them (the interpolant on half the points missed the others by ${miss.toExponential(1)} relative)`,
  };
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
