import type { Cell } from './types.js';
import { MODELS, type ModelKey } from '../models/index.js';

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
  either: 'Either spatial model (the tests do not separate them)',
} as const;

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

/** A p-value for a sentence. */
export function sayP(p: number): string {
  if (!Number.isFinite(p)) return 'p not available';
  if (p < 0.001) return 'p < 0.001';
  return `p = ${p.toFixed(3)}`;
}

/** "a, b and c" */
export function sayList(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/** The question one run answers. */
export function question(y: string, x: readonly string[]): string {
  return `${y} explained by ${x.join(', ')}`;
}

/** Yes/no in words rather than a spreadsheet's TRUE/FALSE. */
export function yesNo(b: boolean | undefined): string {
  return b ? 'yes' : 'no';
}
