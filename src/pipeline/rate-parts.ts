/**
 * Does an explanatory column hold one of the counts the outcome is made from? A rate explained by its
 * own numerator or denominator is explained by construction, not by anything about the areas. Found
 * two ways: by the values (outcome = K × a / b in nearly every row, K a power of ten, with the
 * column as a or b) or, failing that, by the names (an outcome named as a rate and a count column
 * sharing its subject word). Pure; every run adds the findings to its warnings (`prepare.ts`), and the
 * sidebar shows them as soon as the columns are ticked.
 */
import { formatCount } from '../core/count.js';

export interface RatePart {
  column: string;
  /** what the values show; 'either' when only the names point to it */
  role: 'numerator' | 'denominator' | 'either';
  /** the evidence in words, e.g. "birth_rate = 1000 × births / population in 98 of 100 rows" */
  evidence: string;
}

/** Words that mark a column as a rate or share (checked as whole words of the name). */
const RATE_WORDS = new Set(['rate', 'rates', 'ratio', 'pct', 'percent', 'percentage', 'per', 'prop', 'proportion', 'share', 'incidence', 'prevalence', 'risk', 'smr']);
/** Words too general to tie two names together. */
const GENERAL_WORDS = new Set([...RATE_WORDS, 'total', 'all', 'count', 'counts', 'number', 'num', 'n', 'of', 'the', 'and', 'in', 'by', 'avg', 'mean', 'adj', 'adjusted', 'crude', 'est', 'estimate']);
/** Share of rows that must fit the formula. */
const FIT_SHARE = 0.9;
const MIN_ROWS = 5;

const asNumber = (c: unknown): number => {
  if (typeof c === 'number') return c;
  if (typeof c === 'string' && c.trim() !== '') return Number(c);
  return NaN;
};

/** "birthRate_1000" → ["birth", "rate", "1000"], lower case. */
export function nameWords(name: string): string[] {
  return name
    .replace(/([a-z])([A-Z])/g, '$1 $2')
    .replace(/([A-Za-z])(\d)/g, '$1 $2')
    .toLowerCase()
    .split(/[^a-z0-9]+/)
    .filter(Boolean);
}

/** Decimal places of a number as written (what a rounded rate was rounded to). */
function decimals(v: unknown): number {
  const text = typeof v === 'number' ? String(v) : typeof v === 'string' ? v.trim() : '';
  if (/e/i.test(text)) return 15;
  const dot = text.indexOf('.');
  return dot < 0 ? 0 : text.length - dot - 1;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** The power of ten K (1, 100, 1000, …) within 1 % of k, or undefined. */
function powerOfTen(k: number): number | undefined {
  if (!(k > 0)) return undefined;
  const e = Math.round(Math.log10(k));
  const p = Math.pow(10, e);
  return Math.abs(k / p - 1) <= 0.01 && e >= 0 && e <= 6 ? p : undefined;
}

/**
 * How many rows fit y = K × num / den (rows where any of the three is missing, or den ≤ 0, are left
 * out). A row fits when it is within 2 % of the formula or within half a unit of the outcome's last
 * written decimal (rates are often rounded).
 */
function formulaFit(y: number[], yDecimals: number[], num: number[], den: number[]): { k: number; fit: number; rows: number } | undefined {
  const ratios: number[] = [];
  const used: number[] = [];
  for (let i = 0; i < y.length; i++) {
    if (!Number.isFinite(y[i]) || !Number.isFinite(num[i]) || !Number.isFinite(den[i]) || den[i] <= 0 || num[i] < 0) continue;
    used.push(i);
    if (num[i] > 0 && y[i] > 0) ratios.push((y[i] * den[i]) / num[i]);
  }
  if (used.length < MIN_ROWS || ratios.length < MIN_ROWS) return undefined;
  const k = powerOfTen(median(ratios));
  if (k === undefined) return undefined;
  let fit = 0;
  for (const i of used) {
    const expected = (k * num[i]) / den[i];
    const slack = 0.02 * Math.abs(expected) + 0.5 * Math.pow(10, -yDecimals[i]) * 1.0001;
    if (Math.abs(y[i] - expected) <= slack) fit++;
  }
  return { k, fit, rows: used.length };
}

/** A table's columns by name: the cells of one column (numbers, texts or blanks), or undefined when there is no such column. */
export type ColumnReader = (name: string) => readonly unknown[] | undefined;

/**
 * Explanatory candidates that look like the outcome's numerator or denominator, in candidates' order.
 * `numericColumns`: the columns of numbers that may be the other count of the rate.
 */
export function rateParts(column: ColumnReader, outcome: string, candidates: readonly string[], numericColumns: readonly string[]): RatePart[] {
  const cells = column(outcome);
  if (!cells) return [];
  const values = (cs: readonly unknown[]) => cs.map(asNumber);
  const y = values(cells);
  const yDecimals = cells.map(decimals);
  const byName = new Map<string, number[]>();
  for (const c of numericColumns) {
    if (c === outcome || byName.has(c)) continue;
    const cs = column(c);
    if (cs) byName.set(c, values(cs));
  }
  const others = [...byName.keys()];
  const found: RatePart[] = [];
  const times = (k: number) => (k === 1 ? '' : `${k} × `);

  for (const c of candidates) {
    const own = byName.get(c);
    if (!own) continue;
    let part: RatePart | undefined;
    for (const d of others) {
      if (d === c) continue;
      const other = byName.get(d)!;
      const asNumerator = formulaFit(y, yDecimals, own, other);
      if (asNumerator && asNumerator.fit >= FIT_SHARE * asNumerator.rows) {
        part = { column: c, role: 'numerator', evidence: `${outcome} = ${times(asNumerator.k)}${c} / ${d} in ${formatCount(asNumerator.fit)} of ${formatCount(asNumerator.rows)} rows` };
        break;
      }
      const asDenominator = formulaFit(y, yDecimals, other, own);
      if (asDenominator && asDenominator.fit >= FIT_SHARE * asDenominator.rows) {
        part = { column: c, role: 'denominator', evidence: `${outcome} = ${times(asDenominator.k)}${d} / ${c} in ${formatCount(asDenominator.fit)} of ${formatCount(asDenominator.rows)} rows` };
        break;
      }
    }
    part ??= byNames(outcome, c, own);
    if (part) found.push(part);
  }
  return found;
}

/** The names alone: the outcome is named as a rate, the column holds counts and shares its subject word. */
function byNames(outcome: string, column: string, values: number[]): RatePart | undefined {
  const yWords = nameWords(outcome);
  if (!yWords.some((w) => RATE_WORDS.has(w))) return undefined;
  const present = values.filter((v) => Number.isFinite(v));
  if (present.length === 0 || !present.every((v) => v >= 0 && Number.isInteger(v))) return undefined;
  const subject = (w: string) => w.length >= 3 && !GENERAL_WORDS.has(w) && !/^\d+$/.test(w);
  const shared = nameWords(column).filter(subject).find((w) => yWords.filter(subject).some((v) => v === w || (v.startsWith(w) || w.startsWith(v))));
  if (!shared) return undefined;
  return { column, role: 'either', evidence: `${outcome} is named as a rate and ${column} is a count of the same thing ("${shared}")` };
}

/** For a rate built from two columns (the sidebar's rate builder, the command line's --rate), the ticked columns that are its own counts: known, not guessed. */
export function builtRateParts(recipe: { name: string; events: string; population: string; per: number }, ticked: readonly string[]): RatePart[] {
  const made = `${recipe.name} is built as ${recipe.events} per ${formatCount(recipe.per)} ${recipe.population}`;
  return ticked.flatMap((c): RatePart[] =>
    c === recipe.events ? [{ column: c, role: 'numerator', evidence: made }]
      : c === recipe.population ? [{ column: c, role: 'denominator', evidence: made }] : []);
}

/** The warning every front end shows for one finding. */
export function ratePartWarning(part: RatePart, outcome: string): string {
  const role = part.role === 'numerator' ? 'the numerator of' : part.role === 'denominator' ? 'the denominator of' : 'the numerator or denominator of';
  return `${part.column} looks like ${role} the rate ${outcome} (${part.evidence}). ` +
    `Explaining a rate by its own counts explains it by construction, not by anything about the areas; leave ${part.column} out unless that is what you mean.`;
}
