/**
 * Numeric multifrontal Cholesky (Duff & Reid 1983; Liu 1992, "The multifrontal method for sparse
 * matrix solution") of M = I − ρS over a symbolic analysis made once. Each supernode assembles a
 * dense frontal matrix (row-major, lower triangle) from M and its children's update matrices,
 * factors its leading columns, and passes the Schur complement to its parent on a stack. The dense
 * kernels are dot products over contiguous rows, in 4×2 register blocks (both the triangular solve
 * for L21 and the Schur update) so that each load feeds more than one multiply-add. Written by hand: no kept JavaScript library offers sparse Cholesky.
 */
import type { SymbolicFactor } from './symbolic.js';

export class NotPositiveDefiniteError extends Error {
  constructor(readonly column: number) {
    super(`I − ρS is not positive definite (pivot ${column + 1}); ρ lies outside the admissible range`);
    this.name = 'NotPositiveDefiniteError';
  }
}

/** The stored factor: for supernode s, an m×k row-major panel at panelPtr[s]. */
export interface NumericFactor {
  panels: Float64Array;
  panelPtr: Float64Array;
}

/**
 * Work split between two threads (see split.ts): two groups of whole subtrees run at once, each on
 * its own stack, and leave their roots' update matrices in a shared store; the top supernodes then
 * run on one thread, assembling every child update from that store.
 */
export interface FactorSplit {
  /** [first, last + 1) supernode ranges of each group (whole subtrees in postorder) */
  groups: [Int32Array, Int32Array];
  /** top supernodes, ascending */
  top: Int32Array;
  /** offset in the store of supernode s's update matrix, −1 when it goes on the stack */
  exportAt: Float64Array;
  storeSize: number;
  /** children of the top supernodes: childPtr over supernodes, childList their children */
  childPtr: Int32Array;
  childList: Int32Array;
}

export class Multifrontal {
  private readonly front: Float64Array;
  private readonly stack: Float64Array;
  private readonly pos: Int32Array;
  /** positions in the parent front of a child's update rows */
  private readonly map: Int32Array;
  /** offset of each supernode's panel in the stored factor (the same for every ρ) */
  readonly panelStart: Float64Array;
  readonly panelTotal: number;

  constructor(readonly sym: SymbolicFactor, private readonly values: Float64Array) {
    this.front = new Float64Array(sym.maxFront * sym.maxFront);
    this.stack = new Float64Array(Math.max(1, sym.stackSize));
    this.pos = new Int32Array(sym.n);
    this.map = new Int32Array(Math.max(1, sym.maxFront));
    const { superCount, superFirst, rowPtr } = sym;
    this.panelStart = new Float64Array(superCount);
    let size = 0;
    for (let s = 0; s < superCount; s++) {
      this.panelStart[s] = size;
      size += (rowPtr[s + 1] - rowPtr[s]) * (superFirst[s + 1] - superFirst[s]);
    }
    this.panelTotal = size;
  }

  /**
   * Factor I − ρS; returns ln|I − ρS| = 2 Σ ln L_jj. With `keep`, the factor panels are stored for
   * solves. Throws NotPositiveDefiniteError when a pivot is not positive.
   */
  factor(rho: number, keep?: NumericFactor): number {
    return this.factorRange(rho, 0, this.sym.superCount, keep, null, null);
  }

  /** One group of a split: its subtrees, each root's update left in `store`. */
  factorGroup(rho: number, split: FactorSplit, group: 0 | 1, store: Float64Array, keep?: NumericFactor): number {
    const ranges = split.groups[group];
    let logdet = 0;
    for (let r = 0; r < ranges.length; r += 2) logdet += this.factorRange(rho, ranges[r], ranges[r + 1], keep, split, store);
    return logdet;
  }

  /** The top supernodes of a split, after both groups. */
  factorTop(rho: number, split: FactorSplit, store: Float64Array, keep?: NumericFactor): number {
    const { superFirst, rowPtr } = this.sym;
    const { childPtr, childList, exportAt } = split;
    let logdet = 0;
    for (let t = 0; t < split.top.length; t++) {
      const s = split.top[t];
      const m = this.assembleOwn(s, rho);
      for (let c = childPtr[s]; c < childPtr[s + 1]; c++) {
        const child = childList[c];
        const cr0 = rowPtr[child] + (superFirst[child + 1] - superFirst[child]);
        this.extendAdd(store, exportAt[child], cr0, rowPtr[child + 1] - cr0, m);
      }
      logdet += this.eliminate(s, m, keep);
      const r = m - (superFirst[s + 1] - superFirst[s]);
      if (r > 0) schurUpdate(this.front, m, m - r, store, exportAt[s]);
    }
    return logdet;
  }

  /** Supernodes lo..hi−1 (whole subtrees); updates of those whose parent lies outside go to `store`. */
  private factorRange(rho: number, lo: number, hi: number, keep: NumericFactor | undefined, split: FactorSplit | null, store: Float64Array | null): number {
    const { superFirst, rowPtr, superParent } = this.sym;
    const stack = this.stack;
    let top = 0; // doubles in use on the stack
    const updateAt: number[] = []; // offset of each pending update matrix, in stack order
    const updateOwner: number[] = [];
    let logdet = 0;

    for (let s = lo; s < hi; s++) {
      const m = this.assembleOwn(s, rho);
      // extend-add the children's update matrices (they sit at the top of the stack)
      let base = top;
      while (updateOwner.length > 0 && superParent[updateOwner[updateOwner.length - 1]] === s) {
        const child = updateOwner.pop()!;
        const at = updateAt.pop()!;
        base = at;
        const cr0 = rowPtr[child] + (superFirst[child + 1] - superFirst[child]);
        this.extendAdd(stack, at, cr0, rowPtr[child + 1] - cr0, m);
      }
      top = base;

      logdet += this.eliminate(s, m, keep);

      const k = superFirst[s + 1] - superFirst[s];
      const r = m - k;
      if (r > 0) {
        if (split && split.exportAt[s] >= 0) {
          schurUpdate(this.front, m, k, store!, split.exportAt[s]);
          continue;
        }
        schurUpdate(this.front, m, k, stack, top);
        updateAt.push(top);
        updateOwner.push(s);
        top += r * r;
      }
    }
    return logdet;
  }

  /** Zeroes the front of supernode s and adds the entries of I − ρS in its columns; returns m. */
  private assembleOwn(s: number, rho: number): number {
    const { superFirst, rowPtr, rows, lowPtr, lowRow, lowSource } = this.sym;
    const { front, pos, values } = this;
    const f = superFirst[s];
    const k = superFirst[s + 1] - f;
    const r0 = rowPtr[s];
    const m = rowPtr[s + 1] - r0;
    for (let t = 0; t < m; t++) pos[rows[r0 + t]] = t;
    for (let i = 0; i < m; i++) { const row = i * m; for (let c = 0; c <= i; c++) front[row + c] = 0; }
    for (let c = 0; c < k; c++) {
      const j = f + c;
      front[c * m + c] += 1;
      for (let q = lowPtr[j], qEnd = lowPtr[j + 1]; q < qEnd; q++) front[pos[lowRow[q]] * m + c] -= rho * values[lowSource[q]];
    }
    return m;
  }

  /** Adds an r×r update matrix (lower triangle, rows rows[cr0..cr0+r)) at `at` into the m×m front. */
  private extendAdd(from: Float64Array, at: number, cr0: number, r: number, m: number): void {
    const { front, pos, map } = this;
    const rows = this.sym.rows;
    for (let a = 0; a < r; a++) map[a] = pos[rows[cr0 + a]];
    for (let a = 0; a < r; a++) {
      const la = map[a] * m;
      const ua = at + a * r;
      for (let b = 0; b <= a; b++) front[la + map[b]] += from[ua + b];
    }
  }

  /** Factors the leading columns of the assembled front and stores the panel; returns their 2 Σ ln L_jj. */
  private eliminate(s: number, m: number, keep: NumericFactor | undefined): number {
    const f = this.sym.superFirst[s];
    const k = this.sym.superFirst[s + 1] - f;
    const front = this.front;
    const logdet = partialCholesky(front, m, k, f);
    if (keep) {
      const panels = keep.panels;
      const offset = this.panelStart[s];
      for (let i = 0; i < m; i++) {
        const w = i + 1 < k ? i + 1 : k;
        const from = i * m, to = offset + i * k;
        for (let c = 0; c < w; c++) panels[to + c] = front[from + c];
        for (let c = w; c < k; c++) panels[to + c] = 0;
      }
      keep.panelPtr[s] = offset;
    }
    return logdet;
  }

  /** Doubles needed to keep the factor panels. */
  panelSize(): number {
    return this.panelTotal;
  }
}

let reciprocals = new Float64Array(64);

/**
 * Factor the leading k columns of the m×m front in place (row-major, lower): rows 0..k−1 become
 * L11, rows k..m−1 become L21. Returns 2 Σ ln diag.
 * Row-oriented (left-looking) Cholesky, four rows at a time: the columns left of a group's first
 * row are final, so the bulk of every row — L11 rows and L21 rows alike — goes through one 4×2
 * register block (each load feeds two multiply-adds); only the small triangle inside the group
 * and its diagonal are done entry by entry. (Doing L11 by plain dot products ran at a quarter of
 * the speed, and a large root separator is mostly L11.)
 */
function partialCholesky(F: Float64Array, m: number, k: number, firstColumn: number): number {
  let logdet = 0;
  if (reciprocals.length < k) reciprocals = new Float64Array(2 * k);
  const inv = reciprocals;
  for (let i = 0; i < m; i += 4) {
    const g = m - i < 4 ? m - i : 4;
    const jmax = i < k ? i : k; // columns already final for every row of the group
    if (g === 4) {
      const r0 = i * m, r1 = r0 + m, r2 = r1 + m, r3 = r2 + m;
      let j = 0;
      for (; j + 1 < jmax; j += 2) {
        const ra = j * m, rb = ra + m;
        let a0 = F[r0 + j], a1 = F[r1 + j], a2 = F[r2 + j], a3 = F[r3 + j];
        let b0 = F[r0 + j + 1], b1 = F[r1 + j + 1], b2 = F[r2 + j + 1], b3 = F[r3 + j + 1];
        for (let p = 0; p < j; p++) {
          const la = F[ra + p], lb = F[rb + p];
          const x0 = F[r0 + p], x1 = F[r1 + p], x2 = F[r2 + p], x3 = F[r3 + p];
          a0 -= x0 * la; a1 -= x1 * la; a2 -= x2 * la; a3 -= x3 * la;
          b0 -= x0 * lb; b1 -= x1 * lb; b2 -= x2 * lb; b3 -= x3 * lb;
        }
        const da = inv[j], db = inv[j + 1], l = F[rb + j];
        a0 *= da; a1 *= da; a2 *= da; a3 *= da;
        F[r0 + j] = a0; F[r1 + j] = a1; F[r2 + j] = a2; F[r3 + j] = a3;
        F[r0 + j + 1] = (b0 - a0 * l) * db; F[r1 + j + 1] = (b1 - a1 * l) * db;
        F[r2 + j + 1] = (b2 - a2 * l) * db; F[r3 + j + 1] = (b3 - a3 * l) * db;
      }
      for (; j < jmax; j++) {
        const rj = j * m;
        let s0 = F[r0 + j], s1 = F[r1 + j], s2 = F[r2 + j], s3 = F[r3 + j];
        for (let p = 0; p < j; p++) {
          const l = F[rj + p];
          s0 -= F[r0 + p] * l; s1 -= F[r1 + p] * l; s2 -= F[r2 + p] * l; s3 -= F[r3 + p] * l;
        }
        const d = inv[j];
        F[r0 + j] = s0 * d; F[r1 + j] = s1 * d; F[r2 + j] = s2 * d; F[r3 + j] = s3 * d;
      }
    } else {
      for (let a = i; a < i + g; a++) {
        const ra = a * m;
        for (let j = 0; j < jmax; j++) {
          const rj = j * m;
          let sa = F[ra + j];
          for (let p = 0; p < j; p++) sa -= F[ra + p] * F[rj + p];
          F[ra + j] = sa * inv[j];
        }
      }
    }
    if (i >= k) continue;
    // inside the leading columns: the rest of each row, then its diagonal
    for (let a = i; a < i + g; a++) {
      const ra = a * m;
      const end = a < k ? a : k;
      for (let j = jmax; j < end; j++) {
        const rj = j * m;
        let sa = F[ra + j];
        for (let p = 0; p < j; p++) sa -= F[ra + p] * F[rj + p];
        F[ra + j] = sa * inv[j];
      }
      if (a < k) {
        let d = F[ra + a];
        for (let p = 0; p < a; p++) d -= F[ra + p] * F[ra + p];
        if (!(d > 0)) throw new NotPositiveDefiniteError(firstColumn + a);
        const root = Math.sqrt(d);
        F[ra + a] = root;
        inv[a] = 1 / root;
        logdet += 2 * Math.log(root);
      }
    }
  }
  return logdet;
}

/**
 * U = F22 − L21 L21ᵀ (lower triangle), written r×r row-major at out[at..]. Blocks of 4×2 entries
 * share loads: eight multiply-adds per six loads (about twice the speed of plain dot products).
 */
function schurUpdate(F: Float64Array, m: number, k: number, out: Float64Array, at: number): void {
  const r = m - k;
  let a = 0;
  for (; a + 3 < r; a += 4) {
    const r0 = (k + a) * m, r1 = r0 + m, r2 = r1 + m, r3 = r2 + m;
    const o0 = at + a * r, o1 = o0 + r, o2 = o1 + r, o3 = o2 + r;
    for (let b = 0; b <= a + 2; b += 2) {
      const rc = (k + b) * m, rd = rc + m;
      let s00 = 0, s01 = 0, s10 = 0, s11 = 0, s20 = 0, s21 = 0, s30 = 0, s31 = 0;
      for (let p = 0; p < k; p++) {
        const y0 = F[rc + p], y1 = F[rd + p];
        const x0 = F[r0 + p], x1 = F[r1 + p], x2 = F[r2 + p], x3 = F[r3 + p];
        s00 += x0 * y0; s01 += x0 * y1; s10 += x1 * y0; s11 += x1 * y1;
        s20 += x2 * y0; s21 += x2 * y1; s30 += x3 * y0; s31 += x3 * y1;
      }
      const c0 = k + b, c1 = c0 + 1;
      if (b < a) {
        out[o0 + b] = F[r0 + c0] - s00; out[o0 + b + 1] = F[r0 + c1] - s01;
        out[o1 + b] = F[r1 + c0] - s10; out[o1 + b + 1] = F[r1 + c1] - s11;
        out[o2 + b] = F[r2 + c0] - s20; out[o2 + b + 1] = F[r2 + c1] - s21;
        out[o3 + b] = F[r3 + c0] - s30; out[o3 + b + 1] = F[r3 + c1] - s31;
      } else if (b === a) {
        out[o0 + b] = F[r0 + c0] - s00;
        out[o1 + b] = F[r1 + c0] - s10; out[o1 + b + 1] = F[r1 + c1] - s11;
        out[o2 + b] = F[r2 + c0] - s20; out[o2 + b + 1] = F[r2 + c1] - s21;
        out[o3 + b] = F[r3 + c0] - s30; out[o3 + b + 1] = F[r3 + c1] - s31;
      } else {
        out[o2 + b] = F[r2 + c0] - s20;
        out[o3 + b] = F[r3 + c0] - s30; out[o3 + b + 1] = F[r3 + c1] - s31;
      }
    }
  }
  for (; a < r; a++) {
    const ra = (k + a) * m, oa = at + a * r;
    for (let b = 0; b <= a; b++) {
      const rc = (k + b) * m;
      let s = 0;
      for (let p = 0; p < k; p++) s += F[ra + p] * F[rc + p];
      out[oa + b] = F[ra + k + b] - s;
    }
  }
}
