/** Entry point for data tables: CSV/TSV text or an .xlsx workbook. */
import { InputError } from '../errors.js';
import type { DataTable } from './types.js';
import type { NamedBytes } from './named-bytes.js';
import { readCsv } from './read-csv.js';
import { readXlsx } from './read-xlsx.js';
import { formatBytes } from '../core/words.js';

export interface ReadTableOptions {
  sheet?: string;
  /** Cap on the file's size and on what an .xlsx may expand to; default 1 GiB. */
  maxBytes?: number;
}

const DEFAULT_MAX_BYTES = 2 ** 30;

export async function readTable(file: NamedBytes, opts: ReadTableOptions = {}): Promise<DataTable> {
  const b = file.bytes;
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  if (!b || b.length === 0) throw new InputError(`${file.name} is empty (0 bytes).`, { file: file.name });
  if (b.length > maxBytes) {
    throw new InputError(`${file.name} is ${formatBytes(b.length)}, over the ${formatBytes(maxBytes)} limit for data tables.`, { file: file.name });
  }
  const isZipBytes = b.length >= 4 && b[0] === 0x50 && b[1] === 0x4b && b[2] === 0x03 && b[3] === 0x04;
  const isCompoundFile = b[0] === 0xd0 && b[1] === 0xcf && b[2] === 0x11 && b[3] === 0xe0;
  if (!isCompoundFile && (/\.xlsx$|\.xlsm$/i.test(file.name) || isZipBytes)) return readXlsx(b, file.name, opts.sheet, maxBytes);
  if (/\.xls$/i.test(file.name) || isCompoundFile) {
    // a password-protected .xlsx is stored in the same container as an old .xls, around an "EncryptedPackage"
    if (b[0] === 0xd0 && b[1] === 0xcf && holdsUtf16(b, 'EncryptedPackage')) {
      throw new InputError(
        `${file.name} is a password-protected workbook; Spillway cannot open encrypted workbooks. ` +
          'Open it in a spreadsheet program, remove the password, save it, and try again.',
        { file: file.name },
      );
    }
    throw new InputError(`${file.name} is an old-style .xls workbook; save it as .xlsx or CSV and try again.`, { file: file.name });
  }
  if (opts.sheet !== undefined) {
    throw new InputError(`${file.name} is a text table (CSV), which has no sheets; the sheet "${opts.sheet}" cannot be chosen in it. Leave the sheet out, or give the .xlsx workbook.`, { file: file.name });
  }
  return readCsv(b, file.name);
}

/** Whether the bytes hold `text` written in UTF-16 little-endian (the directory names of a compound file). */
function holdsUtf16(b: Uint8Array, text: string): boolean {
  const needle = new Uint8Array(text.length * 2);
  for (let i = 0; i < text.length; i++) needle[2 * i] = text.charCodeAt(i);
  outer: for (let at = b.indexOf(needle[0]); at >= 0 && at + needle.length <= b.length; at = b.indexOf(needle[0], at + 1)) {
    for (let k = 1; k < needle.length; k++) if (b[at + k] !== needle[k]) continue outer;
    return true;
  }
  return false;
}
