/**
 * Weights algebra for large n. With a symmetric form S of W: exact log-determinant by sparse
 * Cholesky of I − ρS, range by Lanczos, traces through the factor (exact or Hutchinson).
 * Without one (e.g. k-nearest neighbours): Monte Carlo series log-determinant with a stated error
 * bound, range from the spectral radius, traces by iterative solves.
 */
import type { CsrMatrix } from '../csr.js';
import type { TracesAt, WeightsAlgebra } from '../algebra.js';
import type { AdmissibleRange, LogDeterminant } from '../logdet.js';
import { SparseCholeskyLogDet } from './cholesky-logdet.js';
import { CholeskyTraces } from './traces.js';
import { GeneralTraces } from './general-traces.js';
import { SeriesLogDet } from './series-logdet.js';
import { powerTraces, traceOfSquare, frobeniusSquared } from './power-traces.js';
import { spectralRadiusRange, symmetricRange } from './extremes.js';
import { symmetricForm } from './similarity.js';

export interface SparseOptions {
  coordinates?: { x: Float64Array; y: Float64Array };
  seed?: number;
  /** Rademacher probes for stochastic traces (default 48) */
  probes?: number;
  /** terms of the Monte Carlo series when W has no symmetric form (default 100) */
  seriesTerms?: number;
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
  let logdet: LogDeterminant;
  let range: AdmissibleRange;
  let tracer: { traces(rho: number): TracesAt; describe(): string };
  let cholesky: SparseCholeskyLogDet | null = null;
  if (form) {
    cholesky = new SparseCholeskyLogDet(form.s, { coordinates: opts.coordinates });
    logdet = cholesky;
    range = symmetricRange(w, form.s, seed);
    tracer = new CholeskyTraces(cholesky, form.s, form.t, { seed, probes: opts.probes });
  } else {
    range = spectralRadiusRange(w);
    logdet = new SeriesLogDet(w, { terms: opts.seriesTerms, seed, radius: range.eigenMax });
    tracer = new GeneralTraces(w, seed, opts.probes ?? 48);
  }
  const powerCache = new Map<number, Float64Array>();
  const powerProbes = opts.probes ?? 48;
  return {
    n: w.n,
    w,
    logdet,
    range,
    lmTrace,
    cholesky,
    traces: (rho: number) => tracer.traces(rho),
    powerTraces(count: number): Float64Array {
      let cached = powerCache.get(count);
      if (!cached) {
        cached = powerTraces(w, form ? form.s : null, count, seed + 1, powerProbes).traces;
        powerCache.set(count, cached);
      }
      return cached.slice();
    },
    get traceMethod(): string {
      return tracer.describe();
    },
  };
}
