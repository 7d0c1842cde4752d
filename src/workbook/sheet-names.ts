/**
 * Sheet names as Excel accepts them: at most 31 characters, none of [ ] : * ? / \, not starting or
 * ending with an apostrophe, not the reserved name "History", unique without regard to case
 * (Microsoft's rules for worksheet names).
 */
export const MAX_SHEET_NAME = 31;

export function cleanSheetName(name: string): string {
  let s = name.replace(/[[\]:*?/\\]/g, '').replace(/\s+/g, ' ').trim();
  s = s.replace(/^'+|'+$/g, '').trim();
  if (!s) s = 'Results';
  return s.slice(0, MAX_SHEET_NAME).trimEnd();
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
