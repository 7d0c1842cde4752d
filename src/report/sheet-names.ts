/**
 * Sheet names as Excel accepts them: at most 31 characters, none of [ ] : * ? / \, not starting or
 * ending with an apostrophe, not the reserved name "History", unique without regard to case
 * (Microsoft's rules for worksheet names).
 */
export const MAX_SHEET_NAME = 31;

export function cleanSheetName(name: string): string {
  // control characters and characters XML cannot carry have no place in a sheet's name
  let s = name.replace(/[\u0000-\u001F\u007F-\u009F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g, ' ');
  s = s.replace(/[[\]:*?/\\]/g, '').replace(/\s+/g, ' ').trim();
  s = s.replace(/^'+|'+$/g, '').trim();
  if (!s) s = 'Results';
  s = s.slice(0, MAX_SHEET_NAME);
  if (/[\uD800-\uDBFF]$/.test(s)) s = s.slice(0, -1); // never half of a character
  return s.trimEnd();
}

/** A cleaned name not yet in `taken` (lower-cased names); suffixes " (2)", " (3)"… and records the choice. */
export function uniqueSheetName(name: string, taken: Set<string>): string {
  const base = cleanSheetName(name);
  const free = (s: string) => !taken.has(s.toLowerCase()) && s.toLowerCase() !== 'history';
  let chosen = base;
  for (let k = 2; !free(chosen); k++) {
    const suffix = ` (${k})`;
    chosen = `${base.slice(0, MAX_SHEET_NAME - suffix.length).trimEnd()}${suffix}`;
  }
  taken.add(chosen.toLowerCase());
  return chosen;
}
