/**
 * Weights algebra for large n. With a symmetric form S of W: exact log-determinant by sparse
 * Cholesky of I − ρS, range by Lanczos, traces through the factor (exact or Hutchinson, probes
 * solved together with the factor at ρ, which is kept for the reduced-form solve), a one-probe
 * Lanczos quadrature from the range's own Lanczos run for a cheap log-determinant that only
 * brackets the likelihood maximum, and a several-probe quadrature (built on first use) for
 * tr(I − ρW)⁻¹ at the impact draws and for long power series.
 * Without one (e.g. k-nearest neighbours): exact dense LU per evaluation up to 1,500 areas, the
 * exact sparse LU above when the rows of W sum to one, else the Monte Carlo series log-determinant
 * with a stated error bound; range from the spectral radius, traces by solves with the sparse LU
 * (or iterative ones where there is none).
 */
import type { CsrMatrix } from '../csr.js';
import type { WeightsAlgebra } from '../algebra.js';
import type { AdmissibleRange, LogDeterminant } from '../logdet.js';
import { SparseCholeskyLogDet } from './cholesky-logdet.js';
import { CholeskyTraces } from './traces.js';
import { GeneralTraces } from './general-traces.js';
import { SeriesLogDet } from './series-logdet.js';
import { DenseLuLogDet } from '../dense-lu-logdet.js';
import { powerTraces, traceOf, traceOfSquare, frobeniusSquared } from './power-traces.js';
import { LanczosQuadrature } from './quadrature.js';
import { isRowStochastic, lanczosExtremes, lanczosPlan, rangeFromLanczos, spectralRadiusRange } from './extremes.js';
import { SparseLuLogDet, SPARSE_LU_WORK_LIMIT } from './lu-logdet.js';
import { symmetricForm } from './similarity.js';
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
  const lmTrace = frobeniusSquared(w) + traceOfSquare(w);
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
    traceInverse,
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

/** Largest n for which W without a symmetric form gets the exact dense LU log-determinant. */
export const DENSE_LU_LIMIT = 1500;

/**
 * W without a symmetric form: exact dense LU per evaluation up to 1,500 areas; above, when the rows
 * of W sum to one, the exact sparse LU while one evaluation costs at most SPARSE_LU_WORK_LIMIT
 * multiply-adds (the Monte Carlo series then only brackets the maximum); otherwise the series with
 * its stated bound. Traces and the reduced form through the sparse LU's kept factor when there is
 * one, else by BiCGSTAB.
 */
function generalAlgebra(w: CsrMatrix, lmTrace: number, seed: number, opts: SparseOptions): SparseWeightsAlgebra {
  const range = spectralRadiusRange(w);
  let exact: LogDeterminant | null = w.n <= DENSE_LU_LIMIT ? new DenseLuLogDet(w) : null;
  let sparseLu: SparseLuLogDet | null = null;
  if (!exact && isRowStochastic(w)) {
    const lu = new SparseLuLogDet(w, { coordinates: opts.coordinates });
    if (lu.work <= SPARSE_LU_WORK_LIMIT) exact = sparseLu = lu;
  }
  // beside the sparse LU the series only brackets the maximum, which the exact evaluations then
  // polish: 8 probes do (the 32 that make it the log-determinant itself took 17 s at 90,000 areas)
  const series = new SeriesLogDet(w, { terms: opts.seriesTerms, seed, radius: range.eigenMax, ...(sparseLu ? { probes: 8 } : {}) });
  const logdet: LogDeterminant = exact ?? series;
  // above 20,000 areas 16 probes, as with the Cholesky factor (the standard errors are reported)
  const probes = opts.probes ?? (w.n > 20000 ? 16 : 48);
  const direct = sparseLu?.keepsFactor ? sparseLu : null;
  const tracer = new GeneralTraces(w, { seed, probes, ...(direct ? { direct } : {}) });
  const powerCache = new Map<number, Float64Array>();
  const powerProbes = probes;
  return {
    n: w.n,
    w,
    logdet,
    range,
    lmTrace,
    cholesky: null,
    ...(exact ? { roughLogdet: series } : {}),
    traces: (rho: number) => tracer.traces(rho),
    // the reduced form at the estimate through the LU kept from its traces
    ...(direct ? { solve: (rho: number, b: Float64Array) => direct.solve(rho, b) } : {}),
    powerTraces(count: number): Float64Array {
      let cached = powerCache.get(count);
      if (!cached) {
        cached = powerTraces(w, null, count, seed + 1, powerProbes).traces;
        powerCache.set(count, cached);
      }
      return cached.slice();
    },
    get traceMethod(): string {
      return tracer.describe();
    },
  };
}
