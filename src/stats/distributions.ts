// jstat ships no type declarations; this file is the one typed doorway to it.
// @ts-ignore -- untyped CommonJS module
import jstatModule from 'jstat';

interface JStat {
  studentt: { cdf(x: number, df: number): number };
  normal: { cdf(x: number, mean: number, sd: number): number };
  chisquare: { cdf(x: number, df: number): number };
  centralF: { cdf(x: number, df1: number, df2: number): number };
}
const jStat = jstatModule as unknown as JStat;

/** Two-sided p of a Student t statistic. */
export function studentTwoSided(t: number, df: number): number {
  if (!Number.isFinite(t)) return Number.isNaN(t) ? NaN : 0;
  return Math.min(1, 2 * jStat.studentt.cdf(-Math.abs(t), df));
}

/** Two-sided p of a standard normal statistic, computed from the upper tail for accuracy. */
export function normalTwoSided(z: number): number {
  if (!Number.isFinite(z)) return Number.isNaN(z) ? NaN : 0;
  return 2 * jStat.normal.cdf(-Math.abs(z), 0, 1);
}

/** Upper-tail p of a chi-square statistic. */
export function chiSquareUpper(x: number, df: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x <= 0) return 1;
  return Math.max(0, 1 - jStat.chisquare.cdf(x, df));
}

/** Upper-tail p of an F statistic. */
export function fUpper(f: number, df1: number, df2: number): number {
  if (Number.isNaN(f)) return NaN;
  if (f <= 0) return 1;
  return Math.max(0, 1 - jStat.centralF.cdf(f, df1, df2));
}
