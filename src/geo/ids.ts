/** How IDs compare in joins: as trimmed text, numbers written without a trailing ".0". */
import type { Cell } from './table-shape.js';

/** The comparable text of an ID cell, or null when it is blank. */
export function idText(v: unknown): string | null {
  if (v === null || v === undefined) return null;
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : null;
  const t = String(v).trim();
  if (t === '') return null;
  const whole = /^([+-]?\d+)\.0+$/.exec(t); // "1001.0" from a float export means 1001
  return whole ? whole[1] : t;
}

/** The ID with leading zeros removed when it is all digits (for spotting 01001 vs 1001), else null. */
export function unpadded(id: string): string | null {
  if (!/^\d+$/.test(id)) return null;
  return id.replace(/^0+(?=\d)/, '');
}

/** A feature property as a table cell (dates and other objects become text). */
export function toCell(v: unknown): Cell {
  if (v === null || v === undefined) return null;
  if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean') return v;
  if (v instanceof Date) return Number.isNaN(v.getTime()) ? null : v.toISOString();
  return typeof v === 'object' ? JSON.stringify(v) : String(v);
}
