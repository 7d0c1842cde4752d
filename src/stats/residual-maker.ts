import { csrMultiply, csrMultiplyTransposed, type CsrMatrix } from '../linalg/index.js';
import { householderQr, thinQ } from '../linalg/index.js';
import { csrEntry as entry } from '../linalg/index.js';
import type { Design } from '../core/types.js';

/**
 * Traces of products of W with the residual maker M = I − X(X'X)⁻¹X' = I − QQᵀ (Q the thin QR
 * factor of X), without forming any n×n matrix. With P = QQᵀ and A = QᵀWQ (k×k):
 *   tr(MW)      = tr W − tr A
 *   tr(MWMWᵀ)   = tr(WWᵀ) − Σ‖Wᵀq_j‖² − Σ‖Wq_j‖² + ‖A‖²_F
 *   tr((MW)²)   = tr(WW) − 2 Σ (Wᵀq_j)·(Wq_j) + tr(A²)
 * Cost: 2k products with W and O(nnz + nk²) work, so it serves any n.
 */
export interface ResidualMakerTraces {
  trMW: number;
  trMWMWt: number;
  trMWMW: number;
}

export function residualMakerTraces(x: Design, w: CsrMatrix): ResidualMakerTraces {
  const q = thinQ(householderQr(x.columns));
  const k = q.length;
  const n = w.n;
  const wq = q.map((c) => csrMultiply(w, c));
  const wtq = q.map((c) => csrMultiplyTransposed(w, c));
  const a = new Float64Array(k * k); // A_ij = q_iᵀ W q_j
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) a[i * k + j] = dot(q[i], wq[j]);
  let trW = 0;
  let trWWt = 0;
  let trWW = 0;
  for (let i = 0; i < n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) {
      const j = w.colIdx[p];
      const v = w.values[p];
      if (j === i) trW += v;
      trWWt += v * v;
      trWW += v * entry(w, j, i);
    }
  }
  let trA = 0;
  let frob = 0;
  let trA2 = 0;
  let sumWq = 0;
  let sumWtq = 0;
  let cross = 0;
  for (let i = 0; i < k; i++) {
    trA += a[i * k + i];
    sumWq += dot(wq[i], wq[i]);
    sumWtq += dot(wtq[i], wtq[i]);
    cross += dot(wtq[i], wq[i]);
    for (let j = 0; j < k; j++) {
      frob += a[i * k + j] * a[i * k + j];
      trA2 += a[i * k + j] * a[j * k + i];
    }
  }
  return {
    trMW: trW - trA,
    trMWMWt: trWWt - sumWtq - sumWq + frob,
    trMWMW: trWW - 2 * cross + trA2,
  };
}

/** vᵀMv = vᵀv − ‖Qᵀv‖² for the residual maker of X. */
export function residualQuadratic(x: Design, v: Float64Array): number {
  const q = thinQ(householderQr(x.columns));
  let s = dot(v, v);
  for (const c of q) {
    const t = dot(c, v);
    s -= t * t;
  }
  return s;
}

export function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

export function weightsTotal(w: CsrMatrix): number {
  let s = 0;
  for (let p = 0; p < w.values.length; p++) s += w.values[p];
  return s;
}
