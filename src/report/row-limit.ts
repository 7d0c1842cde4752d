/**
 * A worksheet holds at most 1,048,576 rows ("Excel specifications and limits"). A table that would
 * run past that — the neighbour list of many areas with many neighbours each, or the per-area table
 * of more than a million areas — continues on sheets of its own ("Neighbours, part 2", …), each with
 * the table's header, a title saying which rows it holds, and the sheet's cautions. An analyst keeps
 * every row, in pieces that sort and filter like the rest; refusing would lose the whole workbook
 * over one long table.
 */
import type { Block, ReportSheet } from './types.js';
import { BLOCK_GAP, blockHeight, layoutBlocks } from './layout.js';
import { formatCount } from '../core/count.js';
import { MAX_SHEET_NAME } from './sheet-names.js';

/** Rows in one worksheet. */
export const SHEET_ROW_LIMIT = 1_048_576;
type TableBlock = Extract<Block, { kind: 'table' }>;

const count = formatCount;

/** "Neighbours, part 2", shortened to fit a sheet name. */
export function partName(name: string, part: number): string {
  const suffix = `, part ${part}`;
  return `${name.slice(0, MAX_SHEET_NAME - suffix.length).trimEnd()}${suffix}`;
}

/** Where a piece of a table came from: the whole table's title and row count, and this piece's first row. */
interface Piece { title: string; total: number; first: number }

/**
 * The sheets, with any sheet longer than `limit` rows split into parts. Blocks keep their order; a
 * table is cut where the sheet is full and goes on at the top of the next part. Pictures stay on
 * the first part. A trailing caution paragraph is repeated on every part.
 */
export function splitLongSheets(sheets: readonly ReportSheet[], limit = SHEET_ROW_LIMIT): ReportSheet[] {
  const out: ReportSheet[] = [];
  for (const sheet of sheets) {
    if (layoutBlocks(sheet.blocks).lastRow <= limit) { out.push(sheet); continue; }
    out.push(...splitSheet(sheet, limit));
  }
  return out;
}

function splitSheet(sheet: ReportSheet, limit: number): ReportSheet[] {
  const body = [...sheet.blocks];
  const tail: Block[] = [];
  while (body.length && body[body.length - 1].kind === 'paragraph' && (body[body.length - 1] as { style?: string }).style === 'caution') tail.unshift(body.pop()!);
  // rows the repeated cautions take at the foot of every part
  const tailRows = tail.reduce((s, b) => s + BLOCK_GAP + blockHeight(b), 0);
  const room = Math.max(3, limit - tailRows);

  const parts: Block[][] = [[]];
  const pieces = new Map<TableBlock, Piece>();
  let next = 1;
  const queue = [...body];
  while (queue.length) {
    const b = queue.shift()!;
    const current = parts[parts.length - 1];
    const h = blockHeight(b);
    if (next + h - 1 <= room || (current.length === 0 && b.kind !== 'table')) {
      current.push(b);
      next += h + BLOCK_GAP;
      continue;
    }
    if (b.kind === 'table') {
      const from = pieces.get(b) ?? { title: b.title, total: b.rows.length, first: 1 };
      // title, header and the note saying where the table goes on
      const fits = room - next + 1 - 3;
      if (fits >= 1) {
        const head: TableBlock = { ...b, rows: b.rows.slice(0, fits) };
        const rest: TableBlock = { ...b, rows: b.rows.slice(fits) };
        pieces.set(head, from);
        pieces.set(rest, { ...from, first: from.first + fits });
        current.push(head);
        queue.unshift(rest);
      } else {
        queue.unshift(b);
        if (current.length === 0) throw new Error(`a sheet of ${count(limit)} rows cannot hold even one row of the table "${b.title}"`);
      }
    } else {
      queue.unshift(b);
    }
    parts.push([]);
    next = 1;
  }
  const names = parts.map((_, k) => (k === 0 ? sheet.name : partName(sheet.name, k + 1)));
  return parts.map((blocks, k) => ({
    ...sheet,
    name: names[k],
    images: k === 0 ? sheet.images : undefined,
    blocks: [...blocks.map((b) => labelPiece(b, pieces.get(b as TableBlock), names, k, limit)), ...tail],
  }));
}

/** A piece of a split table says which rows it holds and where the table goes on. */
function labelPiece(b: Block, piece: Piece | undefined, names: string[], k: number, limit: number): Block {
  if (b.kind !== 'table' || !piece) return b;
  const last = piece.first + b.rows.length - 1;
  const span = `rows ${count(piece.first)} to ${count(last)} of ${count(piece.total)}`;
  const title = piece.first === 1 ? `${piece.title} (${span})` : `${piece.title}, continued (${span})`;
  const goesOn = last < piece.total
    ? `The table goes on at the top of the next sheet, "${names[k + 1]}": a sheet holds at most ${count(limit)} rows.`
    : '';
  const note = [b.note, goesOn].filter(Boolean).join(' ') || undefined;
  return { ...b, title, note };
}
