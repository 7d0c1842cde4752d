/**
 * Where an output file may go: the results workbook (--out), the areas as GeoJSON (--out-geojson), each
 * picture (--pictures). Checked before the analysis runs where the name is known then (a refusal costs
 * the user no waiting) and the write itself never replaces a file it was not allowed to:
 * - the path is resolved to the file it would really write (after `..`, symlinks and letter
 *   case on file systems that ignore it) and compared with every input by path and by file identity
 *   (device and inode, which also catches hard links): an input is never overwritten;
 * - an existing file is replaced only with --overwrite, never when it is read-only (its permissions
 *   would change silently), and keeps its permission bits when it is replaced;
 * - folders, named pipes, devices and dangling links are refused by name.
 * Unfinished temporary files of earlier runs that were killed outright are swept from the folder.
 */
import { accessSync, constants, lstatSync, readdirSync, realpathSync, rmSync, statSync, type Stats } from 'node:fs';
import { basename, dirname, extname, join, resolve } from 'node:path';
import { InputError } from '../errors.js';
import { formatBytes } from '../core/words.js';
import { isOwnStalePart } from '../workbook/write-file.js';
import { specialKind, whyMissing } from './paths.js';
import { formatCount } from '../core/count.js';

export interface InputPath {
  path: string;
  /** the option that named it, for messages: "--data", "--boundary", "--neighbours" */
  option: string;
}

export interface OutputPlan {
  /** the path as the user gave it (for messages) */
  given: string;
  /** the file that will really be written (symlinks followed) */
  target: string;
  /** the file exists and --overwrite allows replacing it: its permission bits, kept */
  replaceMode?: number;
  /** what was done before the run (stale temporary files removed) */
  notes: string[];
}

/**
 * Checks one output path against the inputs and what is already there. `option` names the option in
 * messages ("--out", "--out-geojson", "--pictures"); the stale temporary files of its folder are swept.
 */
export function planOutput(out: string, inputs: InputPath[], overwrite: boolean, option = '--out'): OutputPlan {
  const given = out;
  const full = resolve(out);
  let link: Stats | null = null;
  try {
    link = lstatSync(full);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code !== 'ENOENT' && code !== 'ENOTDIR') throw new InputError(`Cannot use ${option} "${given}" (${code ?? 'error'}).`, { file: given });
  }
  let target: string;
  let existing: Stats | null = null;
  if (link === null) {
    const folder = dirname(full);
    let realFolder: string;
    try {
      realFolder = realpathSync(folder);
      if (!statSync(realFolder).isDirectory()) throw Object.assign(new Error('not a folder'), { code: 'ENOTDIR' });
    } catch {
      const why = whyMissing(out);
      throw new InputError(`Cannot write ${option} "${given}": ${why || `the folder "${dirname(out)}" does not exist`}. Create the folder or choose another output path.`, { file: given });
    }
    target = join(realFolder, basename(full));
    // on a file system that ignores letter case, "Book.xlsx" may already be "book.xlsx"
    try {
      existing = statSync(target);
    } catch {
      existing = null;
    }
  } else {
    try {
      target = realpathSync(full);
      existing = statSync(target);
    } catch {
      throw new InputError(`Cannot write ${option} "${given}": it is a link to a file that does not exist. Remove the link or choose another output path.`, { file: given });
    }
  }

  for (const input of inputs) {
    let realInput: string;
    let st: Stats;
    try {
      realInput = realpathSync(input.path);
      st = statSync(realInput);
    } catch {
      continue; // missing inputs are reported when they are read
    }
    const same = realInput === target || (existing !== null && st.dev === existing.dev && st.ino === existing.ino);
    if (same) {
      throw new InputError(
        `${option} "${given}" is the same file as the ${input.option} file "${input.path}"; Spillway never writes over its inputs. ` +
          (option === '--pictures'
            ? 'Name another folder for the pictures.'
            : `Name a new file for the results, e.g. ${option} ${suggestName(input.path, extname(given))}.`),
        { file: given },
      );
    }
  }

  let replaceMode: number | undefined;
  if (existing) {
    if (existing.isDirectory()) throw new InputError(`Cannot write ${option} "${given}": it is a folder. Name a file inside it, e.g. ${option} ${join(given, `results${extname(given) || '.xlsx'}`)}.`, { file: given });
    const kind = specialKind(existing);
    if (kind) throw new InputError(`Cannot write ${option} "${given}": it is ${kind}, not a regular file. Name a file.`, { file: given });
    const what = `"${given}" already exists (${formatBytes(existing.size)}, last changed ${existing.mtime.toISOString().slice(0, 16).replace('T', ' ')} UTC)`;
    if (isReadOnly(target, existing)) {
      throw new InputError(
        `${what} and is read-only; Spillway does not replace read-only files, not even with --overwrite. ` +
          'Make it writable first if it should be replaced, or choose another output path.',
        { file: given },
      );
    }
    if (!overwrite) throw new InputError(`${what}; add --overwrite to replace it, or choose another output path.`, { file: given });
    replaceMode = existing.mode & 0o7777;
  }
  return { given, target, ...(replaceMode !== undefined ? { replaceMode } : {}), notes: sweepStaleParts(dirname(target)) };
}

/** How a planned file is written: replacing the existing file, with its permission bits, when --overwrite allowed it. */
export function writeOptions(plan: OutputPlan): { replace?: boolean; mode?: number } {
  return plan.replaceMode !== undefined ? { replace: true, mode: plan.replaceMode } : {};
}

/** No write permission bit at all, or the system refuses writing (a root user passes access checks, so the bits decide). */
function isReadOnly(path: string, st: Stats): boolean {
  if ((st.mode & 0o222) === 0) return true;
  try {
    accessSync(path, constants.W_OK);
    return false;
  } catch {
    return true;
  }
}

function suggestName(inputPath: string, ext: string): string {
  const stem = basename(inputPath, extname(inputPath));
  return join(dirname(inputPath), `${stem}-results${ext || '.xlsx'}`);
}

/** Removes our own temporary files left by runs that were killed before they could clean up. */
export function sweepStaleParts(folder: string): string[] {
  let names: string[];
  try {
    names = readdirSync(folder);
  } catch {
    return [];
  }
  const removed: string[] = [];
  for (const name of names) {
    const path = join(folder, name);
    if (!isOwnStalePart(name, path)) continue;
    try {
      rmSync(path, { force: true });
      removed.push(name);
    } catch {
      // someone else's file after all, or not ours to remove: leave it
    }
  }
  return removed.length
    ? [`removed ${formatCount(removed.length)} unfinished temporary file(s) left in ${folder} by an earlier run that was stopped: ${removed.join(', ')}.`]
    : [];
}

export interface PictureFolder {
  /** the folder as the user gave it (for messages) */
  given: string;
  /** the folder that will really hold the pictures (links followed; made after the run when missing) */
  folder: string;
  exists: boolean;
  notes: string[];
}

/**
 * Checks the --pictures folder before the run: an existing folder (stale temporary files swept), or
 * a new one (made after the run) whose parent exists and is writable; missing parents are not made, as a
 * typing slip should not leave a tree of folders. A file, a named pipe or a path through a file is
 * refused by name. The
 * picture files themselves are checked one by one once their names are known, before any is written.
 */
export function planPictureFolder(dir: string): PictureFolder {
  const given = dir;
  const full = resolve(dir);
  const statOrNull = (f: (p: string) => Stats): Stats | null => {
    try {
      return f(full);
    } catch {
      return null; // missing, or a path through a file: told apart below
    }
  };
  const link = statOrNull((p) => lstatSync(p));
  const st = link ? statOrNull((p) => statSync(p)) : null;
  if (link && !st) throw new InputError(`Cannot use --pictures "${given}": it is a link to a folder that does not exist. Remove the link or name another folder.`, { file: given });
  if (st) {
    if (!st.isDirectory()) {
      const kind = specialKind(st);
      throw new InputError(`--pictures "${given}" is ${kind ?? 'a file'}, not a folder; name a folder for the pictures (it is made when missing).`, { file: given });
    }
    const folder = realpathSync(full);
    return { given, folder, exists: true, notes: sweepStaleParts(folder) };
  }
  const parent = dirname(full);
  let parentIsFolder = false;
  try {
    parentIsFolder = statSync(parent).isDirectory();
  } catch {
    parentIsFolder = false;
  }
  if (!parentIsFolder) {
    const why = whyMissing(dir);
    throw new InputError(`Cannot make the --pictures folder "${given}": ${why || `the folder "${dirname(dir)}" does not exist`}. Create it or name another folder.`, { file: given });
  }
  const realParent = realpathSync(parent);
  try {
    accessSync(realParent, constants.W_OK);
  } catch {
    throw new InputError(`Cannot make the --pictures folder "${given}": the folder "${dirname(dir)}" is not writable. Name another folder.`, { file: given });
  }
  return { given, folder: join(realParent, basename(full)), exists: false, notes: [] };
}
