/**
 * Checks on ID values beyond matching: IDs holding characters that are not text are refused by row
 * (they cannot be written to a workbook's XML, and invisible ones make IDs that look alike differ),
 * and IDs that match only when letter case is ignored are pointed out (never matched by guess).
 */
import { InputError, firstNotText, listSome, NOT_TEXT } from '../errors.js';
import { formatCount } from '../core/count.js';

/** Refuses the first IDs that hold a control character, U+FFFE/U+FFFF or a lone surrogate. */
export function refuseIdsNotText(ids: { id: string; where: string }[], source: string, column: string): void {
  const bad = ids.filter((x) => NOT_TEXT.test(x.id));
  if (bad.length === 0) return;
  const shown = bad.map((x) => `${x.where} ("${x.id}": ${firstNotText(x.id)})`);
  throw new InputError(
    `${source}: the ID column "${column}" holds characters that are not text (control characters, U+FFFE or U+FFFF) in ${listSome(shown, 5)}. ` +
      'Remove them: IDs must be plain text to be matched and written to the results workbook.',
    { file: source, column },
  );
}

/** Pairs of unmatched table and boundary IDs that are equal when letter case is ignored. */
export function caseOnlyPairs(tableIds: string[], featureIds: string[]): { tableId: string; featureId: string }[] {
  const byLower = new Map<string, string[]>();
  for (const id of featureIds) {
    const key = id.toLowerCase();
    byLower.set(key, [...(byLower.get(key) ?? []), id]);
  }
  const out: { tableId: string; featureId: string }[] = [];
  for (const id of tableIds) for (const f of byLower.get(id.toLowerCase()) ?? []) if (f !== id) out.push({ tableId: id, featureId: f });
  return out;
}

export function caseMessage(pairs: { tableId: string; featureId: string }[]): string {
  return `${formatCount(pairs.length)} of these match a boundary ID when letter case is ignored (table vs boundary file): ${listSome(pairs.map((p) => `${p.tableId} vs ${p.featureId}`))}. ` +
    'They are not matched automatically; write the IDs with the same letter case on both sides.';
}

/**
 * An ID as it might have been mistyped or misread: spaces removed, lower case, the letter O read as
 * zero and the letters l and I as one (the usual confusions of typed codes).
 */
export function lookAlikeKey(id: string): string {
  return id.replace(/\s+/g, '').replace(/[Il]/g, '1').toLowerCase().replace(/o/g, '0');
}

/** Pairs of unmatched table and boundary IDs that differ only in spaces, letter case, O/0 or l/I/1 (case-only pairs excluded). */
export function lookAlikePairs(tableIds: string[], featureIds: string[]): { tableId: string; featureId: string }[] {
  const byKey = new Map<string, string[]>();
  for (const id of featureIds) {
    const key = lookAlikeKey(id);
    byKey.set(key, [...(byKey.get(key) ?? []), id]);
  }
  const out: { tableId: string; featureId: string }[] = [];
  for (const id of tableIds) {
    for (const f of byKey.get(lookAlikeKey(id)) ?? []) if (f !== id && f.toLowerCase() !== id.toLowerCase()) out.push({ tableId: id, featureId: f });
  }
  return out;
}

export function lookAlikeMessage(pairs: { tableId: string; featureId: string }[]): string {
  return `${formatCount(pairs.length)} of these look like a boundary ID apart from spaces, letter case, the letter O for zero or l/I for one (table vs boundary file): ` +
    `${listSome(pairs.map((p) => `"${p.tableId}" vs "${p.featureId}"`))}. They are not matched automatically; correct the IDs on one side.`;
}
