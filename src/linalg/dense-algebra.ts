import type { TracesAt, WeightsAlgebra } from './algebra.js';
import { csrMultiply, isSymmetric, lmTrace, type CsrMatrix } from './csr.js';
import { csrToDense, generalEigenvalues, symmetricEigenvalues } from './dense-eigen.js';
import { shiftedSolver } from './iterative.js';
import type { LogDeterminant } from './logdet.js';
import { rangeFromAllEigenvalues } from './range.js';
import { symmetricForm } from './symmetric-form.js';

/**
 * Weights algebra from all eigenvalues of W, for n up to about 2,000 (Ord 1975: ln|I − ρW| =
 * Σ ln(1 − ρω_i); admissible interval (1/ω_min, 1/ω_max)).
 *
 * With a symmetric matrix similar to W (W = E⁻¹SE, E diagonal — e.g. S = D^-½ C D^-½ for a
 * row-standardised symmetric C) the eigenvalues are real and come from S. `symmetric` may be that
 * S, or the symmetric base C itself with W = D⁻¹C; both are recognised. Without one, the real and
 * complex eigenvalues of W come from ml-matrix.
 *
 * Traces at ρ (G = W(I − ρW)⁻¹): tr G = Σ ω/(1 − ρω), tr G² = Σ ω²/(1 − ρω)², tr (I − ρW)⁻¹ =
 * Σ 1/(1 − ρω), all exact from the eigenvalues. tr GᵀG is not a function of the eigenvalues unless
 * W is symmetric; then it equals tr G², otherwise it is Σ_i ‖G e_i‖² from n iterative solves,
 * computed only when the field is read (the ML information matrix reads it once; the impact
 * simulation reads only trAinv).
 */
export function denseAlgebra(w: CsrMatrix, symmetric: CsrMatrix | null): WeightsAlgebra {
  const n = w.n;
  const wSymmetric = isSymmetric(w);
  let re: Float64Array;
  let im: Float64Array | null = null;
  let source: string;
  const s = wSymmetric ? w : symmetricForm(w, symmetric)?.s ?? null;
  if (s) {
    re = symmetricEigenvalues(csrToDense(s), n);
    source = wSymmetric ? 'eigenvalues of W (symmetric)' : 'eigenvalues of the symmetric matrix similar to W';
  } else {
    const ev = generalEigenvalues(w);
    re = ev.re;
    im = ev.im;
    source = 'real and complex eigenvalues of W';
  }
  const imag = im;
  const range = rangeFromAllEigenvalues(re, im, source);

  const logdet: LogDeterminant = {
    evaluate(rho: number): number {
      let sum = 0;
      if (imag === null) {
        for (let i = 0; i < n; i++) sum += Math.log(1 - rho * re[i]);
      } else {
        for (let i = 0; i < n; i++) {
          const a = 1 - rho * re[i];
          const b = rho * imag[i];
          sum += 0.5 * Math.log(a * a + b * b);
        }
      }
      return sum;
    },
    method: `exact, ${source}`,
    accuracy: 'exact',
  };

  function traces(rho: number): TracesAt {
    let trAinv = 0;
    let trG = 0;
    let trG2 = 0;
    for (let i = 0; i < n; i++) {
      if (imag === null) {
        const inv = 1 / (1 - rho * re[i]);
        trAinv += inv;
        trG += re[i] * inv;
        trG2 += re[i] * re[i] * inv * inv;
      } else {
        // 1/(1 − ρλ) for complex λ = a + ib; the imaginary parts cancel over conjugate pairs
        const a = 1 - rho * re[i];
        const b = -rho * imag[i];
        const d = a * a + b * b;
        const invRe = a / d;
        const invIm = -b / d;
        trAinv += invRe;
        const gRe = re[i] * invRe - imag[i] * invIm;
        const gIm = re[i] * invIm + imag[i] * invRe;
        trG += gRe;
        trG2 += gRe * gRe - gIm * gIm;
      }
    }
    let cached: { value: number; unconverged?: string } | undefined;
    const gtg = () => (cached ??= wSymmetric ? { value: trG2 } : traceGtG(w, rho));
    return {
      trAinv,
      trG,
      trG2,
      get trGtG(): number {
        return gtg().value;
      },
      get unconverged(): string | undefined {
        return cached?.unconverged;
      },
    };
  }

  function powerTraces(count: number): Float64Array {
    const out = new Float64Array(count);
    for (let i = 0; i < n; i++) {
      let pRe = 1;
      let pIm = 0;
      const a = re[i];
      const b = imag ? imag[i] : 0;
      for (let k = 0; k < count; k++) {
        const nextRe = pRe * a - pIm * b;
        pIm = pRe * b + pIm * a;
        pRe = nextRe;
        out[k] += pRe;
      }
    }
    return out;
  }

  return {
    n,
    w,
    logdet,
    range,
    lmTrace: lmTrace(w),
    traces,
    tracesExact: true,
    powerTraces,
    traceMethod: wSymmetric
      ? `exact, ${source}`
      : `exact, ${source}; tr GᵀG from ${n} iterative solves (relative residual 1e-12)`,
  };
}

/** tr GᵀG = Σ_i ‖W (I − ρW)⁻¹ e_i‖², one iterative solve per column. */
function traceGtG(w: CsrMatrix, rho: number): { value: number; unconverged?: string } {
  const n = w.n;
  const unit = new Float64Array(n);
  const g = new Float64Array(n);
  const solve = shiftedSolver(w, rho);
  let sum = 0, missed = 0, worst = 0;
  for (let i = 0; i < n; i++) {
    unit.fill(0);
    unit[i] = 1;
    const solved = solve(unit);
    if (!solved.converged) { missed++; worst = Math.max(worst, solved.relativeResidual); }
    csrMultiply(w, solved.x, g);
    for (let t = 0; t < n; t++) sum += g[t] * g[t];
  }
  if (missed === 0) return { value: sum };
  return { value: sum, unconverged: `${missed} of the ${n} GMRES solves behind tr GᵀG at ρ = ${rho} stopped short of relative residual 1e-12 (worst ${worst.toExponential(1)})` };
}
