import type { Cell } from './types.js';
import { MODELS, type ModelKey } from '../models/index.js';
import type { Recommendation } from '../models/types.js';
import { sayList } from '../core/words.js';

/** A number cell, or empty when the value is not finite (a host cannot store NaN). */
export function num(x: number | undefined | null): Cell {
  return typeof x === 'number' && Number.isFinite(x) ? x : null;
}

/** Each model's plain label, by registry key. */
export const MODEL_LABEL = Object.fromEntries(MODELS.map((m) => [m.key, m.label])) as Record<ModelKey, string>;

/** The suggested model in words. */
export const CHOICE_LABEL = {
  lag: MODEL_LABEL.lag,
  error: MODEL_LABEL.error,
  ols: `${MODEL_LABEL.ols} (no spatial model needed)`,
  either: 'Not separated by the tests: report both spatial models',
} as const;

/** The suggestion in a few words, saying when it is borderline and what was not fitted. */
export function suggestionLabel(r: Recommendation): string {
  const models = r.models.map((m) => `the ${MODEL_LABEL[m].toLowerCase()}`);
  let s = r.borderline ? `Borderline: report ${sayList(models)}` : CHOICE_LABEL[r.choice];
  if (r.bothKinds && !r.borderline) s += '; a model with both a lag and an error term is worth considering';
  if (!r.fitted) s += ` (${sayList(r.notFitted.map((m) => MODEL_LABEL[m].toLowerCase()))} not fitted in this run)`;
  return s;
}

/** Our evidence marks (no star codes): defined in the note under each coefficient table. */
export const STRONG_MARK = '●';
export const SOME_MARK = '○';
export const STRONG_LEVEL = 0.01;
export const SOME_LEVEL = 0.05;

export function evidenceMark(p: number): string {
  if (!Number.isFinite(p)) return '';
  if (p < STRONG_LEVEL) return STRONG_MARK;
  if (p < SOME_LEVEL) return SOME_MARK;
  return '';
}

export const MARK_NOTE =
  `${STRONG_MARK} strong evidence that the value differs from zero (p below ${STRONG_LEVEL}); ` +
  `${SOME_MARK} some evidence (p below ${SOME_LEVEL}); blank: the data are consistent with zero at these levels.`;

/** A number for a sentence: about three significant digits, no exponent for everyday sizes. */
export function say(x: number): string {
  if (!Number.isFinite(x)) return 'not available';
  const a = Math.abs(x);
  let s: string;
  if (a === 0) s = '0';
  else if (a >= 1e6 || a < 1e-4) s = x.toExponential(2);
  else if (a >= 100) s = x.toFixed(1);
  else if (a >= 1) s = x.toFixed(2);
  else s = x.toPrecision(3);
  return s.replace('-', '−');
}

/** A p-value and a list for a sentence: the one wording below every stage (src/core/words.ts). */
export { sayP, sayList } from '../core/words.js';

/** The question one run answers. */
export function question(y: string, x: readonly string[]): string {
  return `${y} explained by ${x.join(', ')}`;
}

/** Yes/no in words rather than a spreadsheet's TRUE/FALSE. */
export function yesNo(b: boolean | undefined): string {
  return b ? 'yes' : 'no';
}
