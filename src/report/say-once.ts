import type { Block } from './types.js';

/**
 * A sheet built from several models' blocks (the spillover effects of each) says each thing once: a
 * paragraph equal to an earlier one is left out, and a table note equal to an earlier note is left
 * off its table, the first one saying that it holds for the tables below too.
 */
export function sayOnce(blocks: readonly Block[]): Block[] {
  const said = new Set<string>();
  const firstWithNote = new Map<string, number>();
  const out: Block[] = [];
  for (const b of blocks) {
    if (b.kind === 'paragraph') {
      if (said.has(b.text)) continue;
      said.add(b.text);
    }
    if (b.kind === 'table' && b.note) {
      const first = firstWithNote.get(b.note);
      if (first !== undefined) {
        const t = out[first];
        if (t.kind === 'table' && t.note === b.note) out[first] = { ...t, note: `${b.note} The same holds for the tables below.` };
        out.push({ ...b, note: undefined });
        continue;
      }
      firstWithNote.set(b.note, out.length);
    }
    out.push(b);
  }
  return out;
}
