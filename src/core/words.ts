/**
 * How a p-value and a list read inside a sentence, and a sentence's first letter: one wording for
 * the suggestion (models), the messages (pipeline) and the sheets (report). Imports nothing.
 */

/** A p-value for a sentence: "p < 0.001", "p = 0.042", or "p not available". */
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

/** The text with its first letter in upper case (a label that starts a sentence). */
export function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
