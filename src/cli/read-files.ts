import { closeSync, constants, fstatSync, openSync, readFileSync, readdirSync, statSync } from 'node:fs';
import { basename, dirname, extname, join } from 'node:path';
import { InputError } from '../errors.js';
import type { NamedBytesLike } from '../pipeline/index.js';
import { MAX_TEXT_BYTES } from '../geo/index.js';
import { specialKind, whyMissing } from './paths.js';

/** Files read as one text: over MAX_TEXT_BYTES they cannot be decoded at all. */
const TEXT_FILE = /\.(geojson|json|topojson|csv|tsv|txt)$/i;

/** Largest file the command line reads (the engine applies its own caps to what is inside). */
export const MAX_FILE_BYTES = 1024 * 1024 * 1024;

/**
 * Checks `path` names a regular file that can be read, and says precisely why not: missing (and
 * which part of the path), a folder, a named pipe or device (reading one would wait for a writer or
 * never end), too large, empty (and, when it is, whether this very command's output was redirected
 * into it).
 */
export function checkInputFile(path: string, what: string): void {
  let st;
  try {
    st = statSync(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT' || code === 'ENOTDIR') {
      const why = whyMissing(path);
      throw new InputError(`The ${what} file "${path}" does not exist${why ? `: ${why}` : ''}.`, { file: path });
    }
    throw new InputError(`The ${what} file "${path}" could not be opened (${code ?? 'error'}).`, { file: path });
  }
  if (st.isDirectory()) throw new InputError(`The ${what} "${path}" is a folder; name a file.`, { file: path });
  const kind = specialKind(st);
  if (kind) {
    throw new InputError(
      `The ${what} "${path}" is ${kind}, not a regular file; Spillway reads its inputs from files. Save what it carries to a file and name that file.`,
      { file: path },
    );
  }
  if (st.size > MAX_FILE_BYTES) throw new InputError(`The ${what} file "${path}" is ${(st.size / 2 ** 20).toFixed(0)} MiB, over the 1024 MiB limit.`, { file: path });
  if (TEXT_FILE.test(path) && st.size > MAX_TEXT_BYTES) {
    // refused before reading: the engine would refuse it after reading every byte
    throw new InputError(
      `The ${what} file "${path}" is ${(st.size / 2 ** 20).toFixed(0)} MiB; text files (GeoJSON, TopoJSON, CSV) can be read up to ${Math.floor(MAX_TEXT_BYTES / 2 ** 20)} MiB, ` +
        'the longest text a JavaScript engine holds. Split the file, or for boundaries use a shapefile, which has no such limit.',
      { file: path },
    );
  }
  if (st.size === 0) {
    const redirected = [1, 2].some((fd) => {
      try {
        const o = fstatSync(fd);
        return o.dev === st.dev && o.ino === st.ino;
      } catch {
        return false;
      }
    });
    throw new InputError(
      `The ${what} file "${path}" is empty.` +
        (redirected ? ' It is also where this command\'s output is redirected, and the shell emptied it before Spillway started; redirect the output to another file.' : ''),
      { file: path },
    );
  }
}

export function readNamedFile(path: string, what: string): NamedBytesLike {
  checkInputFile(path, what);
  let fd: number;
  try {
    // non-blocking, so a file swapped for a named pipe since the check cannot hang the open
    fd = openSync(path, constants.O_NONBLOCK === undefined ? 'r' : constants.O_RDONLY | constants.O_NONBLOCK);
  } catch (e) {
    throw new InputError(`The ${what} file "${path}" could not be read (${(e as NodeJS.ErrnoException).code ?? 'error'}).`, { file: path });
  }
  try {
    if (!fstatSync(fd).isFile()) throw new InputError(`The ${what} "${path}" is not a regular file; name a file.`, { file: path });
    return { name: basename(path), bytes: new Uint8Array(readFileSync(fd)) };
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(`The ${what} file "${path}" could not be read (${(e as NodeJS.ErrnoException).code ?? 'error'}).`, { file: path });
  } finally {
    closeSync(fd);
  }
}

const SHAPEFILE_PARTS = ['.dbf', '.shx', '.prj', '.cpg'];

/**
 * A shapefile is several files with one base name; the user names the .shp and we read the
 * .dbf, .shx, .prj and .cpg beside it (any letter case). Other formats are one file. Returns every
 * path that will be read, the named one first.
 */
export function boundaryPaths(path: string): string[] {
  if (extname(path).toLowerCase() !== '.shp') return [path];
  const dir = dirname(path);
  const stem = basename(path, extname(path)).toLowerCase();
  const paths = [path];
  let entries: string[] = [];
  try {
    entries = readdirSync(dir);
  } catch {
    return paths; // the .shp itself is then reported missing
  }
  for (const entry of entries) {
    const ext = extname(entry).toLowerCase();
    if (basename(entry, extname(entry)).toLowerCase() !== stem) continue;
    if (SHAPEFILE_PARTS.includes(ext)) paths.push(join(dir, entry));
  }
  return paths;
}

export function readBoundaryFiles(path: string): NamedBytesLike[] {
  const [main, ...parts] = boundaryPaths(path);
  return [readNamedFile(main, 'boundary'), ...parts.map((p) => readNamedFile(p, 'boundary'))];
}
