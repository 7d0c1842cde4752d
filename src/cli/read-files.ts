import { readFileSync, existsSync, statSync, readdirSync } from 'node:fs';
import { basename, dirname, extname, join } from 'node:path';
import { InputError } from '../errors.js';
import type { NamedBytesLike } from '../pipeline/index.js';

/** Largest file the command line reads (the engine applies its own caps to what is inside). */
export const MAX_FILE_BYTES = 1024 * 1024 * 1024;

export function readNamedFile(path: string, what: string): NamedBytesLike {
  if (!existsSync(path)) throw new InputError(`The ${what} file "${path}" does not exist.`, { file: path });
  const st = statSync(path);
  if (st.isDirectory()) throw new InputError(`The ${what} "${path}" is a folder; name a file.`, { file: path });
  if (st.size > MAX_FILE_BYTES) throw new InputError(`The ${what} file "${path}" is ${(st.size / 2 ** 20).toFixed(0)} MiB, over the 1024 MiB limit.`, { file: path });
  if (st.size === 0) throw new InputError(`The ${what} file "${path}" is empty.`, { file: path });
  try {
    return { name: basename(path), bytes: new Uint8Array(readFileSync(path)) };
  } catch (e) {
    throw new InputError(`The ${what} file "${path}" could not be read (${(e as NodeJS.ErrnoException).code ?? 'error'}).`, { file: path });
  }
}

/**
 * A shapefile is several files with one base name; the user names the .shp and we read the
 * .dbf, .shx, .prj and .cpg beside it (any letter case). Other formats are one file.
 */
export function readBoundaryFiles(path: string): NamedBytesLike[] {
  const main = readNamedFile(path, 'boundary');
  if (extname(path).toLowerCase() !== '.shp') return [main];
  const dir = dirname(path);
  const stem = basename(path, extname(path)).toLowerCase();
  const files = [main];
  for (const entry of readdirSync(dir)) {
    const ext = extname(entry).toLowerCase();
    if (basename(entry, extname(entry)).toLowerCase() !== stem) continue;
    if (['.dbf', '.shx', '.prj', '.cpg'].includes(ext)) files.push(readNamedFile(join(dir, entry), 'boundary'));
  }
  return files;
}
