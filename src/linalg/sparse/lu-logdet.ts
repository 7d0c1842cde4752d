/**
 * Exact ln|I − ρW| for a nonnegative W without a symmetric form (k-nearest neighbours, binary or
 * row-standardised; inverse distance without row standardisation): multifrontal LU (Duff & Reid 1984, "The multifrontal solution of unsymmetric sets of
 * linear equations") on the symmetric pattern of W + Wᵀ, with the same fill-reducing ordering and
 * symbolic analysis as the Cholesky factor (symbolic.ts), reused for every ρ. Each front is a full
 * m×m matrix; its leading k columns are eliminated, the Schur complement goes to the parent.
 * No pivoting is needed for |ρ| λmax < 1: with W ≥ 0, I − ρW is then a nonsingular M-matrix (ρ > 0)
 * or has one as its comparison matrix (ρ < 0), i.e. an H-matrix: scaled by the Perron vector x
 * (Wx = λmax x, x > 0) it is strictly diagonally dominant by rows, X⁻¹(I − ρW)X having off-diagonal
 * row sums |ρ|λmax < 1. Gaussian elimination keeps an H-matrix an H-matrix, every pivot is positive
 * and the growth stays bounded (Varga, Matrix Iterative Analysis, 2nd ed., §3.5; Golub & Van Loan,
 * Matrix Computations, §3.4.10 for the diagonally dominant case) — so ln|I − ρW| = Σ ln u_jj. For
 * row-stochastic W, x = 1 and λmax = 1: plain diagonal dominance. Below −1/λmax (the admissible
 * range reaches down to 1/λmin) no such guarantee holds: the pivot check (PivotError) is the
 * backstop, and the algebra then falls back to the dense LU with partial pivoting.
 * The factor of the last ρ is kept (up to 512 MB of it), so the traces and the reduced form at an
 * estimate found by exact evaluations are solved with it (two triangular solves each) rather than
 * iteratively.
 * Written by hand: no kept JavaScript library offers a sparse LU.
 */
import type { CsrMatrix } from '../csr.js';
import type { LogDeterminant } from '../logdet.js';
import { coordinateDissection, graphOf, levelDissection, usableCoordinates } from './ordering.js';
import { analyse, type SymbolicFactor } from './symbolic.js';
import { eliminateFront } from './lu-front.js';
import { luSolveBlock } from './lu-solve.js';

/** Multiply-adds of one LU evaluation above which the Monte Carlo series is used instead. */
export const SPARSE_LU_WORK_LIMIT = 4e10;

/** Doubles of factor kept for solves at most (512 MB); above, the log-determinant keeps nothing and solves are iterative. */
export const KEPT_FACTOR_LIMIT = 6.4e7;

export class SparseLuLogDet implements LogDeterminant {
  private radius = 1;
  private readonly how: string;
  readonly accuracy = 'exact (to rounding)';
  readonly symbolic: SymbolicFactor;
  /** multiply-adds per evaluation (k·m² summed over the fronts) */
  readonly work: number;
  /** doubles of the kept factor: per supernode its k rows of U (and L's multipliers left of the diagonal), then L's m − k rows below */
  readonly factorSize: number;
  /** whether the factor of the last ρ is kept for solves (false when it would pass KEPT_FACTOR_LIMIT) */
  readonly keepsFactor: boolean;
  readonly symbolicSeconds: number;
  /** W's values and Wᵀ's values on the pattern of W + Wᵀ */
  private readonly lower: Float64Array;
  private readonly upper: Float64Array;
  private readonly front: Float64Array;
  private readonly stack: Float64Array;
  private readonly pos: Int32Array;
  private readonly map: Int32Array;
  private readonly panelStart: Float64Array;
  private panels: Float64Array | null = null;
  /** ρ of the factor in `panels` (NaN when none is complete) and its log-determinant */
  private keptRho = NaN;
  private keptLogdet = 0;

  constructor(readonly w: CsrMatrix, opts: { coordinates?: { x: Float64Array; y: Float64Array } } = {}) {
    const t0 = performance.now();
    const { pattern, lower, upper } = symmetricPattern(w);
    this.lower = lower;
    this.upper = upper;
    const g = graphOf(pattern);
    const c = opts.coordinates;
    const useCoordinates = usableCoordinates(c, w.n);
    const perm = useCoordinates ? coordinateDissection(g, c!.x, c!.y) : levelDissection(g);
    this.symbolic = analyse(g, perm, pattern);
    const { superCount, superFirst, rowPtr, maxFront, stackSize } = this.symbolic;
    let work = 0, size = 0;
    this.panelStart = new Float64Array(superCount);
    for (let s = 0; s < superCount; s++) {
      const k = superFirst[s + 1] - superFirst[s], m = rowPtr[s + 1] - rowPtr[s];
      work += k * m * m;
      this.panelStart[s] = size;
      size += k * (2 * m - k);
    }
    this.work = work;
    this.factorSize = size;
    this.keepsFactor = size <= KEPT_FACTOR_LIMIT;
    this.front = new Float64Array(maxFront * maxFront);
    this.stack = new Float64Array(Math.max(1, stackSize));
    this.pos = new Int32Array(w.n);
    this.map = new Int32Array(Math.max(1, maxFront));
    this.symbolicSeconds = (performance.now() - t0) / 1000;
    this.how = `multifrontal on the pattern of W + Wᵀ, nested dissection from ${useCoordinates ? 'area coordinates' : 'breadth-first level structures'}; ` +
      'one symbolic analysis reused for every ρ';
  }

  /** Names the bound on λmax (the Collatz–Wielandt maximum ratio; 1 for row-stochastic W) in the method text. */
  describeRadius(radius: number): void {
    this.radius = radius;
  }

  get method(): string {
    const r = this.radius;
    const why = r === 1
      ? 'rows of W sum to one, so I − ρW is diagonally dominant for |ρ| < 1'
      : `W ≥ 0 with λmax ≤ ${r.toPrecision(6)}, so I − ρW is an H-matrix for |ρ| < ${(1 / r).toPrecision(6)}`;
    return `exact, sparse LU of I − ρW without pivoting (${why}; every pivot checked; ${this.how})`;
  }

  evaluate(rho: number): number {
    if (rho === 0) return 0;
    return this.factorAt(rho);
  }

  /** Factors I − ρW (unless the factor kept is at ρ) and keeps the factor when it may; returns ln|I − ρW|. */
  factorAt(rho: number): number {
    if (rho === this.keptRho) return this.keptLogdet;
    this.keptRho = NaN; // the panels are overwritten from here on
    if (this.keepsFactor) this.panels ??= new Float64Array(this.factorSize);
    this.keptLogdet = this.factor(rho, this.panels);
    this.keptRho = rho;
    return this.keptLogdet;
  }

  /** x = (I − ρW)⁻¹ b by the factor at ρ (factored first when the kept one is at another ρ). Needs keepsFactor. */
  solve(rho: number, b: Float64Array): Float64Array {
    return this.solveBlock(rho, b, 1, new Float64Array(b.length));
  }

  /**
   * X = (I − ρW)⁻¹ B for r right-hand sides stored interleaved (B[i·r + c] is row i of column c):
   * each factor entry is read once for all r columns. `work` is scratch of length n·r.
   */
  solveBlock(rho: number, b: Float64Array, r: number, x: Float64Array, work: Float64Array = new Float64Array(b.length)): Float64Array {
    if (!this.keepsFactor) throw new Error('this sparse LU is too large to keep for solves');
    this.factorAt(rho);
    return luSolveBlock(this.symbolic, this.panelStart, this.panels!, b, r, x, work);
  }

  /** The numeric multifrontal LU at ρ, stored into `panels` when given; returns Σ ln u_jj. */
  private factor(rho: number, panels: Float64Array | null): number {
    const { superCount, superFirst, rowPtr, rows, superParent, lowPtr, lowRow, lowSource } = this.symbolic;
    const { front: F, stack, pos, map, lower, upper } = this;
    let top = 0;
    const updateAt: number[] = [];
    const updateOwner: number[] = [];
    let logdet = 0;
    for (let s = 0; s < superCount; s++) {
      const f = superFirst[s], k = superFirst[s + 1] - f;
      const r0 = rowPtr[s], m = rowPtr[s + 1] - r0;
      for (let t = 0; t < m; t++) pos[rows[r0 + t]] = t;
      F.fill(0, 0, m * m);
      // entries of I − ρW in the supernode's columns (below) and rows (to the right)
      for (let c = 0; c < k; c++) {
        const j = f + c;
        F[c * m + c] += 1;
        for (let q = lowPtr[j], qEnd = lowPtr[j + 1]; q < qEnd; q++) {
          const i = pos[lowRow[q]], src = lowSource[q];
          if (i === c) { F[c * m + c] -= rho * lower[src]; continue; }
          F[i * m + c] -= rho * lower[src];
          F[c * m + i] -= rho * upper[src];
        }
      }
      let base = top;
      while (updateOwner.length > 0 && superParent[updateOwner[updateOwner.length - 1]] === s) {
        const child = updateOwner.pop()!;
        const at = updateAt.pop()!;
        base = at;
        const cr0 = rowPtr[child] + (superFirst[child + 1] - superFirst[child]);
        const r = rowPtr[child + 1] - cr0;
        for (let a = 0; a < r; a++) map[a] = pos[rows[cr0 + a]];
        for (let a = 0; a < r; a++) {
          const la = map[a] * m, ua = at + a * r;
          for (let b = 0; b < r; b++) F[la + map[b]] += stack[ua + b];
        }
      }
      top = base;
      logdet += eliminateFront(F, m, k, f);
      if (panels) {
        // keep the k rows of U (with L's multipliers left of the diagonal), then L's rows below
        const at = this.panelStart[s];
        panels.set(F.subarray(0, k * m), at);
        for (let i = k, to = at + k * m; i < m; i++, to += k) {
          for (let c = 0, from = i * m; c < k; c++) panels[to + c] = F[from + c];
        }
      }
      const r = m - k;
      if (r > 0) {
        for (let a = 0; a < r; a++) {
          const from = (k + a) * m + k, to = top + a * r;
          for (let b = 0; b < r; b++) stack[to + b] = F[from + b];
        }
        updateAt.push(top);
        updateOwner.push(s);
        top += r * r;
      }
    }
    return logdet;
  }
}

/**
 * The pattern of W + Wᵀ (rows sorted), with W's and Wᵀ's values on it (0 where one has no entry;
 * repeated entries of W add up): row i merges W's row i with Wᵀ's row i, both sorted by column.
 */
function symmetricPattern(w: CsrMatrix): { pattern: CsrMatrix; lower: Float64Array; upper: Float64Array } {
  const n = w.n;
  const nnz = w.rowPtr[n];
  const { colIdx: wCol, values: wVal } = w; // rows sorted by column (CsrMatrix)
  // Wᵀ by counting; scanning rows in order leaves each of its rows sorted
  const tPtr = new Int32Array(n + 1);
  for (let p = 0; p < nnz; p++) tPtr[wCol[p] + 1]++;
  for (let i = 0; i < n; i++) tPtr[i + 1] += tPtr[i];
  const tCol = new Int32Array(nnz), tVal = new Float64Array(nnz);
  const fill = tPtr.slice(0, n);
  for (let i = 0; i < n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) { const q = fill[wCol[p]]++; tCol[q] = i; tVal[q] = wVal[p]; }
  }
  const rowPtr = new Int32Array(n + 1);
  const colIdx = new Int32Array(2 * nnz), lower = new Float64Array(2 * nnz), upper = new Float64Array(2 * nnz);
  let at = 0;
  for (let i = 0; i < n; i++) {
    let p = w.rowPtr[i], q = tPtr[i];
    const pEnd = w.rowPtr[i + 1], qEnd = tPtr[i + 1];
    const rowStart = at;
    while (p < pEnd || q < qEnd) {
      const j = q >= qEnd || (p < pEnd && wCol[p] <= tCol[q]) ? wCol[p] : tCol[q];
      if (at === rowStart || colIdx[at - 1] !== j) { colIdx[at] = j; lower[at] = 0; upper[at] = 0; at++; }
      if (p < pEnd && wCol[p] === j) lower[at - 1] += wVal[p++];
      else upper[at - 1] += tVal[q++];
    }
    rowPtr[i + 1] = at;
  }
  // the pattern's values are never read by the symbolic analysis beyond its positions
  return {
    pattern: { n, rowPtr, colIdx: colIdx.slice(0, at), values: new Float64Array(at).fill(1) },
    lower: lower.slice(0, at),
    upper: upper.slice(0, at),
  };
}
