import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import type { CsrMatrix } from './csr.js';

/**
 * Eigenvalues of a dense symmetric matrix: Householder reduction to tridiagonal form followed by
 * the implicit QL iteration with Wilkinson shifts (Golub & Van Loan, Matrix Computations §8.3;
 * Wilkinson & Reinsch, Handbook for Automatic Computation vol. II, procedure tql1).
 *
 * Written by hand because only the eigenvalues are needed: ml-matrix's decomposition always
 * accumulates eigenvectors on nested arrays (many times slower at n = 1,000; bench/README.md), while
 * this one works in place on one Float64Array and skips the vectors.
 *
 * @param a symmetric n×n matrix, row-major; it is overwritten.
 */
export function symmetricEigenvalues(a: Float64Array, n: number): Float64Array {
  const d = new Float64Array(n);
  const e = new Float64Array(n); // e[k] couples d[k] and d[k + 1]
  const v = new Float64Array(n);
  const p = new Float64Array(n);
  // Householder tridiagonalisation (Golub & Van Loan alg. 8.3.1) on the lower triangle, with every
  // inner loop running along a row so that access stays contiguous.
  for (let k = 0; k < n - 2; k++) {
    let scale = 0;
    for (let i = k + 1; i < n; i++) scale = Math.max(scale, Math.abs(a[i * n + k]));
    if (scale === 0) {
      e[k] = 0;
      continue;
    }
    let norm2 = 0;
    for (let i = k + 1; i < n; i++) {
      v[i] = a[i * n + k] / scale;
      norm2 += v[i] * v[i];
    }
    const alpha = v[k + 1] >= 0 ? -Math.sqrt(norm2) : Math.sqrt(norm2);
    e[k] = alpha * scale;
    v[k + 1] -= alpha;
    let vv = 0;
    for (let i = k + 1; i < n; i++) vv += v[i] * v[i];
    if (vv === 0) continue;
    const beta = 2 / vv;
    // p = β A₂₂ v from the lower triangle
    for (let i = k + 1; i < n; i++) p[i] = 0;
    for (let j = k + 1; j < n; j++) {
      const row = j * n;
      const vj = v[j];
      let s = 0;
      for (let i = k + 1; i < j; i++) {
        const aji = a[row + i];
        s += aji * v[i];
        p[i] += aji * vj;
      }
      p[j] += s + a[row + j] * vj;
    }
    let pv = 0;
    for (let i = k + 1; i < n; i++) {
      p[i] *= beta;
      pv += p[i] * v[i];
    }
    const half = 0.5 * beta * pv;
    for (let i = k + 1; i < n; i++) p[i] -= half * v[i]; // p is now w
    for (let j = k + 1; j < n; j++) {
      const row = j * n;
      const vj = v[j];
      const wj = p[j];
      for (let i = k + 1; i <= j; i++) a[row + i] -= vj * p[i] + wj * v[i];
    }
  }
  for (let i = 0; i < n; i++) d[i] = a[i * n + i];
  if (n >= 2) e[n - 2] = a[(n - 1) * n + n - 2];
  if (n > 0) e[n - 1] = 0;
  // implicit QL on the tridiagonal (d, e)
  for (let l = 0; l < n; l++) {
    let iter = 0;
    let m: number;
    do {
      for (m = l; m < n - 1; m++) {
        const dd = Math.abs(d[m]) + Math.abs(d[m + 1]);
        if (Math.abs(e[m]) <= Number.EPSILON * dd) break;
      }
      if (m !== l) {
        if (iter++ === 60) throw new Error('symmetric eigenvalue iteration did not converge');
        let g = (d[l + 1] - d[l]) / (2 * e[l]);
        let r = Math.hypot(g, 1);
        g = d[m] - d[l] + e[l] / (g + (g >= 0 ? Math.abs(r) : -Math.abs(r)));
        let s = 1;
        let c = 1;
        let p = 0;
        let i: number;
        for (i = m - 1; i >= l; i--) {
          const f = s * e[i];
          const b = c * e[i];
          r = Math.hypot(f, g);
          e[i + 1] = r;
          if (r === 0) {
            d[i + 1] -= p;
            e[m] = 0;
            break;
          }
          s = f / r;
          c = g / r;
          g = d[i + 1] - p;
          r = (d[i] - g) * s + 2 * c * b;
          p = s * r;
          d[i + 1] = g + p;
          g = c * r - b;
        }
        if (r === 0 && i >= l) continue;
        d[l] -= p;
        e[l] = g;
        e[m] = 0;
      }
    } while (m !== l);
  }
  return d.sort();
}

/** Real and imaginary parts of the eigenvalues of a general dense matrix (ml-matrix). */
export function generalEigenvalues(w: CsrMatrix): { re: Float64Array; im: Float64Array } {
  const evd = new EigenvalueDecomposition(csrToMatrix(w));
  return { re: Float64Array.from(evd.realEigenvalues), im: Float64Array.from(evd.imaginaryEigenvalues) };
}

export function csrToMatrix(w: CsrMatrix): Matrix {
  const m = Matrix.zeros(w.n, w.n);
  for (let i = 0; i < w.n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) m.set(i, w.colIdx[p], w.values[p]);
  }
  return m;
}

/** Dense row-major copy of a CSR matrix. */
export function csrToDense(w: CsrMatrix): Float64Array {
  const out = new Float64Array(w.n * w.n);
  for (let i = 0; i < w.n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) out[i * w.n + w.colIdx[p]] = w.values[p];
  }
  return out;
}
