/**
 * Dense kernel of the multifrontal LU: eliminates the leading k columns of an m×m row-major front
 * without pivoting (the caller guarantees positive pivots), as a blocked right-looking LU (Golub &
 * Van Loan, Matrix Computations, §3.2.9). For each block of BLOCK columns: the panel below and on
 * the diagonal by rank-one updates, the block's U rows to the right by a unit-lower triangular
 * solve, then everything right of and below the block minus L·U in 4×2 register blocks (each load
 * feeds more than one multiply-add, and each entry of the front is written once per block, where
 * rank-one updates read and wrote every entry once per column).
 * Afterwards rows 0..k−1 hold U on and right of the diagonal and L's multipliers left of it, rows
 * k..m−1 hold L in columns 0..k−1 and the Schur complement in columns k..m−1.
 * Written by hand: no kept JavaScript library offers a dense LU on a slice of a typed array.
 */

export class PivotError extends Error {
  constructor(readonly column: number) {
    super(`I − ρW has a pivot that is not positive (column ${column + 1}); ρ lies outside the range where the LU needs no pivoting`);
    this.name = 'PivotError';
  }
}

/** Columns per block: wide enough that the product dominates, narrow enough that its rows stay in cache. */
const BLOCK = 32;

let transposed = new Float64Array(BLOCK * 64);

/** Eliminates the leading k columns of the m×m front F; returns Σ ln u_pp. `firstColumn` names pivots in errors. */
export function eliminateFront(F: Float64Array, m: number, k: number, firstColumn: number): number {
  let logdet = 0;
  for (let p0 = 0; p0 < k; p0 += BLOCK) {
    const p1 = Math.min(k, p0 + BLOCK);
    // panel: columns p0..p1−1, every row below the pivot
    for (let p = p0; p < p1; p++) {
      const rp = p * m;
      const pivot = F[rp + p];
      if (!(pivot > 0)) throw new PivotError(firstColumn + p);
      logdet += Math.log(pivot);
      const inv = 1 / pivot;
      for (let i = p + 1; i < m; i++) {
        const ri = i * m;
        const l = F[ri + p] * inv;
        F[ri + p] = l;
        if (l !== 0) for (let j = p + 1; j < p1; j++) F[ri + j] -= l * F[rp + j];
      }
    }
    if (p1 === m) break;
    // the block's U rows right of the panel: unit-lower triangular solve with the block's L
    for (let p = p0; p < p1; p++) {
      const rp = p * m;
      for (let i = p + 1; i < p1; i++) {
        const ri = i * m;
        const l = F[ri + p];
        if (l !== 0) for (let j = p1; j < m; j++) F[ri + j] -= l * F[rp + j];
      }
    }
    trailingUpdate(F, m, p0, p1);
  }
  return logdet;
}

/** F[i, j] −= Σ_{q∈[p0,p1)} F[i, q]·F[q, j] for i, j ≥ p1, with U's block transposed so both factors run contiguously. */
function trailingUpdate(F: Float64Array, m: number, p0: number, p1: number): void {
  const b = p1 - p0;
  const cols = m - p1;
  if (transposed.length < cols * b) transposed = new Float64Array(2 * cols * b);
  const U = transposed;
  for (let q = 0; q < b; q++) {
    const from = (p0 + q) * m + p1;
    for (let j = 0; j < cols; j++) U[j * b + q] = F[from + j];
  }
  let i = p1;
  for (; i + 3 < m; i += 4) {
    const l0 = i * m + p0, l1 = l0 + m, l2 = l1 + m, l3 = l2 + m;
    const o0 = i * m + p1, o1 = o0 + m, o2 = o1 + m, o3 = o2 + m;
    let j = 0;
    for (; j + 1 < cols; j += 2) {
      const u0 = j * b, u1 = u0 + b;
      let a00 = 0, a01 = 0, a10 = 0, a11 = 0, a20 = 0, a21 = 0, a30 = 0, a31 = 0;
      for (let q = 0; q < b; q++) {
        const x0 = U[u0 + q], x1 = U[u1 + q];
        const y0 = F[l0 + q], y1 = F[l1 + q], y2 = F[l2 + q], y3 = F[l3 + q];
        a00 += y0 * x0; a01 += y0 * x1;
        a10 += y1 * x0; a11 += y1 * x1;
        a20 += y2 * x0; a21 += y2 * x1;
        a30 += y3 * x0; a31 += y3 * x1;
      }
      F[o0 + j] -= a00; F[o0 + j + 1] -= a01;
      F[o1 + j] -= a10; F[o1 + j + 1] -= a11;
      F[o2 + j] -= a20; F[o2 + j + 1] -= a21;
      F[o3 + j] -= a30; F[o3 + j + 1] -= a31;
    }
    if (j < cols) {
      const u0 = j * b;
      let a0 = 0, a1 = 0, a2 = 0, a3 = 0;
      for (let q = 0; q < b; q++) {
        const x0 = U[u0 + q];
        a0 += F[l0 + q] * x0; a1 += F[l1 + q] * x0; a2 += F[l2 + q] * x0; a3 += F[l3 + q] * x0;
      }
      F[o0 + j] -= a0; F[o1 + j] -= a1; F[o2 + j] -= a2; F[o3 + j] -= a3;
    }
  }
  for (; i < m; i++) {
    const l0 = i * m + p0, o0 = i * m + p1;
    for (let j = 0; j < cols; j++) {
      const u0 = j * b;
      let a = 0;
      for (let q = 0; q < b; q++) a += F[l0 + q] * U[u0 + q];
      F[o0 + j] -= a;
    }
  }
}
