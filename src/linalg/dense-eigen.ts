import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import type { CsrMatrix } from './csr.js';

/**
 * Eigenvalues of a dense symmetric matrix: Householder reduction to tridiagonal form followed by
 * the implicit QL iteration with Wilkinson shifts (Wilkinson & Reinsch, Handbook for Automatic
 * Computation vol. II, procedures tred1 and tql1; also Press et al., Numerical Recipes §11.2–11.3).
 *
 * Written by hand because only the eigenvalues are needed: ml-matrix's decomposition always
 * accumulates eigenvectors on nested arrays and took ~12 s at n = 1,000 on this kind of machine,
 * while this one works in place on one Float64Array and skips the vectors.
 *
 * @param a symmetric n×n matrix, row-major; it is overwritten.
 */
export function symmetricEigenvalues(a: Float64Array, n: number): Float64Array {
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  // Householder tridiagonalisation on the lower triangle
  for (let i = n - 1; i > 0; i--) {
    const l = i - 1;
    const rowI = i * n;
    let h = 0;
    if (l > 0) {
      let scale = 0;
      for (let k = 0; k <= l; k++) scale += Math.abs(a[rowI + k]);
      if (scale === 0) {
        e[i] = a[rowI + l];
      } else {
        for (let k = 0; k <= l; k++) {
          a[rowI + k] /= scale;
          h += a[rowI + k] * a[rowI + k];
        }
        let f = a[rowI + l];
        let g = f >= 0 ? -Math.sqrt(h) : Math.sqrt(h);
        e[i] = scale * g;
        h -= f * g;
        a[rowI + l] = f - g;
        f = 0;
        for (let j = 0; j <= l; j++) {
          g = 0;
          const rowJ = j * n;
          for (let k = 0; k <= j; k++) g += a[rowJ + k] * a[rowI + k];
          for (let k = j + 1; k <= l; k++) g += a[k * n + j] * a[rowI + k];
          e[j] = g / h;
          f += e[j] * a[rowI + j];
        }
        const hh = f / (h + h);
        for (let j = 0; j <= l; j++) {
          f = a[rowI + j];
          g = e[j] - hh * f;
          e[j] = g;
          const rowJ = j * n;
          for (let k = 0; k <= j; k++) a[rowJ + k] -= f * e[k] + g * a[rowI + k];
        }
      }
    } else {
      e[i] = a[rowI + l];
    }
  }
  for (let i = 0; i < n; i++) d[i] = a[i * n + i];
  // implicit QL on the tridiagonal (d, e)
  for (let i = 1; i < n; i++) e[i - 1] = e[i];
  if (n > 0) e[n - 1] = 0;
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
    for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) m.set(i, w.colIdx[p], w.values[p]);
  }
  return m;
}

/** Dense row-major copy of a CSR matrix. */
export function csrToDense(w: CsrMatrix): Float64Array {
  const out = new Float64Array(w.n * w.n);
  for (let i = 0; i < w.n; i++) {
    for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) out[i * w.n + w.colIdx[p]] = w.values[p];
  }
  return out;
}
