/**
 * Just enough of the .dbf layout (dBASE III header) to check a shapefile before reading it: the
 * record count, and whether text fields are valid UTF-8. The `shapefile` package decodes with
 * whatever encoding it is given and never reports bad bytes, so this check is done here.
 */
import { InputError } from '../errors.js';

export interface DbfField {
  name: string;
  type: string;
  /** byte offset within a record (after the deletion flag) */
  offset: number;
  length: number;
}

export interface DbfLayout {
  recordCount: number;
  headerLength: number;
  recordLength: number;
  fields: DbfField[];
  /** the language driver byte of the header (byte 29): the code page the writer declared, 0 when none */
  languageDriver: number;
  /** 1-based numbers of the records flagged deleted ("*" as their first byte) */
  deleted: number[];
}

export function readDbfLayout(bytes: Uint8Array, file: string): DbfLayout {
  if (bytes.length < 33) throw new InputError(`${file} is too short to be a .dbf table (${bytes.length} bytes).`, { file });
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const recordCount = view.getUint32(4, true);
  const headerLength = view.getUint16(8, true);
  const recordLength = view.getUint16(10, true);
  if (headerLength < 33 || headerLength > bytes.length || recordLength < 1) {
    throw new InputError(`${file} does not look like a .dbf table (its header is damaged).`, { file });
  }
  const fields: DbfField[] = [];
  let offset = 1;
  for (let p = 32; p + 32 <= headerLength && bytes[p] !== 0x0d; p += 32) {
    let end = p;
    while (end < p + 11 && bytes[end] !== 0) end++;
    fields.push({
      name: latin(bytes.subarray(p, end)),
      type: String.fromCharCode(bytes[p + 11]),
      offset,
      length: bytes[p + 16],
    });
    offset += bytes[p + 16];
  }
  const needed = headerLength + recordCount * recordLength;
  if (needed > bytes.length) {
    const whole = Math.floor((bytes.length - headerLength) / recordLength);
    throw new InputError(
      `${file} says it holds ${recordCount} records but its bytes end after ${whole}; the file is truncated.`,
      { file },
    );
  }
  const deleted: number[] = [];
  for (let r = 0; r < recordCount; r++) if (bytes[headerLength + r * recordLength] === 0x2a) deleted.push(r + 1);
  return { recordCount, headerLength, recordLength, fields, languageDriver: bytes[29], deleted };
}

/**
 * The code page a .dbf header's language driver byte names (dBASE / shapefile convention; the table
 * of byte values is recalled from memory of the dBASE documentation): the TextDecoder label when one
 * exists, and the code page number for messages. MS-DOS code pages without a decoder come back with
 * `decoder` null.
 */
export function codePageOfDriver(byte: number): { codePage: number; decoder: string | null } | null {
  const table: Record<number, [number, string | null]> = {
    0x01: [437, null], 0x02: [850, null], 0x03: [1252, 'windows-1252'], 0x57: [1252, 'windows-1252'], 0x58: [1252, 'windows-1252'],
    0x59: [1252, 'windows-1252'], 0x64: [852, null], 0x65: [866, 'ibm866'], 0x26: [866, 'ibm866'], 0x66: [865, null],
    0x13: [932, 'shift_jis'], 0x7b: [932, 'shift_jis'], 0x4d: [936, 'gbk'], 0x7a: [936, 'gbk'], 0x4e: [949, 'euc-kr'], 0x79: [949, 'euc-kr'],
    0x4f: [950, 'big5'], 0x78: [950, 'big5'], 0x7c: [874, 'windows-874'], 0x7d: [1255, 'windows-1255'], 0x7e: [1256, 'windows-1256'],
    0xc8: [1250, 'windows-1250'], 0xc9: [1251, 'windows-1251'], 0xca: [1254, 'windows-1254'], 0xcb: [1253, 'windows-1253'], 0xcc: [1257, 'windows-1257'],
  };
  const hit = table[byte];
  return hit ? { codePage: hit[0], decoder: hit[1] } : null;
}

function latin(b: Uint8Array): string {
  let s = '';
  for (const c of b) s += String.fromCharCode(c);
  return s;
}

/** The TextDecoder label for a .cpg code page text ("UTF-8", "1252", "ANSI 1252", "ISO-8859-1"...), or null. */
export function encodingFromCpg(text: string): string | null {
  const t = text.trim().replace(/^\uFEFF/, '').toLowerCase();
  if (t === '') return null;
  if (/^utf-?8$/.test(t)) return 'utf-8';
  const win = /^(?:ansi\s*|cp|windows-?)?(125\d)$/.exec(t);
  if (win) return `windows-${win[1]}`;
  const iso = /^(?:iso-?)?8859-?(\d+)$/.exec(t) ?? /^8859(\d+)$/.exec(t);
  if (iso) return `iso-8859-${iso[1]}`;
  try {
    new TextDecoder(t);
    return t;
  } catch {
    return null;
  }
}

/** The first text cell (or field name) that is not valid UTF-8, as field name and 1-based record, or null. */
export function firstInvalidUtf8(bytes: Uint8Array, layout: DbfLayout): { field: string; record: number } | null {
  const strict = new TextDecoder('utf-8', { fatal: true });
  const body = bytes.subarray(0, layout.headerLength + layout.recordCount * layout.recordLength);
  let high = false;
  for (let i = 0; i < body.length; i++) {
    if (body[i] >= 0x80) {
      high = true;
      break;
    }
  }
  if (!high) return null; // plain ASCII reads the same in every encoding
  const valid = (b: Uint8Array): boolean => {
    try {
      strict.decode(b);
      return true;
    } catch {
      return false;
    }
  };
  for (let p = 32, k = 0; k < layout.fields.length; p += 32, k++) {
    if (!valid(bytes.subarray(p, p + 11).filter((c) => c !== 0))) return { field: layout.fields[k].name, record: 0 };
  }
  for (let r = 0; r < layout.recordCount; r++) {
    const start = layout.headerLength + r * layout.recordLength;
    for (const f of layout.fields) {
      if (f.type !== 'C') continue;
      if (!valid(bytes.subarray(start + f.offset, start + f.offset + f.length))) return { field: f.name, record: r + 1 };
    }
  }
  return null;
}
