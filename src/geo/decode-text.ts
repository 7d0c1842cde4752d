/**
 * Bytes to text for every text file the engine reads (CSV tables, GeoJSON/TopoJSON, edge lists),
 * so each names the same causes in the same words: a byte-order mark chooses UTF-8, UTF-16 little- or
 * big-endian (UTF-32 is refused); UTF-16 without a mark is recognised by its pattern of zero bytes;
 * other zero bytes mean the file is not text at all (and a known binary kind is named); text over
 * the longest string a JavaScript engine can hold is refused with its size before decoding fails
 * inside the decoder. Source for the marks: The Unicode Standard, section 23.8 (U+FEFF as byte-order
 * mark); V8's string length limit (2^29 − 24 characters on 64-bit builds).
 */
import { InputError } from '../errors.js';
import { formatBytes } from '../core/words.js';
import { decodeSingleByte } from './single-byte.js';

/** The longest text read: V8's limit on a string's length (each byte gives at most one character). */
export const MAX_TEXT_BYTES = 0x1fffffe8;

export interface DecodedText {
  text: string;
  /** the encoding used, in words for notes */
  encoding: string;
  warnings: string[];
}

export interface DecodeOptions {
  /** what the file should be, for messages ("a table", "GeoJSON") */
  kind: string;
  /** text that is not valid UTF-8 is read as Windows-1252 with a warning (else decoded leniently) */
  latinFallback?: boolean;
}

export function decodeText(bytes: Uint8Array, name: string, opts: DecodeOptions): DecodedText {
  if (bytes.length > MAX_TEXT_BYTES) {
    throw new InputError(
      `${name} is ${formatBytes(bytes.length)}; text files (${opts.kind}) can be read up to ${formatBytes(MAX_TEXT_BYTES)}, the longest text a JavaScript engine holds. ` +
        'Split the file, or for boundaries use a shapefile, which has no such limit.',
      { file: name },
    );
  }
  const b = bytes;
  if ((b[0] === 0xff && b[1] === 0xfe && b[2] === 0 && b[3] === 0) || (b[0] === 0 && b[1] === 0 && b[2] === 0xfe && b[3] === 0xff)) {
    throw new InputError(`${name} is saved as UTF-32 text, which Spillway does not read; save it as UTF-8.`, { file: name });
  }
  if (b[0] === 0xff && b[1] === 0xfe) return { text: new TextDecoder('utf-16le').decode(b), encoding: 'UTF-16', warnings: [] };
  if (b[0] === 0xfe && b[1] === 0xff) return { text: new TextDecoder('utf-16be').decode(b), encoding: 'UTF-16', warnings: [] };
  const zeros = zeroPattern(b);
  if (zeros === 'utf-16le' || zeros === 'utf-16be') {
    return {
      text: new TextDecoder(zeros).decode(b),
      encoding: 'UTF-16',
      warnings: [`${name} is UTF-16 text without a byte-order mark; it was read as UTF-16 ${zeros === 'utf-16le' ? 'little' : 'big'}-endian.`],
    };
  }
  if (zeros !== null) {
    const kind = binaryKind(b);
    throw new InputError(
      `${name} is not a text file${kind ? ` (it looks like ${kind})` : ` (it holds a zero byte at byte ${zeros + 1})`}; ${opts.kind} was expected. Is it the right file?`,
      { file: name },
    );
  }
  const body = zeros === null && b.length > 0 && b[b.length - 1] === 0 ? b.subarray(0, trimmedEnd(b)) : b;
  try {
    // the UTF-8 decoder drops a leading byte-order mark
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(body), encoding: 'UTF-8', warnings: [] };
  } catch {
    if (!opts.latinFallback) return { text: new TextDecoder('utf-8').decode(body), encoding: 'UTF-8', warnings: [`${name} is not valid UTF-8; the bytes that are not were replaced by \uFFFD.`] };
    return {
      text: decodeSingleByte(body, 1252), // by table: Node's TextDecoder reads this label as ISO-8859-1
      encoding: 'Windows-1252',
      warnings: [`${name} is not valid UTF-8; it was read as Windows-1252. Save it as UTF-8 if letters look wrong.`],
    };
  }
}

function trimmedEnd(b: Uint8Array): number {
  let end = b.length;
  while (end > 0 && b[end - 1] === 0) end--;
  return end;
}

/**
 * Looks at the first 4 KiB: 'utf-16le' / 'utf-16be' when zero bytes sit at nearly every odd / even
 * position (text of mostly Latin letters), the position of the first zero byte when there are zeros
 * without that pattern, null when there are none.
 */
function zeroPattern(b: Uint8Array): 'utf-16le' | 'utf-16be' | number | null {
  // zero bytes only at the very end are padding some exports add, not a sign of binary data
  const end = trimmedEnd(b);
  const n = Math.min(end, 4096) & ~1;
  let first = -1;
  let even = 0;
  let odd = 0;
  for (let i = 0; i < n; i++) {
    if (b[i] !== 0) continue;
    if (first < 0) first = i;
    if (i % 2) odd++;
    else even++;
  }
  if (first < 0) {
    const later = b.subarray(0, end).indexOf(0, n);
    return later < 0 ? null : later;
  }
  const pairs = n / 2;
  if (odd >= 0.4 * pairs && even === 0) return 'utf-16le';
  if (even >= 0.4 * pairs && odd === 0) return 'utf-16be';
  return first;
}

/** A few common binary kinds by their first bytes, for "is it the right file?" messages. */
export function binaryKind(b: Uint8Array): string | null {
  const ascii = (s: string) => [...s].every((c, i) => b[i] === c.charCodeAt(0));
  if (b[0] === 0x50 && b[1] === 0x4b) return 'a zip archive or an .xlsx workbook';
  if (b[0] === 0xd0 && b[1] === 0xcf && b[2] === 0x11 && b[3] === 0xe0) return 'an old-style .xls workbook';
  if (b[0] === 0x1f && b[1] === 0x8b) return 'a gzip-compressed file';
  if (ascii('%PDF')) return 'a PDF document';
  if (b.length >= 4 && b[0] === 0 && b[1] === 0 && b[2] === 0x27 && b[3] === 0x0a) return 'the shapes part of a shapefile (.shp)';
  const dbfHeader = b.length >= 65 ? b[8] | (b[9] << 8) : 0;
  if ([0x03, 0x83, 0x8b, 0x30, 0xf5].includes(b[0]) && dbfHeader >= 65 && (dbfHeader - 33) % 32 === 0 && dbfHeader <= b.length && b[dbfHeader - 1] === 0x0d) {
    return 'a dBASE table (the attribute part of a shapefile, .dbf)';
  }
  if (ascii('SQLite format 3')) return 'an SQLite database (a GeoPackage?)';
  return null;
}
