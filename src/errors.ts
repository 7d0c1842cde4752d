/**
 * The one error type for bad input. Its message is written for the analyst: it names the file,
 * row, column or feature at fault and says what to do. The CLI and the add-in print the message
 * only, never a stack trace.
 */
export interface InputLocation {
  file?: string;
  /** 1-based row as the user sees it in the table (header = row 1). */
  row?: number;
  column?: string;
  /** 1-based feature number in the boundary file, or its ID. */
  feature?: number | string;
}

export class InputError extends Error {
  readonly where: InputLocation;
  constructor(message: string, where: InputLocation = {}) {
    super(message);
    this.name = 'InputError';
    this.where = where;
  }
}

/** Lists at most `max` items and says how many more there are, for messages that name rows. */
export function listSome(items: readonly (string | number)[], max = 10): string {
  const shown = items.slice(0, max).join(', ');
  return items.length > max ? `${shown} and ${items.length - max} more` : shown;
}

/**
 * The name among `candidates` the user most likely meant by `name`: the same letters in another case
 * (or with spaces, dashes and underscores differing), else the one closest by edit distance when it
 * is close enough for the name's length (one edit up to 4 characters, two up to 8, three beyond) and
 * no other candidate is as close. Undefined when nothing is near.
 */
export function nearestName(name: string, candidates: readonly string[]): string | undefined {
  const fold = (s: string) => s.toLowerCase();
  const squash = (s: string) => s.toLowerCase().replace(/[\s_\-.]+/g, '');
  const others = candidates.filter((c) => c !== name);
  const sameFold = others.filter((c) => fold(c) === fold(name));
  if (sameFold.length) return sameFold[0];
  const sameSquash = others.filter((c) => squash(c) === squash(name) && squash(c) !== '');
  if (sameSquash.length) return sameSquash[0];
  const limit = name.length <= 4 ? 1 : name.length <= 8 ? 2 : 3;
  let best: string | undefined, bestD = Infinity, tie = false;
  for (const c of others) {
    const d = editDistance(fold(name), fold(c));
    if (d < bestD) { best = c; bestD = d; tie = false; } else if (d === bestD) tie = true;
  }
  return best !== undefined && bestD <= limit && !tie ? best : undefined;
}

/** Levenshtein distance (insertions, deletions, substitutions), two rows of the usual table. */
export function editDistance(a: string, b: string): number {
  if (a === b) return 0;
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    for (let j = 1; j <= b.length; j++) cur[j] = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1));
    prev = cur;
  }
  return prev[b.length];
}

/**
 * Text safe to show on a terminal or a screen: every control character (C0 except line feed and
 * tab, DEL, C1), the bidirectional marks, overrides and isolates, zero-width characters, the
 * non-characters U+FFFE/U+FFFF and lone surrogates are written as \u{…} escapes, so a value read from
 * a file can never move the cursor, retitle the window, clear the screen, reorder the text around it,
 * fake a line of its own or hide why two IDs differ. The command line's message printer and the
 * add-in's message bars both pass every message through it.
 */
export function printable(text: string, escape: (hex: string) => string = (hex) => `\\u{${hex}}`): string {
  return text.replace(UNPRINTABLE_ALL, (c) => escape(c.codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')));
}

const UNPRINTABLE_ALL = /[\u0000-\u0008\u000B-\u001F\u007F-\u009F\u200B-\u200F\u202A-\u202E\u2060-\u2069\uFEFF\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g;

/**
 * A character that is not text in a value that must be written to a workbook and matched: a control
 * character (including tab and line breaks inside the value), U+FFFE/U+FFFF (not allowed in XML) or a
 * lone surrogate. IDs holding one are refused by name.
 */
export const NOT_TEXT = /[\u0000-\u001F\u007F-\u009F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** "U+0001" for the first character of `text` that NOT_TEXT matches. */
export function firstNotText(text: string): string | null {
  const m = NOT_TEXT.exec(text);
  return m ? `U+${m[0].codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')}` : null;
}
