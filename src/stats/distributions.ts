// jstat ships no type declarations; this file is the one typed doorway to it.
// @ts-ignore -- untyped CommonJS module
import jstatModule from 'jstat';

interface JStat {
  gammaln(x: number): number;
  studentt: { cdf(x: number, df: number): number };
  centralF: { cdf(x: number, df1: number, df2: number): number };
}
const jStat = jstatModule as unknown as JStat;

/** Two-sided p of a Student t statistic. */
export function studentTwoSided(t: number, df: number): number {
  if (!Number.isFinite(t)) return Number.isNaN(t) ? NaN : 0;
  return Math.min(1, 2 * jStat.studentt.cdf(-Math.abs(t), df));
}

/** Two-sided p of a standard normal statistic: P(|Z| > z) = Q(½, z²/2). */
export function normalTwoSided(z: number): number {
  if (!Number.isFinite(z)) return Number.isNaN(z) ? NaN : 0;
  return upperRegularizedGamma(0.5, (z * z) / 2);
}

/** Upper-tail p of a chi-square statistic: Q(df/2, x/2). */
export function chiSquareUpper(x: number, df: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x <= 0) return 1;
  return upperRegularizedGamma(df / 2, x / 2);
}

/**
 * Q(a, x) = Γ(a, x)/Γ(a): series for x < a + 1, Lentz's continued fraction otherwise (Press et al.,
 * Numerical Recipes §6.2). Written here because jstat's normal and chi-square tails are computed as
 * 1 − cdf (or through an erfc that underflows), which returns 0 for p below about 1e-16; this keeps
 * full relative accuracy in the far tail, where the reported p-values of strong effects live.
 */
function upperRegularizedGamma(a: number, x: number): number {
  if (x <= 0) return 1;
  const logPrefactor = -x + a * Math.log(x) - jStat.gammaln(a);
  if (x < a + 1) {
    let ap = a;
    let term = 1 / a;
    let sum = term;
    for (let i = 0; i < 10_000; i++) {
      ap += 1;
      term *= x / ap;
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-16) break;
    }
    return Math.max(0, 1 - sum * Math.exp(logPrefactor));
  }
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 10_000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return Math.exp(logPrefactor) * h;
}

/** Upper-tail p of an F statistic. */
export function fUpper(f: number, df1: number, df2: number): number {
  if (Number.isNaN(f)) return NaN;
  if (f <= 0) return 1;
  return Math.max(0, 1 - jStat.centralF.cdf(f, df1, df2));
}
