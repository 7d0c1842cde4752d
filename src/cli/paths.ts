/**
 * What a path on the command line names, in the words a message needs: a missing file (and which
 * part of its path is missing), a folder, a named pipe or other non-regular file, a file that
 * differs from the one meant only by letter case. Inputs and the --out file share these checks.
 */
import { existsSync, readdirSync, statSync, type Stats } from 'node:fs';
import { basename, dirname, resolve } from 'node:path';

/** What a non-regular file is, in plain words ("a named pipe"), or null for a regular file or folder. */
export function specialKind(st: Stats): string | null {
  if (st.isFIFO()) return 'a named pipe (FIFO)';
  if (st.isSocket()) return 'a socket';
  if (st.isCharacterDevice()) return 'a character device';
  if (st.isBlockDevice()) return 'a block device';
  return null;
}

/**
 * Why `path` does not exist, as the end of a sentence: "there is no folder "data"", or ""table.csv" is a
 * file, not a folder", or (for the last part) a name that differs only in letter case. Empty when
 * nothing more precise than "does not exist" can be said.
 */
export function whyMissing(path: string): string {
  const full = resolve(path);
  // walk up to the nearest part that exists
  let missing = full;
  let parent = dirname(missing);
  while (parent !== missing && !existsSync(parent)) {
    missing = parent;
    parent = dirname(parent);
  }
  let parentStat: Stats | null = null;
  try {
    parentStat = statSync(parent);
  } catch {
    return '';
  }
  if (!parentStat.isDirectory()) return `"${shown(path, parent)}" is a file, not a folder`;
  const alike = sameIgnoringCase(parent, basename(missing));
  if (missing !== full) {
    return `there is no folder "${shown(path, missing)}"${alike ? ` (there is "${alike}", which differs in letter case)` : ''}`;
  }
  return alike ? `there is "${alike}" in that folder, which differs in letter case` : '';
}

/** The part of the user's path that names `abs` (keeps relative paths relative in messages). */
function shown(userPath: string, abs: string): string {
  const full = resolve(userPath);
  if (!full.startsWith(abs)) return abs;
  const drop = full.length - abs.length;
  return drop === 0 ? userPath : userPath.slice(0, userPath.length - drop).replace(/[\\/]+$/, '') || abs;
}

function sameIgnoringCase(folder: string, name: string): string | null {
  try {
    const lower = name.toLowerCase();
    return readdirSync(folder).find((e) => e !== name && e.toLowerCase() === lower) ?? null;
  } catch {
    return null;
  }
}
