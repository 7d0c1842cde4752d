/**
 * The shifted iterative solves (I − ρW) x = b, for when no factor of I − ρW is at hand: restarted
 * GMRES (the default: its residual never grows) and BiCGSTAB (less memory per right-hand side).
 * Both need only products W·v and both report whether they reached the tolerance: a caller passes
 * that on (a warning, a method text), never ignores it. Hand-written: none of the installed
 * libraries has a sparse iterative solver.
 */
import { csrMultiply, type CsrMatrix } from './csr.js';

export interface ShiftedSolve {
  x: Float64Array;
  iterations: number;
  /** ‖b − (I − ρW)x‖ / ‖b‖ at exit */
  relativeResidual: number;
  converged: boolean;
}

/**
 * Solves (I − ρW) x = b by restarted GMRES with modified Gram–Schmidt and Givens rotations
 * (Saad & Schultz 1986; Saad, Iterative Methods for Sparse Linear Systems, alg. 6.9). Needs only
 * products W·v, so it serves the reduced form of the lag model, impacts and exact traces at any n.
 */
export function solveShifted(
  w: CsrMatrix,
  rho: number,
  b: Float64Array,
  opts: { tolerance?: number; restart?: number; maxIterations?: number } = {},
): ShiftedSolve {
  return shiftedSolver(w, rho, opts)(b);
}

/**
 * The same solve as a reusable function: the Krylov workspace is allocated once, for callers that
 * solve with many right-hand sides at one ρ (exact traces need one solve per area). The returned x
 * is a fresh array each call.
 */
export function shiftedSolver(
  w: CsrMatrix,
  rho: number,
  opts: { tolerance?: number; restart?: number; maxIterations?: number } = {},
): (b: Float64Array) => ShiftedSolve {
  const n = w.n;
  const tol = opts.tolerance ?? 1e-12;
  const m = Math.min(opts.restart ?? 40, Math.max(n, 1));
  const maxIterations = opts.maxIterations ?? 4000;
  const wv = new Float64Array(n);
  const apply = (v: Float64Array, out: Float64Array): Float64Array => {
    csrMultiply(w, v, wv);
    for (let i = 0; i < n; i++) out[i] = v[i] - rho * wv[i];
    return out;
  };
  const basis: Float64Array[] = [];
  for (let j = 0; j <= m; j++) basis.push(new Float64Array(n));
  const h = new Float64Array((m + 1) * m); // h[i*m + j]
  const cs = new Float64Array(m);
  const sn = new Float64Array(m);
  const g = new Float64Array(m + 1);
  const r = new Float64Array(n);
  return (b: Float64Array): ShiftedSolve => {
    const x = new Float64Array(n);
    const bNorm = norm(b);
    if (bNorm === 0) return { x, iterations: 0, relativeResidual: 0, converged: true };
    let iterations = 0;
    let relativeResidual = 1;
    while (iterations < maxIterations) {
      apply(x, r);
      for (let i = 0; i < n; i++) r[i] = b[i] - r[i];
      const beta = norm(r);
      relativeResidual = beta / bNorm;
      if (relativeResidual <= tol) return { x, iterations, relativeResidual, converged: true };
      for (let i = 0; i < n; i++) basis[0][i] = r[i] / beta;
      g.fill(0);
      g[0] = beta;
      let j = 0;
      for (; j < m && iterations < maxIterations; ) {
        const v = apply(basis[j], basis[j + 1]);
        for (let i = 0; i <= j; i++) {
          const bi = basis[i];
          let dot = 0;
          for (let t = 0; t < n; t++) dot += v[t] * bi[t];
          h[i * m + j] = dot;
          for (let t = 0; t < n; t++) v[t] -= dot * bi[t];
        }
        const hNext = norm(v);
        if (hNext > 0) for (let t = 0; t < n; t++) v[t] /= hNext;
        for (let i = 0; i < j; i++) {
          const a = h[i * m + j];
          const c = h[(i + 1) * m + j];
          h[i * m + j] = cs[i] * a + sn[i] * c;
          h[(i + 1) * m + j] = -sn[i] * a + cs[i] * c;
        }
        const diag = h[j * m + j];
        const rad = Math.hypot(diag, hNext);
        cs[j] = rad === 0 ? 1 : diag / rad;
        sn[j] = rad === 0 ? 0 : hNext / rad;
        h[j * m + j] = rad;
        g[j + 1] = -sn[j] * g[j];
        g[j] = cs[j] * g[j];
        j++;
        iterations++;
        if (Math.abs(g[j]) / bNorm <= tol || hNext === 0) break;
      }
      // back substitution for the j Krylov coefficients, then update x
      const y = new Float64Array(j);
      for (let i = j - 1; i >= 0; i--) {
        let s = g[i];
        for (let c = i + 1; c < j; c++) s -= h[i * m + c] * y[c];
        y[i] = s / h[i * m + i];
      }
      for (let i = 0; i < j; i++) {
        const bi = basis[i];
        const yi = y[i];
        for (let t = 0; t < n; t++) x[t] += yi * bi[t];
      }
    }
    apply(x, r);
    for (let i = 0; i < n; i++) r[i] = b[i] - r[i];
    relativeResidual = norm(r) / bNorm;
    return { x, iterations, relativeResidual, converged: relativeResidual <= Math.max(tol * 100, 1e-9) };
  };
}

function norm(v: Float64Array): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i] * v[i];
  return Math.sqrt(s);
}

/**
 * Solves (I − ρW) x = b by BiCGSTAB (van der Vorst 1992, "Bi-CGSTAB: a fast and smoothly converging
 * variant of Bi-CG", SIAM J. Sci. Stat. Comput. 13), from x₀ = b, to relative residual `tolerance`.
 * A breakdown (ρ_k = 0 after a restart, or ω = 0: the stabilising step made no progress) is not
 * convergence: the solve then goes on by GMRES from zero and reports that one's outcome.
 */
export function bicgstabShifted(
  w: CsrMatrix,
  rho: number,
  b: Float64Array,
  out: Float64Array = new Float64Array(w.n),
  opts: { tolerance?: number; maxIterations?: number } = {},
): ShiftedSolve {
  const n = w.n;
  const tol = opts.tolerance ?? 1e-12;
  const maxIter = opts.maxIterations ?? 2000;
  const apply = (v: Float64Array, o: Float64Array) => {
    csrMultiply(w, v, o);
    for (let i = 0; i < n; i++) o[i] = v[i] - rho * o[i];
  };
  const x = out;
  x.set(b);
  const r = new Float64Array(n), rHat = new Float64Array(n), p = new Float64Array(n), v = new Float64Array(n);
  const s = new Float64Array(n), t = new Float64Array(n);
  apply(x, r);
  let bNorm = 0;
  for (let i = 0; i < n; i++) { r[i] = b[i] - r[i]; bNorm += b[i] * b[i]; }
  bNorm = Math.sqrt(bNorm);
  if (bNorm === 0) { x.fill(0); return { x, iterations: 0, relativeResidual: 0, converged: true }; }
  rHat.set(r);
  let rhoPrev = 1, alpha = 1, omega = 1, restarted = false;
  const fallBack = (it: number): ShiftedSolve => {
    const g = solveShifted(w, rho, b, { tolerance: tol });
    x.set(g.x);
    return { ...g, x, iterations: it + g.iterations };
  };
  for (let it = 0; it < maxIter; it++) {
    let rn = 0;
    for (let i = 0; i < n; i++) rn += r[i] * r[i];
    if (Math.sqrt(rn) <= tol * bNorm) return { x, iterations: it, relativeResidual: Math.sqrt(rn) / bNorm, converged: true };
    let rhoNow = 0;
    for (let i = 0; i < n; i++) rhoNow += rHat[i] * r[i];
    if (rhoNow === 0) {
      // the shadow residual became orthogonal to r: restart once from the current residual
      if (restarted) return fallBack(it);
      restarted = true;
      rHat.set(r); p.fill(0); v.fill(0); rhoPrev = 1; alpha = 1; omega = 1;
      rhoNow = rn;
    }
    const beta = (rhoNow / rhoPrev) * (alpha / omega);
    for (let i = 0; i < n; i++) p[i] = r[i] + beta * (p[i] - omega * v[i]);
    apply(p, v);
    let hv = 0;
    for (let i = 0; i < n; i++) hv += rHat[i] * v[i];
    if (hv === 0) return fallBack(it);
    alpha = rhoNow / hv;
    let sn = 0;
    for (let i = 0; i < n; i++) { s[i] = r[i] - alpha * v[i]; sn += s[i] * s[i]; }
    if (Math.sqrt(sn) <= tol * bNorm) {
      // converged on the half step (van der Vorst 1992): t = As would be 0 and ω undefined
      for (let i = 0; i < n; i++) x[i] += alpha * p[i];
      return { x, iterations: it + 1, relativeResidual: Math.sqrt(sn) / bNorm, converged: true };
    }
    apply(s, t);
    let ts = 0, tt = 0;
    for (let i = 0; i < n; i++) { ts += t[i] * s[i]; tt += t[i] * t[i]; }
    omega = tt > 0 ? ts / tt : 0;
    if (omega === 0) {
      // no progress from the stabilising step: a breakdown, not convergence
      for (let i = 0; i < n; i++) x[i] += alpha * p[i];
      return fallBack(it);
    }
    for (let i = 0; i < n; i++) { x[i] += alpha * p[i] + omega * s[i]; r[i] = s[i] - omega * t[i]; }
    rhoPrev = rhoNow;
  }
  let rn = 0;
  apply(x, r);
  for (let i = 0; i < n; i++) { const d = b[i] - r[i]; rn += d * d; }
  return { x, iterations: maxIter, relativeResidual: Math.sqrt(rn) / bNorm, converged: false };
}
