/**
 * Householder QR of a tall n×k matrix held as k column vectors (Golub & Van Loan, Matrix
 * Computations, alg. 5.2.1). Written by hand rather than taken from ml-matrix because the models
 * refactor the same n×k design many times (once per λ in the error model) and keep it as columns of
 * typed arrays; copying into row arrays each time would dominate for large n.
 *
 * No column pivoting: rank deficiency is detected afterwards from |R_jj| relative to the norm of
 * column j, which also tells which column is (nearly) a combination of the earlier ones.
 */
export interface HouseholderQr {
  n: number;
  k: number;
  /** Householder vectors, one per column (v_j has zeros above row j) */
  reflectors: Float64Array[];
  /** R, upper triangular k×k, row-major */
  r: Float64Array;
  /** Euclidean norm of each original column */
  columnNorms: Float64Array;
}

export function householderQr(columns: readonly Float64Array[]): HouseholderQr {
  const k = columns.length;
  const n = k > 0 ? columns[0].length : 0;
  const work = columns.map((c) => Float64Array.from(c));
  const columnNorms = new Float64Array(k);
  for (let j = 0; j < k; j++) columnNorms[j] = norm2(work[j], 0);
  const reflectors: Float64Array[] = [];
  const r = new Float64Array(k * k);
  for (let j = 0; j < k; j++) {
    const a = work[j];
    const alphaNorm = norm2(a, j);
    const v = new Float64Array(n);
    if (alphaNorm === 0) {
      reflectors.push(v);
      r[j * k + j] = 0;
      for (let c = j + 1; c < k; c++) r[j * k + c] = work[c][j];
      continue;
    }
    const alpha = a[j] > 0 ? -alphaNorm : alphaNorm;
    for (let i = j; i < n; i++) v[i] = a[i];
    v[j] -= alpha;
    const vNorm = norm2(v, j);
    for (let i = j; i < n; i++) v[i] /= vNorm;
    reflectors.push(v);
    r[j * k + j] = alpha;
    for (let c = j + 1; c < k; c++) {
      applyReflector(v, work[c], j);
      r[j * k + c] = work[c][j];
    }
  }
  return { n, k, reflectors, r, columnNorms };
}

/** y ← (I − 2vvᵀ) y, v nonzero from index `from` on */
function applyReflector(v: Float64Array, y: Float64Array, from: number): void {
  let dot = 0;
  for (let i = from; i < y.length; i++) dot += v[i] * y[i];
  dot *= 2;
  for (let i = from; i < y.length; i++) y[i] -= dot * v[i];
}

function norm2(a: Float64Array, from: number): number {
  // scaled to avoid overflow for large entries
  let scale = 0;
  for (let i = from; i < a.length; i++) scale = Math.max(scale, Math.abs(a[i]));
  if (scale === 0) return 0;
  let s = 0;
  for (let i = from; i < a.length; i++) {
    const t = a[i] / scale;
    s += t * t;
  }
  return scale * Math.sqrt(s);
}

/** Qᵀ y (length n; the first k entries are the coordinates in the column space). */
export function applyQt(qr: HouseholderQr, y: Float64Array): Float64Array {
  const out = Float64Array.from(y);
  for (let j = 0; j < qr.k; j++) applyReflector(qr.reflectors[j], out, j);
  return out;
}

/** Q z for z of length n. */
export function applyQ(qr: HouseholderQr, z: Float64Array): Float64Array {
  const out = Float64Array.from(z);
  for (let j = qr.k - 1; j >= 0; j--) applyReflector(qr.reflectors[j], out, j);
  return out;
}

/** The thin factor Q (n×k) as k orthonormal columns. */
export function thinQ(qr: HouseholderQr): Float64Array[] {
  const cols: Float64Array[] = [];
  for (let j = 0; j < qr.k; j++) {
    const e = new Float64Array(qr.n);
    e[j] = 1;
    cols.push(applyQ(qr, e));
  }
  return cols;
}

/** Solves R x = b (back substitution). */
export function solveUpper(r: Float64Array, k: number, b: Float64Array): Float64Array {
  const x = new Float64Array(k);
  for (let i = k - 1; i >= 0; i--) {
    let s = b[i];
    for (let c = i + 1; c < k; c++) s -= r[i * k + c] * x[c];
    x[i] = s / r[i * k + i];
  }
  return x;
}

/** Least-squares coefficients min ||y − Xβ|| from a QR of X. */
export function qrSolve(qr: HouseholderQr, y: Float64Array): Float64Array {
  const qty = applyQt(qr, y);
  return solveUpper(qr.r, qr.k, qty.subarray(0, qr.k));
}

/**
 * (XᵀX)⁻¹ = R⁻¹R⁻ᵀ, row-major k×k. This k×k inverse is the covariance the user sees, so it is
 * formed; it is obtained from k triangular solves, never by inverting XᵀX.
 */
export function inverseCrossProduct(qr: HouseholderQr): Float64Array {
  const { k, r } = qr;
  const rinv = new Float64Array(k * k); // column c of R⁻¹ solves R x = e_c
  for (let c = 0; c < k; c++) {
    const e = new Float64Array(k);
    e[c] = 1;
    const x = solveUpper(r, k, e);
    for (let i = 0; i < k; i++) rinv[i * k + c] = x[i];
  }
  const out = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = i; j < k; j++) {
      let s = 0;
      for (let m = Math.max(i, j); m < k; m++) s += rinv[i * k + m] * rinv[j * k + m];
      out[i * k + j] = s;
      out[j * k + i] = s;
    }
  }
  return out;
}

/**
 * Index of the first column whose diagonal |R_jj| falls below `tolerance` × its own norm, i.e. a
 * column that is (numerically) a combination of the columns before it; −1 when X has full rank.
 */
export function firstDependentColumn(qr: HouseholderQr, tolerance = 1e-10): number {
  for (let j = 0; j < qr.k; j++) {
    if (qr.columnNorms[j] === 0) return j;
    if (Math.abs(qr.r[j * qr.k + j]) <= tolerance * qr.columnNorms[j]) return j;
  }
  return -1;
}
