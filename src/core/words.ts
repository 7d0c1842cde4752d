/**
 * How a p-value, a list and a file size read inside a sentence, and a sentence's first letter: one
 * wording for the suggestion (models), the messages (geo, pipeline, cli) and the sheets (report).
 * Imports nothing.
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

/** A size in bytes for a message: "17 bytes", "4 KiB", "1.46 MiB", "2 GiB" (binary units, at most two decimals). */
export function formatBytes(n: number): string {
  if (n >= 2 ** 30) return `${+(n / 2 ** 30).toFixed(2)} GiB`;
  if (n >= 2 ** 20) return `${+(n / 2 ** 20).toFixed(2)} MiB`;
  if (n >= 2 ** 10) return `${+(n / 2 ** 10).toFixed(2)} KiB`;
  return `${n} bytes`;
}
