/**
 * Exact ln|I − ρW| at moderate n by LU with partial pivoting of the dense I − ρW (Golub & Van Loan,
 * Matrix Computations, alg. 3.4.1): ln|det| = Σ ln|u_ii|. O(n³/3) per evaluation. It serves where
 * the sparse LU without pivoting cannot vouch for its pivots (ρ below −1/λmax for W without a
 * symmetric form, or W with negative entries) up to 1,500 areas, and keeps its factor of the last ρ
 * for solves. Written by hand: ml-matrix's LU works on nested arrays and allocates a new matrix per
 * call; this one refills one Float64Array in place.
 */
import type { CsrMatrix } from './csr.js';
import type { LogDeterminant } from './logdet.js';

export class DenseLuLogDet implements LogDeterminant {
  readonly method: string;
  readonly accuracy = 'exact (to rounding)';
  /** doubles of the factor (n²), for cost comparisons with the sparse factor */
  readonly factorSize: number;
  private storage: Float64Array | null = null;
  private readonly pivots: Int32Array;
  private keptRho = NaN;
  private keptLogdet = 0;

  constructor(readonly w: CsrMatrix) {
    this.pivots = new Int32Array(w.n);
    this.factorSize = w.n * w.n;
    this.method = `exact, LU with partial pivoting of the dense I − ρW at each ρ (${w.n} areas)`;
  }

  evaluate(rho: number): number {
    return this.factorAt(rho);
  }

  /** n² doubles, allocated on first use (the sparse LU may never need this one). */
  private get a(): Float64Array {
    return (this.storage ??= new Float64Array(this.w.n * this.w.n));
  }

  /** Factors I − ρW (unless the kept factor is at ρ); returns ln|I − ρW| (−Infinity when singular). */
  factorAt(rho: number): number {
    if (rho === this.keptRho) return this.keptLogdet;
    const { n, rowPtr, colIdx, values } = this.w;
    const a = this.a;
    this.keptRho = NaN;
    a.fill(0);
    for (let i = 0; i < n; i++) {
      a[i * n + i] = 1;
      for (let p = rowPtr[i], pEnd = rowPtr[i + 1]; p < pEnd; p++) a[i * n + colIdx[p]] -= rho * values[p];
    }
    let logdet = 0;
    for (let k = 0; k < n; k++) {
      let pivot = k, best = Math.abs(a[k * n + k]);
      for (let i = k + 1; i < n; i++) {
        const v = Math.abs(a[i * n + k]);
        if (v > best) { best = v; pivot = i; }
      }
      this.pivots[k] = pivot;
      if (best === 0) return -Infinity;
      if (pivot !== k) {
        for (let c = 0; c < n; c++) { const t = a[k * n + c]; a[k * n + c] = a[pivot * n + c]; a[pivot * n + c] = t; }
      }
      const rk = k * n, d = a[rk + k];
      logdet += Math.log(Math.abs(d));
      const inv = 1 / d;
      for (let i = k + 1; i < n; i++) {
        const ri = i * n;
        const f = a[ri + k] * inv;
        a[ri + k] = f;
        if (f === 0) continue;
        for (let c = k + 1; c < n; c++) a[ri + c] -= f * a[rk + c];
      }
    }
    this.keptRho = rho;
    this.keptLogdet = logdet;
    return logdet;
  }

  /** x = (I − ρW)⁻¹ b. */
  solve(rho: number, b: Float64Array): Float64Array {
    return this.solveBlock(rho, b, 1, new Float64Array(b.length));
  }

  /** X = (I − ρW)⁻¹ B for r right-hand sides stored interleaved (B[i·r + c] is row i of column c). */
  solveBlock(rho: number, b: Float64Array, r: number, x: Float64Array): Float64Array {
    if (this.factorAt(rho) === -Infinity) throw new Error(`I − ρW is singular at ρ = ${rho}`);
    const n = this.w.n, a = this.a;
    x.set(b.subarray(0, n * r));
    for (let k = 0; k < n; k++) {
      const p = this.pivots[k];
      if (p !== k) for (let c = 0; c < r; c++) { const t = x[k * r + c]; x[k * r + c] = x[p * r + c]; x[p * r + c] = t; }
    }
    for (let i = 1; i < n; i++) {
      const ri = i * n, xi = i * r;
      for (let k = 0; k < i; k++) {
        const l = a[ri + k];
        if (l === 0) continue;
        const xk = k * r;
        for (let c = 0; c < r; c++) x[xi + c] -= l * x[xk + c];
      }
    }
    for (let i = n - 1; i >= 0; i--) {
      const ri = i * n, xi = i * r;
      for (let k = i + 1; k < n; k++) {
        const u = a[ri + k];
        if (u === 0) continue;
        const xk = k * r;
        for (let c = 0; c < r; c++) x[xi + c] -= u * x[xk + c];
      }
      const inv = 1 / a[ri + i];
      for (let c = 0; c < r; c++) x[xi + c] *= inv;
    }
    return x;
  }
}
