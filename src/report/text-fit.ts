/**
 * How much room text and numbers take in a spreadsheet cell, in column-width units (the width of one
 * digit of the default font). Estimates only — no font is measured — erring wide, so that a wrapped
 * cell is given a line too many rather than one too few.
 */
import type { Cell, NumberFormat } from './types.js';

/**
 * Width of one character of ordinary text, of bold text and of a 14-point bold title, in width units:
 * measured on English text rendered by LibreOffice with its stand-in for the default font (0.77 to
 * 0.83 units a character, bold 0.9), rounded up; the default font itself is narrower.
 */
export const CHAR = { text: 0.85, bold: 0.95, title: 1.25 } as const;
export type TextWeight = keyof typeof CHAR;

/** Room a cell keeps free around its text (the cell's own padding), in width units. */
const PADDING = 1;

/** Width needed to show `text` on one line. */
export function textWidth(text: string, weight: TextWeight = 'text'): number {
  return Math.ceil(text.length * CHAR[weight] + PADDING);
}

/** Width needed by the longest word, so that no word is broken mid-way when the text wraps. */
export function longestWordWidth(text: string, weight: TextWeight = 'text'): number {
  const longest = text.split(/\s+/).reduce((m, w) => Math.max(m, w.length), 0);
  return Math.ceil(longest * CHAR[weight] + PADDING);
}

/** Lines `text` takes when wrapped at word boundaries in a cell `width` units wide. */
export function wrappedLines(text: string, width: number, weight: TextWeight = 'text'): number {
  const room = Math.max(3, (width - PADDING) / CHAR[weight]);
  let lines = 0;
  for (const paragraph of text.split('\n')) {
    lines++;
    let used = 0;
    for (const word of paragraph.split(/\s+/).filter(Boolean)) {
      const extra = used === 0 ? word.length : used + 1 + word.length;
      if (extra <= room) { used = extra; continue; }
      if (used > 0) lines++;
      // a word longer than the line runs over several lines
      const over = Math.ceil(word.length / room) - 1;
      lines += over;
      used = word.length - over * room;
    }
  }
  return lines;
}

/** Characters a number shows in a given format (for column widths that never show "####"). */
export function numberWidth(x: number, format: NumberFormat | undefined): number {
  if (!Number.isFinite(x)) return 0;
  const whole = (v: number) => String(Math.trunc(Math.abs(v))).length + (v < 0 ? 1 : 0);
  let chars: number;
  switch (format) {
    case 'integer': chars = whole(Math.round(x)); break;
    case 'decimal2': chars = whole(x) + 3; break;
    case 'pvalue': chars = 7; break;
    case 'percent': chars = whole(x * 100) + 3; break;
    case 'scientific': chars = 9; break;
    case 'text': chars = String(x).length; break;
    // a four-decimal number below 0.001 in size shows as -7.924E-04 (src/workbook/number-formats.ts)
    default: chars = x !== 0 && Math.abs(x) < 0.001 ? 9 + (x < 0 ? 1 : 0) : whole(x) + 5;
  }
  return chars + 2;
}

/** Width a cell's value needs on one line. */
export function cellWidth(v: Cell, format: NumberFormat | undefined): number {
  if (v === null) return 0;
  if (typeof v === 'number') return numberWidth(v, format);
  if (typeof v === 'boolean') return 7;
  return textWidth(v);
}
