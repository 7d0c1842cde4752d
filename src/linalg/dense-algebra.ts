import type { TracesAt, WeightsAlgebra } from './algebra.js';
import { csrEntry, csrMultiply, type CsrMatrix } from './csr.js';
import { csrToDense, generalEigenvalues, symmetricEigenvalues } from './dense-eigen.js';
import { shiftedSolver } from './dense-iterative.js';
import type { AdmissibleRange, LogDeterminant } from './logdet.js';

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
  const s = wSymmetric ? w : symmetric ? similarSymmetric(w, symmetric) : null;
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
  const isReal = (i: number): boolean => imag === null || Math.abs(imag[i]) <= 1e-10 * Math.max(1, Math.abs(re[i]));

  let eigenMin = Infinity;
  let eigenMax = -Infinity;
  let radius = 0;
  for (let i = 0; i < n; i++) {
    radius = Math.max(radius, imag ? Math.hypot(re[i], imag[i]) : Math.abs(re[i]));
    if (!isReal(i)) continue;
    eigenMin = Math.min(eigenMin, re[i]);
    eigenMax = Math.max(eigenMax, re[i]);
  }
  if (!(eigenMin < 0)) eigenMin = -radius;
  if (!(eigenMax > 0)) eigenMax = radius;
  const range: AdmissibleRange = {
    lower: 1 / eigenMin,
    upper: 1 / eigenMax,
    eigenMin,
    eigenMax,
    method: `exact, ${source}`,
  };

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
    let cached: number | undefined;
    return {
      trAinv,
      trG,
      trG2,
      get trGtG(): number {
        if (cached === undefined) cached = wSymmetric ? trG2 : traceGtG(w, rho);
        return cached;
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
    powerTraces,
    traceMethod: wSymmetric
      ? `exact, ${source}`
      : `exact, ${source}; tr GᵀG from ${n} iterative solves (relative residual 1e-12)`,
  };
}

/** tr(WᵀW + WW) = Σ w_ij² + Σ w_ij w_ji, straight from the CSR entries: O(nnz log). */
export function lmTrace(w: CsrMatrix): number {
  let sum = 0;
  for (let i = 0; i < w.n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      const v = w.values[p];
      sum += v * v + v * entry(w, w.colIdx[p], i);
    }
  }
  return sum;
}

/** W[i, j]: one lookup shared with the rest of linalg. */
export const entry = csrEntry;

function isSymmetric(w: CsrMatrix): boolean {
  for (let i = 0; i < w.n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      const v = w.values[p];
      if (Math.abs(v - entry(w, w.colIdx[p], i)) > 1e-12 * Math.abs(v)) return false;
    }
  }
  return true;
}

/**
 * Returns S symmetric with W = E⁻¹SE (E diagonal). Accepts S itself (checked entrywise with the
 * scaling recovered from W_ij/S_ij) or the symmetric base C of W = D⁻¹C (then S = D^-½CD^-½).
 * Throws when `symmetric` is neither: the caller passed weights that do not belong together.
 */
function similarSymmetric(w: CsrMatrix, sym: CsrMatrix): CsrMatrix {
  if (sym.n !== w.n) throw new Error(`symmetric matrix has order ${sym.n}, W has ${w.n}`);
  const n = w.n;
  const rowSum = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let p = sym.rowPtr[i], pEnd = sym.rowPtr[i + 1]; p < pEnd; p++) rowSum[i] += sym.values[p];
  // the base C: W_ij = C_ij / Σ_j C_ij
  let isBase = true;
  for (let i = 0; i < n && isBase; i++) {
    for (let p = sym.rowPtr[i], pEnd = sym.rowPtr[i + 1]; p < pEnd; p++) {
      const expected = sym.values[p] / rowSum[i];
      if (Math.abs(entry(w, i, sym.colIdx[p]) - expected) > 1e-10 * Math.abs(expected)) {
        isBase = false;
        break;
      }
    }
  }
  if (isBase && sameNonzeros(w, sym)) {
    const scale = rowSum.map((d) => (d > 0 ? 1 / Math.sqrt(d) : 0));
    const values = new Float64Array(sym.values.length);
    for (let i = 0; i < n; i++) {
      for (let p = sym.rowPtr[i], pEnd = sym.rowPtr[i + 1]; p < pEnd; p++) values[p] = sym.values[p] * scale[i] * scale[sym.colIdx[p]];
    }
    return { n, rowPtr: sym.rowPtr, colIdx: sym.colIdx, values };
  }
  // S itself: W_ij = S_ij e_j / e_i; check that W's entries are all explained by one scaling
  const e = new Float64Array(n).fill(NaN);
  for (let start = 0; start < n; start++) {
    if (!Number.isNaN(e[start])) continue;
    e[start] = 1;
    const stack = [start];
    while (stack.length > 0) {
      const i = stack.pop()!;
      for (let p = sym.rowPtr[i], pEnd = sym.rowPtr[i + 1]; p < pEnd; p++) {
        const j = sym.colIdx[p];
        if (!Number.isNaN(e[j])) continue;
        e[j] = (entry(w, i, j) / sym.values[p]) * e[i];
        stack.push(j);
      }
    }
  }
  const probe = new Float64Array(n);
  for (let i = 0; i < n; i++) probe[i] = 1 + ((i * 7919) % 13) / 13;
  // W v against E⁻¹ S E v on a fixed probe vector, plus identical sparsity
  const wv = csrMultiply(w, probe);
  const ev = probe.map((v, i) => v * e[i]);
  const sev = csrMultiply(sym, ev);
  let ok = sameNonzeros(w, sym) && e.every((x) => Number.isFinite(x) && x > 0);
  for (let i = 0; ok && i < n; i++) {
    if (Math.abs(wv[i] - sev[i] / e[i]) > 1e-9 * (Math.abs(wv[i]) + 1e-300) + 1e-14) ok = false;
  }
  if (!ok) throw new Error('the symmetric matrix given is not similar to W by a diagonal scaling');
  return sym;
}

function sameNonzeros(a: CsrMatrix, b: CsrMatrix): boolean {
  if (a.colIdx.length !== b.colIdx.length) return false;
  for (let i = 0; i <= a.n; i++) if (a.rowPtr[i] !== b.rowPtr[i]) return false;
  for (let p = 0; p < a.colIdx.length; p++) if (a.colIdx[p] !== b.colIdx[p]) return false;
  return true;
}

/** tr GᵀG = Σ_i ‖W (I − ρW)⁻¹ e_i‖², one iterative solve per column. */
function traceGtG(w: CsrMatrix, rho: number): number {
  const n = w.n;
  const unit = new Float64Array(n);
  const g = new Float64Array(n);
  const solve = shiftedSolver(w, rho);
  let sum = 0;
  for (let i = 0; i < n; i++) {
    unit.fill(0);
    unit[i] = 1;
    const { x } = solve(unit);
    csrMultiply(w, x, g);
    for (let t = 0; t < n; t++) sum += g[t] * g[t];
  }
  return sum;
}
