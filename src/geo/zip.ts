/**
 * Reading .zip archives (boundary zips and .xlsx workbooks) without trusting them. Source: the ZIP
 * File Format Specification (PKWARE APPNOTE 6.3.x): end of central directory record (4.3.16), its
 * ZIP64 locator and record (4.3.14–15), central directory headers (4.3.12), local headers (4.3.7),
 * general-purpose flag bit 0 (encrypted) and bit 11 (UTF-8 names), the ZIP64 extra field (4.5.3),
 * compression methods (4.4.5). Entries are inflated with fflate's streaming Inflate in small steps,
 * counting what comes out, and stopped the moment an entry passes the size its header declares: an
 * archive that understates its sizes costs a few milliseconds, not minutes of inflating.
 */
import { Inflate } from 'fflate';
import { InputError } from '../errors.js';

export interface ZipEntry {
  /** the entry's path inside the archive */
  name: string;
  /** general-purpose bit flags */
  flags: number;
  method: number;
  compressedSize: number;
  /** the uncompressed size the central directory declares */
  size: number;
  localOffset: number;
}

const METHOD_NAMES: Record<number, string> = {
  1: 'Shrink', 6: 'Implode', 9: 'Deflate64', 12: 'BZIP2', 14: 'LZMA', 19: 'IBM LZ77', 93: 'Zstandard', 95: 'XZ', 96: 'JPEG', 97: 'WavPack', 98: 'PPMd', 99: 'AES encryption',
};

const u16 = (b: Uint8Array, at: number) => b[at] | (b[at + 1] << 8);
const u32 = (b: Uint8Array, at: number) => (b[at] | (b[at + 1] << 8) | (b[at + 2] << 16) | (b[at + 3] << 24)) >>> 0;
const u64 = (b: Uint8Array, at: number) => u32(b, at) + u32(b, at + 4) * 2 ** 32;

export function looksLikeZip(b: Uint8Array): boolean {
  return b.length >= 4 && b[0] === 0x50 && b[1] === 0x4b && ((b[2] === 3 && b[3] === 4) || (b[2] === 5 && b[3] === 6));
}

function damaged(file: string, why: string): InputError {
  return new InputError(`${file} could not be opened as a .zip archive (${why}).`, { file });
}

/** The archive's entries from its central directory; nothing is inflated. */
export function listZip(bytes: Uint8Array, file: string): ZipEntry[] {
  const n = bytes.length;
  let eocd = -1;
  for (let at = n - 22; at >= Math.max(0, n - 22 - 0xffff); at--) {
    if (bytes[at] === 0x50 && bytes[at + 1] === 0x4b && bytes[at + 2] === 5 && bytes[at + 3] === 6) {
      eocd = at;
      break;
    }
  }
  if (eocd < 0) throw damaged(file, 'no end-of-archive record: the file is not a zip, or it was cut short');
  let count = u16(bytes, eocd + 10);
  let cdOffset = u32(bytes, eocd + 16);
  if (count === 0xffff || cdOffset === 0xffffffff) {
    const locator = eocd - 20;
    if (locator < 0 || u32(bytes, locator) !== 0x07064b50) throw damaged(file, 'its ZIP64 locator is missing');
    const record = u64(bytes, locator + 8);
    if (record + 56 > n || u32(bytes, record) !== 0x06064b50) throw damaged(file, 'its ZIP64 directory record is missing');
    count = u64(bytes, record + 32);
    cdOffset = u64(bytes, record + 48);
  }
  const entries: ZipEntry[] = [];
  let at = cdOffset;
  for (let k = 0; k < count; k++) {
    if (at + 46 > n || u32(bytes, at) !== 0x02014b50) throw damaged(file, `its directory is damaged at entry ${k + 1}`);
    const flags = u16(bytes, at + 8);
    const method = u16(bytes, at + 10);
    let compressedSize = u32(bytes, at + 20);
    let size = u32(bytes, at + 24);
    const nameLength = u16(bytes, at + 28);
    const extraLength = u16(bytes, at + 30);
    const commentLength = u16(bytes, at + 32);
    let localOffset = u32(bytes, at + 42);
    const nameBytes = bytes.subarray(at + 46, at + 46 + nameLength);
    const name = decodeName(nameBytes, (flags & 0x800) !== 0);
    // ZIP64 extra field: the 64-bit values of the fields that hold 0xFFFFFFFF, in this order
    for (let e = at + 46 + nameLength; e + 4 <= at + 46 + nameLength + extraLength;) {
      const id = u16(bytes, e);
      const len = u16(bytes, e + 2);
      if (id === 0x0001) {
        let p = e + 4;
        if (size === 0xffffffff) { size = u64(bytes, p); p += 8; }
        if (compressedSize === 0xffffffff) { compressedSize = u64(bytes, p); p += 8; }
        if (localOffset === 0xffffffff) { localOffset = u64(bytes, p); }
      }
      e += 4 + len;
    }
    entries.push({ name, flags, method, compressedSize, size, localOffset });
    at += 46 + nameLength + extraLength + commentLength;
  }
  return entries;
}

function decodeName(b: Uint8Array, utf8: boolean): string {
  try {
    return new TextDecoder('utf-8', { fatal: !utf8 }).decode(b);
  } catch {
    let s = '';
    for (const c of b) s += String.fromCharCode(c); // the old default code page: close enough for a name in a message
    return s;
  }
}

/** Refuses entries that cannot be expanded, naming why: encrypted, or an unsupported compression method. */
export function checkExpandable(entry: ZipEntry, file: string): void {
  if ((entry.flags & 1) !== 0 || entry.method === 99) {
    throw new InputError(
      `${file} is password-protected (its entry ${entry.name} is encrypted); Spillway cannot open encrypted archives. ` +
        'Extract the files with the password and give them directly, or zip them again without a password.',
      { file },
    );
  }
  if (entry.method !== 0 && entry.method !== 8) {
    const what = METHOD_NAMES[entry.method] ? `${METHOD_NAMES[entry.method]} (method ${entry.method})` : `method ${entry.method}`;
    throw new InputError(
      `${file}: its entry ${entry.name} is compressed with ${what}, which Spillway cannot expand; zip the files again with the standard (Deflate) compression.`,
      { file },
    );
  }
}

/**
 * The entry's bytes, inflated in steps and stopped as soon as they pass the declared size (or
 * `limit`, when that is smaller and the caller has a cap of its own). Without `keep` only the size
 * is checked and nothing is kept.
 */
export function expandEntry(bytes: Uint8Array, entry: ZipEntry, file: string, opts: { keep?: boolean } = {}): Uint8Array {
  checkExpandable(entry, file);
  const keep = opts.keep ?? true;
  const at = entry.localOffset;
  if (at + 30 > bytes.length || u32(bytes, at) !== 0x04034b50) throw damaged(file, `the entry ${entry.name} is missing from where the directory says it is`);
  const start = at + 30 + u16(bytes, at + 26) + u16(bytes, at + 28);
  const end = start + entry.compressedSize;
  if (end > bytes.length) throw damaged(file, `the entry ${entry.name} is cut short`);
  const tooLarge = () => new InputError(
    `${file}: its entry ${entry.name} expands beyond the ${entry.size} bytes its header declares; the archive is damaged or was made to mislead, and it was not expanded further. ` +
      'Make the zip again from the original files.',
    { file },
  );
  if (entry.method === 0) {
    if (entry.compressedSize !== entry.size) throw tooLarge();
    return keep ? bytes.slice(start, end) : new Uint8Array(0);
  }
  const out = keep ? new Uint8Array(entry.size) : null;
  let written = 0;
  const STOP = Symbol('stop');
  const inflater = new Inflate((chunk) => {
    if (written + chunk.length > entry.size) throw STOP;
    out?.set(chunk, written);
    written += chunk.length;
  });
  const STEP = 16384; // one step can inflate to at most about 16 MiB (deflate's largest ratio is about 1032:1)
  try {
    for (let p = start; p < end; p += STEP) inflater.push(bytes.subarray(p, Math.min(end, p + STEP)), p + STEP >= end);
  } catch (e) {
    if (e === STOP) throw tooLarge();
    throw damaged(file, `the entry ${entry.name} is damaged: ${e instanceof Error ? e.message : String(e)}`);
  }
  if (written !== entry.size) throw damaged(file, `the entry ${entry.name} expands to ${written} bytes, not the ${entry.size} its header declares`);
  return out ?? new Uint8Array(0);
}
