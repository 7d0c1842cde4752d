import type { CsrMatrix } from '../linalg/index.js';
import {
  controlMultipleTests, getisOrd, localMoranCategories, localMoranTest, PERMUTATION_RULE,
  type LocalCategory, type LocalStatistic, type LocalStatisticKind, type MultipleTestingControl,
} from '../stats/index.js';
import { InputError } from '../errors.js';
import { formatCount } from '../core/count.js';

/** What the user asked for under "where is the pattern?". */
export interface LocalRequest {
  statistics: LocalStatisticKind[];
  /** 'outcome' (default), 'residuals' (of the plain regression) or a column of the table */
  of?: string;
  control?: MultipleTestingControl;
  /** conditional permutations per area (default 999; 0 for analytic p only) */
  permutations?: number;
}

export const LOCAL_STATISTICS: readonly LocalStatisticKind[] = ['moran', 'gi', 'gistar'];
export const DEFAULT_LOCAL_PERMUTATIONS = 999;
export const MAX_LOCAL_PERMUTATIONS = 99_999;

/** One local statistic with the decisions drawn from it. */
export interface LocalOutcome extends LocalStatistic {
  /** which p-values the decisions rest on */
  decidedOn: 'permutation' | 'analytic';
  /** the p-values after adjustment for multiple testing (Benjamini–Hochberg or Bonferroni; equal to p for none) */
  adjusted: Float64Array;
  significant: boolean[];
  /** local Moran only */
  categories?: LocalCategory[];
  /** areas judged significant without any multiple-testing control (for the labelled uncontrolled view) */
  significantUncontrolled: boolean[];
  /** the decisions under each control at the run's level, the chosen one among them, so the sheet can set them side by side */
  significantUnder: Record<MultipleTestingControl['method'], boolean[]>;
  tests: number;
}

export interface LocalPatterns {
  /** the variable as the user named it ("CRIME", "residuals of the plain regression") */
  variable: string;
  of: string;
  permutations: number;
  seed: number;
  permutationRule: string;
  control: MultipleTestingControl;
  results: Partial<Record<LocalStatisticKind, LocalOutcome>>;
}

/** The request's choice checked and filled in with defaults; names the option at fault. */
export function normaliseLocalRequest(r: LocalRequest): Required<LocalRequest> {
  if (r.statistics.length === 0) throw new InputError('No local statistic was named: choose from moran, gi, gistar.');
  for (const s of r.statistics) {
    if (!LOCAL_STATISTICS.includes(s)) throw new InputError(`Unknown local statistic "${s}": choose from moran, gi, gistar.`);
  }
  const control = r.control ?? { method: 'fdr', level: 0.05 };
  if (!['fdr', 'bonferroni', 'none'].includes(control.method)) throw new InputError(`Unknown multiple-testing control "${control.method}": choose fdr, bonferroni or none.`);
  if (!(control.level > 0 && control.level < 1)) throw new InputError(`The significance level for local tests must lie between 0 and 1; got ${control.level}.`);
  const permutations = r.permutations ?? DEFAULT_LOCAL_PERMUTATIONS;
  if (!Number.isInteger(permutations) || permutations < 0 || permutations > MAX_LOCAL_PERMUTATIONS) {
    throw new InputError(`The number of permutations for local tests must be a whole number from 0 to ${formatCount(MAX_LOCAL_PERMUTATIONS)}; got ${permutations}.`);
  }
  return { statistics: [...new Set(r.statistics)], of: r.of?.trim() || 'outcome', control, permutations };
}

/**
 * Every asked-for local statistic of one variable, with permutation inference, the multiple-testing
 * decisions and, for local Moran, where each significant area sits. Decisions rest on the permutation
 * p-values when permutations were drawn, else on the analytic ones.
 */
export function localPatterns(
  request: Required<LocalRequest>,
  values: Float64Array,
  variable: string,
  w: CsrMatrix,
  seed: number,
  where: { ids: string[]; rows: number[] },
  onProgress?: (fraction: number) => void,
): LocalPatterns {
  if (request.statistics.some((k) => k !== 'moran')) {
    const bad = values.findIndex((v) => !(v >= 0));
    if (bad >= 0) {
      throw new InputError(
        `Getis–Ord statistics need values of zero or more, but ${variable} is ${values[bad]} for area ${where.ids[bad]} (row ${where.rows[bad]}). ` +
        'They measure a share of a total, so use a count, a rate or another non-negative measure; for residuals or other signed values use local Moran (moran).',
      );
    }
  }
  const results: LocalPatterns['results'] = {};
  const count = request.statistics.length;
  request.statistics.forEach((kind, index) => {
    const progress = onProgress ? (done: number, total: number) => onProgress((index + done / total) / count) : undefined;
    const opts = { permutations: request.permutations, seed, onProgress: progress };
    const stat = kind === 'moran' ? localMoranTest(values, w, opts) : getisOrd(values, w, { ...opts, star: kind === 'gistar' });
    const decidedOn = stat.pPermutation ? 'permutation' : 'analytic';
    const p = stat.pPermutation ?? stat.p;
    const controlled = controlMultipleTests(p, request.control);
    const under = (method: MultipleTestingControl['method']) =>
      method === request.control.method ? controlled.significant : controlMultipleTests(p, { method, level: request.control.level }).significant;
    const significantUnder = { fdr: under('fdr'), bonferroni: under('bonferroni'), none: under('none') };
    results[kind] = {
      ...stat,
      decidedOn,
      adjusted: controlled.adjusted,
      significant: controlled.significant,
      significantUncontrolled: significantUnder.none,
      significantUnder,
      tests: controlled.tests,
      ...(kind === 'moran' ? { categories: localMoranCategories(values, w, controlled.significant) } : {}),
    };
  });
  return {
    variable, of: request.of, permutations: request.permutations, seed,
    permutationRule: PERMUTATION_RULE, control: request.control, results,
  };
}

/** The categories in words (ours): an area's own value, then its neighbours'. */
export const LOCAL_CATEGORY_LABEL: Record<LocalCategory, string> = {
  'high-high': 'high among high',
  'low-low': 'low among low',
  'high-low': 'high among low',
  'low-high': 'low among high',
  'not-significant': 'not significant',
  'no-neighbours': 'no neighbours',
};

/** The statistics by name, for headings. */
export const LOCAL_STATISTIC_LABEL: Record<LocalStatisticKind, string> = {
  moran: "Local Moran's I",
  gi: 'Getis–Ord Gi (area left out)',
  gistar: 'Getis–Ord Gi* (area included)',
};

/** The control in words, for headings and notes. */
export function describeControl(c: MultipleTestingControl): string {
  if (c.method === 'fdr') return `false discovery rate held at ${c.level} by the Benjamini–Hochberg rule`;
  if (c.method === 'bonferroni') return `chance of any false finding held at ${c.level} by the Bonferroni rule`;
  return `each area tested on its own at ${c.level}, with no allowance for the number of tests`;
}

/** The controls in a few words each, for the table that sets their counts side by side. */
export const CONTROL_LABEL: Record<MultipleTestingControl['method'], string> = {
  fdr: 'False discovery rate (Benjamini–Hochberg)',
  bonferroni: 'Any false finding (Bonferroni)',
  none: 'No control: each area on its own (uncontrolled)',
};

/** Counts per category (local Moran), for the summary table and the reading. */
export function categoryCounts(categories: readonly LocalCategory[]): Record<LocalCategory, number> {
  const out: Record<LocalCategory, number> = { 'high-high': 0, 'low-low': 0, 'high-low': 0, 'low-high': 0, 'not-significant': 0, 'no-neighbours': 0 };
  for (const c of categories) out[c]++;
  return out;
}
