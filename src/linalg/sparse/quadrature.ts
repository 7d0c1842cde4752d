/**
 * Stochastic Lanczos quadrature (Golub & Meurant 1994, "Matrices, moments and quadrature"; Ubaru,
 * Chen & Saad 2017, "Fast estimation of tr(f(A)) via stochastic Lanczos quadrature", SIAM J. Matrix
 * Anal. Appl. 38): for a symmetric S and a seeded Rademacher probe z (‖z‖² = n), m Lanczos steps
 * from z/√n give a tridiagonal T with eigenvalues θ_j and first eigenvector components τ_j, and
 *   zᵀ f(S) z ≈ n Σ_j τ_j² f(θ_j),
 * an m-point Gauss quadrature, exact for polynomials of degree ≤ 2m − 1. Averaged over p probes this
 * estimates tr f(S) (Hutchinson 1990) with the standard error of the probe mean. One set of nodes
 * serves every f and every ρ: ln|I − ρS| (a cheap log-determinant used only to bracket the maximum
 * of a likelihood — there one probe suffices: the Lanczos run already made for the admissible
 * range, whose random unit start v gives n·vᵀf(S)v), tr(I − ρS)⁻¹ (impact simulations) and tr(Sᵏ)
 * (series).
 * The small tridiagonal eigenproblems go to ml-matrix; the Lanczos recurrence is written here
 * (without reorthogonalisation: lost orthogonality only duplicates converged Ritz values, and the
 * quadrature stays accurate — Greenbaum 1989).
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { csrMultiply, type CsrMatrix } from '../csr.js';
import { meanAndError, rademacher, seededRandom } from '../random.js';

export interface QuadratureOptions {
  probes?: number;
  steps?: number;
  seed?: number;
}

export class LanczosQuadrature {
  readonly probes: number;
  readonly steps: number;
  readonly seed: number;
  readonly n: number;
  /** per probe: nodes θ and weights n·τ² (weights of one probe sum to n) */
  private readonly nodes: Float64Array[] = [];
  private readonly weights: Float64Array[] = [];

  /** From a Lanczos run already made (one probe: its start vector), e.g. the one behind the range. */
  static fromTridiagonal(n: number, alpha: Float64Array, beta: Float64Array, steps: number, seed: number): LanczosQuadrature {
    return new LanczosQuadrature(null, { probes: 1, steps, seed }, { n, alpha, beta });
  }

  constructor(s: CsrMatrix | null, opts: QuadratureOptions = {}, given?: { n: number; alpha: Float64Array; beta: Float64Array }) {
    const n = s ? s.n : given!.n;
    this.n = n;
    this.probes = opts.probes ?? 24;
    this.steps = Math.min(opts.steps ?? 40, n);
    this.seed = opts.seed ?? 20240601;
    if (!s) {
      const { theta, tau2 } = tridiagonalQuadrature(given!.alpha, given!.beta, this.steps);
      for (let j = 0; j < theta.length; j++) tau2[j] *= n;
      this.nodes.push(theta);
      this.weights.push(tau2);
      return;
    }
    const uniform = seededRandom(this.seed);
    const z = new Float64Array(n);
    let v = new Float64Array(n), prev = new Float64Array(n), w = new Float64Array(n);
    const alpha = new Float64Array(this.steps), beta = new Float64Array(this.steps);
    const scale = 1 / Math.sqrt(n);
    for (let q = 0; q < this.probes; q++) {
      rademacher(z, uniform);
      for (let i = 0; i < n; i++) v[i] = z[i] * scale;
      prev.fill(0);
      let used = 0;
      for (let j = 0; j < this.steps; j++) {
        csrMultiply(s, v, w);
        let a = 0;
        for (let i = 0; i < n; i++) a += w[i] * v[i];
        alpha[j] = a;
        used = j + 1;
        const bPrev = j > 0 ? beta[j - 1] : 0;
        let norm = 0;
        for (let i = 0; i < n; i++) {
          const x = w[i] - a * v[i] - bPrev * prev[i];
          w[i] = x;
          norm += x * x;
        }
        const b = Math.sqrt(norm);
        beta[j] = b;
        if (b < 1e-12) break; // invariant subspace: the quadrature is exact for this probe
        const t = prev; prev = v; v = t;
        for (let i = 0; i < n; i++) v[i] = w[i] / b;
      }
      const { theta, tau2 } = tridiagonalQuadrature(alpha, beta, used);
      for (let j = 0; j < used; j++) tau2[j] *= n;
      this.nodes.push(theta);
      this.weights.push(tau2);
    }
  }

  /** Estimate of tr f(S) with the standard error of the probe mean. */
  trace(f: (theta: number) => number): { value: number; se: number } {
    const per = new Float64Array(this.probes);
    for (let q = 0; q < this.probes; q++) {
      const th = this.nodes[q], wt = this.weights[q];
      let s = 0;
      for (let j = 0; j < th.length; j++) s += wt[j] * f(th[j]);
      per[q] = s;
    }
    const me = meanAndError(per);
    return { value: me.mean, se: me.se };
  }

  /** ln|I − ρS| ≈ tr ln(I − ρS). */
  logdet(rho: number): number {
    let total = 0;
    for (let q = 0; q < this.probes; q++) {
      const th = this.nodes[q], wt = this.weights[q];
      let s = 0;
      for (let j = 0; j < th.length; j++) s += wt[j] * Math.log(1 - rho * th[j]);
      total += s;
    }
    return total / this.probes;
  }

  /** tr (I − ρS)⁻¹. */
  traceInverse(rho: number): number {
    let total = 0;
    for (let q = 0; q < this.probes; q++) {
      const th = this.nodes[q], wt = this.weights[q];
      let s = 0;
      for (let j = 0; j < th.length; j++) s += wt[j] / (1 - rho * th[j]);
      total += s;
    }
    return total / this.probes;
  }

  /** tr(Sᵏ), k = 1..count (index 0 holds k = 1), with standard errors. */
  powerTraces(count: number): { traces: Float64Array; errors: Float64Array } {
    const per = new Float64Array(this.probes * count);
    for (let q = 0; q < this.probes; q++) {
      const th = this.nodes[q], wt = this.weights[q];
      for (let j = 0; j < th.length; j++) {
        let power = 1;
        const t = th[j], c = wt[j];
        for (let k = 0; k < count; k++) { power *= t; per[q * count + k] += c * power; }
      }
    }
    const traces = new Float64Array(count), errors = new Float64Array(count);
    const column = new Float64Array(this.probes);
    for (let k = 0; k < count; k++) {
      for (let q = 0; q < this.probes; q++) column[q] = per[q * count + k];
      const me = meanAndError(column);
      traces[k] = me.mean;
      errors[k] = me.se;
    }
    return { traces, errors };
  }

  describe(): string {
    if (this.probes === 1) return `stochastic Lanczos quadrature, one random start × ${this.steps} Lanczos steps (seed ${this.seed})`;
    return `stochastic Lanczos quadrature, ${this.probes} Rademacher probes × ${this.steps} Lanczos steps (seed ${this.seed})`;
  }
}

/** Eigenvalues of the j×j tridiagonal (alpha, beta) and the squared first components of its eigenvectors. */
function tridiagonalQuadrature(alpha: Float64Array, beta: Float64Array, j: number): { theta: Float64Array; tau2: Float64Array } {
  const rows: number[][] = [];
  for (let r = 0; r < j; r++) {
    const row = new Array<number>(j).fill(0);
    row[r] = alpha[r];
    if (r > 0) row[r - 1] = beta[r - 1];
    if (r + 1 < j) row[r + 1] = beta[r];
    rows.push(row);
  }
  const evd = new EigenvalueDecomposition(new Matrix(rows), { assumeSymmetric: true });
  const theta = Float64Array.from(evd.realEigenvalues);
  const vectors = evd.eigenvectorMatrix;
  const tau2 = new Float64Array(j);
  let sum = 0;
  for (let c = 0; c < j; c++) { const t = vectors.get(0, c); tau2[c] = t * t; sum += tau2[c]; }
  for (let c = 0; c < j; c++) tau2[c] /= sum; // columns are unit vectors; guard rounding
  return { theta, tau2 };
}
