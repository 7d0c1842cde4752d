// jstat ships no type declarations; this file is the one typed doorway to it.
// @ts-ignore -- untyped CommonJS module
import jstatModule from 'jstat';

interface JStat {
  gammaln(x: number): number;
  studentt: { cdf(x: number, df: number): number };
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

/**
 * Upper-tail p of an F statistic, taken directly rather than as 1 − cdf (which loses every digit
 * below about 1e-16): P(F > f) = I_x(df2/2, df1/2) with x = df2/(df2 + df1·f), the regularised
 * incomplete beta (Abramowitz & Stegun 26.6.2).
 */
export function fUpper(f: number, df1: number, df2: number): number {
  if (Number.isNaN(f)) return NaN;
  if (f <= 0) return 1;
  if (f === Infinity) return 0;
  return Math.min(1, Math.max(0, regularizedBeta(df2 / (df2 + df1 * f), df2 / 2, df1 / 2)));
}

/**
 * I_x(a, b) by Lentz's continued fraction (Press et al., Numerical Recipes §6.4), on the side where
 * it converges fast (x < (a + 1)/(a + b + 2), else 1 − I_{1−x}(b, a)). Written here because jStat's
 * ibeta stops its continued fraction at 3e-7 relative, i.e. about seven digits.
 */
function regularizedBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const logFront = jStat.gammaln(a + b) - jStat.gammaln(a) - jStat.gammaln(b) + a * Math.log(x) + b * Math.log1p(-x);
  if (x < (a + 1) / (a + b + 2)) return (Math.exp(logFront) * betaFraction(x, a, b)) / a;
  return 1 - (Math.exp(logFront) * betaFraction(1 - x, b, a)) / b;
}

function betaFraction(x: number, a: number, b: number): number {
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 10_000; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a - 1 + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + 1 + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return h;
}
