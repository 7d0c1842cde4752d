/**
 * Boundary files kept inside the workbook as custom XML parts, so a colleague who opens the workbook
 * can re-run without the original file. Each file is deflated (fflate) and base64-encoded, then cut
 * into pieces so that no part is larger than PART_CHARS: Excel on the web refuses any request over
 * 5 MB ("Resource limits and performance optimization for Office Add-ins"), and each part is stored
 * in a request of its own. Our own small format, one set of parts per store:
 *   <boundaries xmlns="urn:spillway:boundary:1" set="…" part="1" parts="3">
 *     <file name="…" size="…" piece="1" pieces="2">…base64…</file> …
 *   </boundaries>
 * A part without set/part attributes (written before parts were split) is a set of one part whose
 * files are whole.
 */
import { deflateSync, inflateSync } from 'fflate';
import type { BoundaryFile } from '../shared/types.js';
import { formatCount } from '../../src/core/index.js';

export const BOUNDARY_NAMESPACE = 'urn:spillway:boundary:1';
/** Largest part, in characters (base64 is ASCII: characters are bytes). */
export const PART_CHARS = 1_000_000;
/**
 * Largest boundary kept in a workbook, once compressed and encoded: a larger one would make the
 * workbook slow to open and share, and is better kept beside it (our choice, not an Office limit).
 */
export const MAX_KEPT_CHARS = 20_000_000;

function toBase64(bytes: Uint8Array): string {
  let s = '';
  for (let i = 0; i < bytes.length; i += 0x8000) s += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(s);
}

function fromBase64(text: string): Uint8Array {
  const s = atob(text.replace(/\s+/g, ''));
  const out = new Uint8Array(s.length);
  for (let i = 0; i < s.length; i++) out[i] = s.charCodeAt(i);
  return out;
}

const escapeXml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
const unescapeXml = (s: string) => s.replace(/&quot;/g, '"').replace(/&gt;/g, '>').replace(/&lt;/g, '<').replace(/&amp;/g, '&');

const mb = (chars: number) => (chars / 1_000_000).toFixed(1);

/** Raised when the boundary is not stored; its message says why, in the analyst's words. */
export class BoundaryNotKept extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'BoundaryNotKept';
  }
}

/** The kept boundary is incomplete or damaged: the message names the file and what to do. */
export class StoredBoundaryDamaged extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'StoredBoundaryDamaged';
  }
}

/**
 * The XML of every part of one stored set. `set` names the set (a time stamp by default); throws
 * BoundaryNotKept when the encoded files pass `maxChars`.
 */
export function boundaryParts(
  files: readonly BoundaryFile[],
  { set = Date.now().toString(36), partChars = PART_CHARS, maxChars = MAX_KEPT_CHARS }: { set?: string; partChars?: number; maxChars?: number } = {},
): string[] {
  const pieces: { name: string; size: number; piece: number; pieces: number; text: string }[] = [];
  let total = 0;
  for (const f of files) {
    const text = toBase64(deflateSync(f.bytes, { level: 9 }));
    total += text.length;
    const count = Math.max(1, Math.ceil(text.length / partChars));
    for (let k = 0; k < count; k++) pieces.push({ name: f.name, size: f.bytes.length, piece: k + 1, pieces: count, text: text.slice(k * partChars, (k + 1) * partChars) });
  }
  if (total > maxChars) {
    throw new BoundaryNotKept(`The boundary file (${files.map((f) => f.name).join(', ')}) was not kept in this workbook: even compressed it takes ${mb(total)} MB, more than the ${mb(maxChars)} MB Spillway stores inside a workbook. Keep the file beside the workbook to run again.`);
  }
  const bodies: string[][] = [];
  let current: string[] = [], size = 0;
  for (const p of pieces) {
    if (current.length && size + p.text.length > partChars) { bodies.push(current); current = []; size = 0; }
    current.push(`<file name="${escapeXml(p.name)}" size="${p.size}" piece="${p.piece}" pieces="${p.pieces}">${p.text}</file>`);
    size += p.text.length;
  }
  bodies.push(current);
  return bodies.map((body, i) =>
    `<?xml version="1.0" encoding="UTF-8"?><boundaries xmlns="${BOUNDARY_NAMESPACE}" set="${set}" part="${i + 1}" parts="${bodies.length}">${body.join('')}</boundaries>`);
}

interface ParsedPart { set: string; part: number; parts: number; files: { name: string; size: number; piece: number; pieces: number; text: string }[] }

function parsePart(xml: string): ParsedPart {
  const root = /<boundaries\b([^>]*)>/.exec(xml)?.[1] ?? '';
  const attr = (s: string, name: string) => new RegExp(`\\b${name}="([^"]*)"`).exec(s)?.[1];
  const files = [...xml.matchAll(/<file\b([^>]*)>([^<]*)<\/file>/g)].map((m) => ({
    name: unescapeXml(attr(m[1], 'name') ?? ''),
    size: Number(attr(m[1], 'size')),
    piece: Number(attr(m[1], 'piece') ?? 1),
    pieces: Number(attr(m[1], 'pieces') ?? 1),
    text: m[2],
  }));
  return { set: attr(root, 'set') ?? '', part: Number(attr(root, 'part') ?? 1), parts: Number(attr(root, 'parts') ?? 1), files };
}

/**
 * The files back from the parts found in the workbook (in any order). When an interrupted store left
 * more than one set, the newest complete one is used. Throws when no set is complete or a file does
 * not come back at its recorded size.
 */
export function readBoundaryParts(xmls: readonly string[]): BoundaryFile[] {
  if (!xmls.length) return [];
  const sets = new Map<string, ParsedPart[]>();
  for (const xml of xmls) {
    const p = parsePart(xml);
    sets.set(p.set, [...(sets.get(p.set) ?? []), p]);
  }
  const complete = [...sets.entries()]
    .filter(([, parts]) => parts.length === parts[0].parts && parts.every((p) => p.parts === parts[0].parts) && new Set(parts.map((p) => p.part)).size === parts.length)
    .sort(([a], [b]) => (a.length - b.length) || (a < b ? -1 : a > b ? 1 : 0));
  if (!complete.length) {
    const [, parts] = [...sets.entries()][0];
    throw new StoredBoundaryDamaged(`The boundary file kept in this workbook is incomplete (${formatCount(parts.length)} of ${formatCount(parts[0].parts)} parts found); open the original file again.`);
  }
  const parts = complete[complete.length - 1][1].sort((a, b) => a.part - b.part);
  const files: BoundaryFile[] = [];
  let pending: { name: string; size: number; pieces: number; texts: string[] } | null = null;
  const finish = () => {
    if (!pending) return;
    if (pending.texts.length !== pending.pieces) throw new StoredBoundaryDamaged(`The stored boundary file ${pending.name} is damaged; open the original file again.`);
    const bytes = inflateSync(fromBase64(pending.texts.join('')));
    if (bytes.length !== pending.size) throw new StoredBoundaryDamaged(`The stored boundary file ${pending.name} is damaged; open the original file again.`);
    files.push({ name: pending.name, bytes });
    pending = null;
  };
  for (const f of parts.flatMap((p) => p.files)) {
    if (f.piece === 1) { finish(); pending = { name: f.name, size: f.size, pieces: f.pieces, texts: [] }; }
    if (!pending || pending.name !== f.name || f.piece !== pending.texts.length + 1) throw new StoredBoundaryDamaged(`The stored boundary file ${f.name} is damaged; open the original file again.`);
    pending.texts.push(f.text);
  }
  finish();
  return files;
}
