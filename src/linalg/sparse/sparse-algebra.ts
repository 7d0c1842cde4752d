/**
 * Weights algebra for large n. With a symmetric form S of W: exact log-determinant by sparse
 * Cholesky of I − ρS, range by Lanczos, traces through the factor (exact or Hutchinson, probes
 * solved together with the factor at ρ, which is kept for the reduced-form solve), a one-probe
 * Lanczos quadrature from the range's own Lanczos run for a cheap log-determinant that only
 * brackets the likelihood maximum, and a several-probe quadrature (built on first use) for
 * tr(I − ρW)⁻¹ at the impact draws and for long power series.
 * Without one (e.g. k-nearest neighbours) and W ≥ 0: the exact sparse LU (stable without pivoting
 * for |ρ|λmax < 1; below −1/λmax its pivots are checked and the dense LU with partial pivoting takes
 * over up to 1,500 areas), the Monte Carlo series only to bracket the maximum; range by the one rule
 * (range.ts: λmax by the Collatz–Wielandt bound, λmin by shift-and-invert Arnoldi through the LU);
 * traces by solves with the LU's kept factor; tr(I − ρW)⁻¹ for the impact draws from a Chebyshev
 * interpolant over the draws' interval.
 */
import { csrMultiply, isNonNegative, lmTrace as traceConstant, maxAbsRowSum, traceOf, traceOfSquare, type CsrMatrix } from '../csr.js';
import type { WeightsAlgebra } from '../algebra.js';
import type { AdmissibleRange, LogDeterminant } from '../logdet.js';
import { admissibleRange, lanczosPlan, perronRoot, rangeFromLanczos } from '../range.js';
import { symmetricForm } from '../symmetric-form.js';
import { chebyshevCurve, type TraceInverseCurve } from '../trace-inverse-curve.js';
import { meanAndError, rademacher, seededRandom } from '../random.js';
import { SparseCholeskyLogDet } from './cholesky-logdet.js';
import { CholeskyTraces } from './traces.js';
import { GeneralTraces } from './general-traces.js';
import { SeriesLogDet } from './series-logdet.js';
import { DenseLuLogDet } from '../dense-lu-logdet.js';
import { powerTraces } from './power-traces.js';
import { LanczosQuadrature } from './quadrature.js';
import { lanczosExtremes } from './extremes.js';
import { SparseLuLogDet, SPARSE_LU_WORK_LIMIT } from './lu-logdet.js';
import { PivotError } from './lu-front.js';
import type { StartHelperThread } from './helper-thread.js';

export interface SparseOptions {
  coordinates?: { x: Float64Array; y: Float64Array };
  seed?: number;
  /** Rademacher probes for stochastic traces at one ρ (default 16: at n = 90,000 the standard error
   * of ρ̂ then moves by about 1e-4 relative; the trace standard errors are reported) */
  probes?: number;
  /** terms of the Monte Carlo series when W has no symmetric form (default 100) */
  seriesTerms?: number;
  /** probes of the Lanczos quadrature behind the bracketing log-determinant and impacts (default 4) */
  quadratureProbes?: number;
  /** a second thread from the platform for the Cholesky factor and its solves */
  helper?: StartHelperThread;
}

/** The algebra plus figures for benchmarks and reports. */
export interface SparseWeightsAlgebra extends WeightsAlgebra {
  /** null when the log-determinant is not a Cholesky one */
  readonly cholesky: SparseCholeskyLogDet | null;
}

export function sparseAlgebra(w: CsrMatrix, symmetric: CsrMatrix | null, opts: SparseOptions = {}): SparseWeightsAlgebra {
  const seed = opts.seed ?? 20240601;
  const form = symmetricForm(w, symmetric);
  const lmTrace = traceConstant(w);
  if (!form) return generalAlgebra(w, lmTrace, seed, opts);

  const cholesky = new SparseCholeskyLogDet(form.s, { coordinates: opts.coordinates, helper: opts.helper });
  // The Lanczos run behind the range goes to the helper thread when there is one, and is waited
  // for only when the range or the bracket is first needed (the plain regression and its tests
  // run meanwhile).
  const plan = lanczosPlan(w, form.s);
  const onHelper = cholesky.helper ? cholesky.helper.startLanczos(seed, plan.steps, plan.tolerance, plan.needMax) : () => null;
  let ran: { range: AdmissibleRange; bracket: LanczosQuadrature } | null = null;
  const lanczosRun = () => {
    if (ran) return ran;
    const lanczos = onHelper() ?? lanczosExtremes(form.s, seed, plan.steps, plan.tolerance, plan.needMax);
    // the bracketing log-determinant comes free from the range's Lanczos run (one probe)
    ran = { range: rangeFromLanczos(plan, lanczos), bracket: LanczosQuadrature.fromTridiagonal(w.n, lanczos.alpha!, lanczos.beta!, lanczos.steps, seed) };
    return ran;
  };
  const tracer = new CholeskyTraces(cholesky, form.s, form.t, { seed, probes: opts.probes }, w);
  // built on first use: impacts and long power series share it
  let quadrature: LanczosQuadrature | null = null;
  const quad = (): LanczosQuadrature => (quadrature ??= new LanczosQuadrature(form.s, { probes: opts.quadratureProbes ?? 4, steps: 20, seed: seed + 2 }));
  const roughLogdet: LogDeterminant = {
    evaluate: (rho: number) => lanczosRun().bracket.logdet(rho),
    get method(): string {
      return `${lanczosRun().bracket.describe()} of ln|I − ρS|`;
    },
    accuracy: 'approximate (stochastic); used only to bracket the maximum, which exact evaluations then polish',
  };
  // At the impact draws only the change of tr(I − ρW)⁻¹ away from ρ̂ matters (its level at ρ̂ comes
  // from the traces there). From 20,000 areas the range's own one-probe quadrature gives that
  // change to well under the 2% Monte Carlo error of 1,000 draws (the probe error of a trace
  // shrinks like 1/√n), and saves a second Lanczos run; below, the several-probe one is cheap.
  const drawQuadrature = (): LanczosQuadrature => (w.n >= ONE_PROBE_DRAWS ? lanczosRun().bracket : quad());
  const traceInverse = {
    evaluate: (rho: number) => drawQuadrature().traceInverse(rho),
    get method(): string {
      const q = drawQuadrature();
      const at = q.trace((x) => 1 / (1 - 0.5 * x));
      return `${q.describe()} (standard error ${at.se.toPrecision(2)} on tr(I − 0.5W)⁻¹ = ${at.value.toPrecision(6)})`;
    },
  };
  // every draw's tr(I − ρW)⁻¹ from the same quadrature nodes, whatever the interval
  const powerCache = new Map<number, Float64Array>();
  return {
    n: w.n,
    w,
    logdet: cholesky,
    get range(): AdmissibleRange {
      return lanczosRun().range;
    },
    lmTrace,
    cholesky,
    roughLogdet,
    traceInverseCurve: () => traceInverse,
    tracesExact: tracer.exact,
    traces: (rho: number) => tracer.traces(rho),
    solve: (rho: number, b: Float64Array) => tracer.solve(rho, b),
    powerTraces(count: number): Float64Array {
      let cached = powerCache.get(count);
      if (!cached) {
        // exact from unit vectors when affordable, else from the quadrature nodes (exact per probe
        // up to k = 39, Gauss quadrature beyond); tr W and tr W² exact either way
        const exact = w.n * count * Math.max(form.s.rowPtr[w.n], 1) <= 2e8;
        cached = exact ? powerTraces(w, form.s, count, seed + 1, 0).traces : quad().powerTraces(count).traces;
        if (count >= 1) cached[0] = traceOf(w);
        if (count >= 2) cached[1] = traceOfSquare(w);
        powerCache.set(count, cached);
      }
      return cached.slice();
    },
    get traceMethod(): string {
      return tracer.describe();
    },
    dispose: () => cholesky.helper?.stop(),
  };
}

/** From this many areas the impact draws take tr(I − ρW)⁻¹ from the one-probe quadrature. */
export const ONE_PROBE_DRAWS = 20000;

/** Largest n for which the dense LU with partial pivoting backs up the sparse LU (or serves alone). */
export const DENSE_LU_LIMIT = 1500;

/** Multiply-adds of one exact evaluation above which a cheap series brackets the maximum first. */
const ROUGH_WORTH = 2e7;

/** n · (doubles of the factor) up to which traces come exactly from one solve per area. */
const EXACT_TRACE_BUDGET = 1.5e8;

/**
 * W without a symmetric form. W ≥ 0: the exact sparse LU while one evaluation costs at most
 * SPARSE_LU_WORK_LIMIT multiply-adds, the dense LU with partial pivoting behind it up to 1,500
 * areas (for ρ below −1/λmax, where a pivot may fail); past the work limit the Monte Carlo series
 * with its bound. W with negative entries: the dense LU up to 1,500 areas, else the series.
 * Traces and the reduced form through the factor kept at the last ρ, else by BiCGSTAB.
 */
function generalAlgebra(w: CsrMatrix, lmTrace: number, seed: number, opts: SparseOptions): SparseWeightsAlgebra {
  const n = w.n;
  const nonNegative = isNonNegative(w);
  let sparseLu: SparseLuLogDet | null = null;
  if (nonNegative) {
    const lu = new SparseLuLogDet(w, { coordinates: opts.coordinates });
    if (lu.work <= SPARSE_LU_WORK_LIMIT) sparseLu = lu;
  }
  const denseLu = n <= DENSE_LU_LIMIT ? new DenseLuLogDet(w) : null;
  // the LU without pivoting where it is stable; the dense LU when a pivot fails below −1/λmax
  const sparseKept = sparseLu?.keepsFactor ? sparseLu : null;
  const withFallback = <T>(rho: number, sparse: (() => T) | null, dense: (() => T) | null): T => {
    if (sparse) {
      try {
        return sparse();
      } catch (e) {
        if (!(e instanceof PivotError) || !dense) throw e;
      }
    }
    if (dense) return dense();
    throw new Error(`no exact factor of I − ρW at ρ = ${rho}`);
  };
  const exact: LogDeterminant | null = sparseLu || denseLu
    ? {
        evaluate: (rho: number) => withFallback(rho, sparseLu ? () => sparseLu!.evaluate(rho) : null, denseLu ? () => denseLu.evaluate(rho) : null),
        get method(): string {
          return sparseLu ? `${sparseLu.method}${denseLu ? '; where a pivot is not positive (ρ below −1/λmax), LU with partial pivoting of the dense I − ρW' : ''}` : denseLu!.method;
        },
        accuracy: 'exact (to rounding)',
      }
    : null;
  const direct = sparseKept || denseLu
    ? {
        factorSize: sparseKept ? sparseKept.factorSize : denseLu!.factorSize,
        solveBlock: (rho: number, b: Float64Array, r: number, x: Float64Array) =>
          withFallback(rho, sparseKept ? () => sparseKept.solveBlock(rho, b, r, x) : null, denseLu ? () => denseLu.solveBlock(rho, b, r, x) : null),
      }
    : null;
  const solve = direct ? (rho: number, b: Float64Array) => direct.solveBlock(rho, b, 1, new Float64Array(n)) : null;
  const perron = nonNegative ? perronRoot(w, solve ?? undefined) : null;
  const radius = perron ? perron.upper : maxAbsRowSum(w);
  sparseLu?.describeRadius(radius);
  const range = admissibleRange(w, { ...(perron ? { perron } : {}), ...(solve && nonNegative ? { shiftSolve: solve } : {}), seed });
  // Beside an exact log-determinant the series only brackets the maximum, which the exact
  // evaluations then polish: 8 probes do (32 make it the log-determinant itself, at four times the
  // cost; bench/README.md). Where one exact evaluation is cheap (under ROUGH_WORTH multiply-adds) the
  // search uses the exact one throughout and no series is built.
  const series = exact ? null : new SeriesLogDet(w, { terms: opts.seriesTerms, seed, radius });
  const logdet: LogDeterminant = exact ?? series!;
  const exactWork = sparseLu ? sparseLu.work : n ** 3 / 3;
  let rough: SeriesLogDet | null = null;
  const built = () => (rough ??= new SeriesLogDet(w, { terms: opts.seriesTerms, seed, radius, probes: 8 }));
  // built when the search first asks for it
  const roughLogdet: LogDeterminant | null = exact && exactWork > ROUGH_WORTH
    ? {
        evaluate: (rho: number) => built().evaluate(rho),
        get method() { return built().method; },
        get accuracy() { return built().accuracy; },
        get domain() { return built().domain; },
      }
    : null;
  // above 20,000 areas 16 probes, as with the Cholesky factor (the standard errors are reported)
  const probes = opts.probes ?? (n > 20000 ? 16 : 48);
  const tracer = new GeneralTraces(w, { seed, probes, exactBudget: EXACT_TRACE_BUDGET, ...(direct ? { direct } : {}) });
  const powerCache = new Map<number, Float64Array>();
  return {
    n,
    w,
    logdet,
    range,
    lmTrace,
    cholesky: null,
    ...(roughLogdet ? { roughLogdet } : {}),
    traces: (rho: number) => tracer.traces(rho),
    tracesExact: tracer.exact,
    ...(solve ? { solve } : {}),
    ...(direct ? { traceInverseCurve: (lo: number, hi: number) => traceInverseByFactor(w, direct, lo, hi, seed, tracer.exact, Math.min(probes, 16), radius) } : {}),
    powerTraces(count: number): Float64Array {
      let cached = powerCache.get(count);
      if (!cached) {
        cached = powerTraces(w, null, count, seed + 1, probes).traces;
        if (count >= 1) cached[0] = traceOf(w);
        if (count >= 2) cached[1] = traceOfSquare(w);
        powerCache.set(count, cached);
      }
      return cached.slice();
    },
    get traceMethod(): string {
      return tracer.describe();
    },
  };
}

/**
 * tr(I − ρW)⁻¹ over [lo, hi] for the impact draws. Exactly (unit vectors, blocks of 16) at each of a
 * few Chebyshev points when that is affordable; otherwise by Hutchinson's estimator with the same
 * seeded Rademacher probes throughout, and then, when the interval is narrow enough, from one
 * factorisation at its centre c by the series
 *   (I − ρW)⁻¹ = Σ_k δᵏ (A_c⁻¹W)ᵏ A_c⁻¹,  δ = ρ − c,  A_c = I − cW,
 * whose ratio |δ| λmax/(1 − |c|λmax) (a bound on the spectral radius of δA_c⁻¹W for W ≥ 0) is below
 * 1/2; the terms kept make the omitted ones smaller than 1e-10 of n (|tr Mᵏ| ≤ n ρ(M)ᵏ).
 */
export function traceInverseByFactor(
  w: CsrMatrix,
  direct: { solveBlock(rho: number, b: Float64Array, r: number, x: Float64Array): Float64Array },
  lo: number,
  hi: number,
  seed: number,
  exact: boolean,
  probes: number,
  radius: number,
): TraceInverseCurve {
  const n = w.n;
  const block = 16;
  const rounds = exact ? n : probes;
  const probeSet: Float64Array[] = [];
  if (!exact) {
    const uniform = seededRandom(seed + 3);
    for (let q = 0; q < probes; q++) probeSet.push(rademacher(new Float64Array(n), uniform));
  }
  const how = `Hutchinson's estimator (${probes} Rademacher probes, seed ${seed + 3}, the same throughout) with the factor of I − ρW`;
  const c = 0.5 * (lo + hi), half = 0.5 * (hi - lo);
  const ratio = Math.abs(c) * radius < 1 ? (half * radius) / (1 - Math.abs(c) * radius) : Infinity;
  if (!exact && ratio < 0.5) {
    const terms = Math.min(60, Math.max(1, Math.ceil(Math.log(1e-10 * (1 - ratio) * (1 - Math.abs(c) * radius)) / Math.log(Math.max(ratio, 1e-300)))));
    // moments m_k = mean over probes of zᵀ(A_c⁻¹W)ᵏA_c⁻¹z, k = 0..terms, all probes in one block
    const r = probes;
    const b = new Float64Array(n * r), x = new Float64Array(n * r), col = new Float64Array(n), wcol = new Float64Array(n);
    for (let q = 0; q < r; q++) { const z = probeSet[q]; for (let i = 0; i < n; i++) b[i * r + q] = z[i]; }
    const moments = new Float64Array(terms + 1);
    for (let k = 0; k <= terms; k++) {
      direct.solveBlock(c, b, r, x);
      let sum = 0;
      for (let q = 0; q < r; q++) {
        const z = probeSet[q];
        for (let i = 0; i < n; i++) { col[i] = x[i * r + q]; sum += z[i] * col[i]; }
        if (k < terms) { csrMultiply(w, col, wcol); for (let i = 0; i < n; i++) b[i * r + q] = wcol[i]; }
      }
      moments[k] = sum / r;
    }
    return {
      evaluate(rho: number): number {
        const d = rho - c;
        let s = 0;
        for (let k = terms; k >= 0; k--) s = s * d + moments[k];
        return s;
      },
      method: `tr(I − ρW)⁻¹ by ${how} at the centre ρ = ${c.toPrecision(6)} of the draws' interval [${lo.toPrecision(6)}, ${hi.toPrecision(6)}], and the series Σ_k (ρ − c)ᵏ tr((A_c⁻¹W)ᵏA_c⁻¹) to ${terms + 1} terms (ratio at most ${ratio.toPrecision(2)}; the omitted terms below 1e-10·n)`,
    };
  }
  const b = new Float64Array(n * block), x = new Float64Array(n * block);
  const traceAt = (rho: number): number => {
    const per = new Float64Array(rounds);
    for (let q0 = 0; q0 < rounds; q0 += block) {
      const r = Math.min(block, rounds - q0);
      const bb = b.subarray(0, n * r), xx = x.subarray(0, n * r);
      bb.fill(0);
      for (let col = 0; col < r; col++) {
        if (exact) bb[(q0 + col) * r + col] = 1;
        else { const z = probeSet[q0 + col]; for (let i = 0; i < n; i++) bb[i * r + col] = z[i]; }
      }
      direct.solveBlock(rho, bb, r, xx);
      for (let col = 0; col < r; col++) {
        if (exact) { per[q0 + col] = xx[(q0 + col) * r + col]; continue; }
        const z = probeSet[q0 + col];
        let s = 0;
        for (let i = 0; i < n; i++) s += z[i] * xx[i * r + col];
        per[q0 + col] = s;
      }
    }
    return exact ? per.reduce((s, v) => s + v, 0) : meanAndError(per).mean;
  };
  return chebyshevCurve(traceAt, lo, hi, exact ? 'tr(I − ρW)⁻¹ exact from one solve per area with the factor of I − ρW' : `tr(I − ρW)⁻¹ by ${how}`);
}
