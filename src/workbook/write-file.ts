/**
 * Writing the finished workbook to disk for the CLI (Node only). The bytes go to a hidden temporary
 * file in the same folder, which then takes the target's name in one step: a reader never sees half a
 * file. The temporary file is removed on any failure, on Ctrl-C and on termination signals (a handler
 * is held only while it exists); one left by a run killed outright (which no handler sees) is
 * recognised by its name, `.NAME.spillway-HOST-PID-RANDOM.part`, and swept by the next run once that
 * process is gone.
 * Without `replace`, the target is created with a hard link, which fails rather than replace a file
 * that appeared meanwhile (falling back to a check and a rename where links are not supported).
 */
import { link, open, rename, rm, stat, lstat, chmod, unlink } from 'node:fs/promises';
import { rmSync, statSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { randomBytes, createHash } from 'node:crypto';
import { hostname } from 'node:os';
import { InputError } from '../errors.js';

const USER_FIXABLE = new Set(['ENOENT', 'ENOTDIR', 'EACCES', 'EPERM', 'EISDIR', 'EROFS', 'ENOSPC', 'EEXIST', 'EDQUOT']);
const SIGNALS: NodeJS.Signals[] = ['SIGINT', 'SIGTERM', 'SIGHUP', 'SIGBREAK'];
/** A temporary file of another machine (a shared folder) whose process cannot be asked is stale after this long. */
const FOREIGN_STALE_MS = 24 * 3600 * 1000;

export interface WriteFileOptions {
  /** replace an existing file (the command line's --overwrite); default: refuse */
  replace?: boolean;
  /** permission bits for the new file (those of the file it replaces) */
  mode?: number;
  /** called once the bytes are in the temporary file, before it takes the target's name (tests stop here to interrupt the write) */
  afterWrite?: (tempPath: string) => Promise<void>;
}

const HOST = createHash('sha256').update(hostname()).digest('hex').slice(0, 6);
const PART = /^\..+\.spillway-([0-9a-f]{6})-(\d+)-[0-9a-f]+\.part$/;
/** the earlier naming (.NAME.RANDOM.part), without host or process */
const OLD_PART = /^\..+\.[0-9a-f]{12}\.part$/;

/** What a file-system error code means, in words (the code kept for searching). */
export function errorInWords(code: string | undefined): string {
  const words: Record<string, string> = {
    ENOSPC: 'the disk is full',
    EDQUOT: 'the disk quota is used up',
    EROFS: 'the disk or folder is read-only',
    EACCES: 'permission denied (the folder or file is not writable for you)',
    EPERM: 'the operation is not permitted (the file may be locked or protected)',
    ENOENT: 'the folder does not exist',
    ENOTDIR: 'part of the path is a file, not a folder',
    EISDIR: 'it is a folder',
    EEXIST: 'a file of that name exists',
  };
  return code ? `${words[code] ?? 'the system refused'} (${code})` : 'the system refused';
}

export function partName(target: string): string {
  return join(dirname(target), `.${basename(target)}.spillway-${HOST}-${process.pid}-${randomBytes(4).toString('hex')}.part`);
}

/** Whether `name` (in its folder at `path`) is a temporary file of ours whose run has ended. */
export function isOwnStalePart(name: string, path: string): boolean {
  const m = PART.exec(name);
  const old = !m && OLD_PART.test(name);
  if (!m && !old) return false;
  let age: number;
  try {
    const st = statSync(path);
    if (!st.isFile()) return false;
    age = Date.now() - st.mtimeMs;
  } catch {
    return false;
  }
  if (!m || m[1] !== HOST) return age > FOREIGN_STALE_MS;
  const pid = Number(m[2]);
  if (pid === process.pid) return false;
  try {
    process.kill(pid, 0);
    return false; // still running (or not ours to signal): its file is in use
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'ESRCH';
  }
}

/** Removes `path` if the process is interrupted while it exists. Returns the function that stops watching. */
function removeOnInterrupt(path: string): () => void {
  const onSignal = (signal: NodeJS.Signals) => {
    rmSync(path, { force: true });
    stop();
    // with our handler gone, the signal's default action ends the process as it would have
    process.kill(process.pid, signal);
  };
  const onExit = () => { rmSync(path, { force: true }); };
  const installed: NodeJS.Signals[] = [];
  for (const s of SIGNALS) {
    try {
      process.on(s, onSignal);
      installed.push(s);
    } catch {
      // a signal this platform does not have
    }
  }
  process.on('exit', onExit);
  function stop() {
    for (const s of installed) process.removeListener(s, onSignal);
    process.removeListener('exit', onExit);
  }
  return stop;
}

export async function writeWorkbookFile(path: string, bytes: Uint8Array, opts: WriteFileOptions = {}): Promise<void> {
  const dir = dirname(path);
  const tmp = partName(path);
  let created = false;
  let stopWatching = () => {};
  try {
    const dirStat = await stat(dir).catch(() => null);
    if (!dirStat?.isDirectory()) {
      throw new InputError(`Cannot write ${path}: the folder ${dir} does not exist. Create it or choose another output path.`, { file: path });
    }
    stopWatching = removeOnInterrupt(tmp);
    const handle = await open(tmp, 'wx', opts.mode ?? 0o666);
    created = true;
    try {
      await handle.writeFile(bytes);
      await handle.sync();
    } finally {
      await handle.close();
    }
    if (opts.mode !== undefined) await chmod(tmp, opts.mode); // the creation mode passes through the umask
    await opts.afterWrite?.(tmp);
    if (opts.replace) {
      await rename(tmp, path);
    } else {
      await placeWithoutReplacing(tmp, path);
    }
    created = false;
  } catch (e) {
    if (created) await rm(tmp, { force: true });
    if (e instanceof InputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    if (code && USER_FIXABLE.has(code)) {
      const fix = code === 'ENOSPC' || code === 'EDQUOT' ? 'Free some space, or choose an output path on another disk.' : 'Check the path and permissions, or choose another output path.';
      throw new InputError(`Cannot write ${path}: ${errorInWords(code)}; it was not written. ${fix}`, { file: path });
    }
    throw e;
  } finally {
    stopWatching();
  }
}

async function placeWithoutReplacing(tmp: string, path: string): Promise<void> {
  try {
    await link(tmp, path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'EEXIST') {
      throw new InputError(`${path} appeared while the results were being written; it was left as it is. Run again with another output path, or with --overwrite.`, { file: path });
    }
    // a file system without hard links: check, then rename
    if (await lstat(path).then(() => true, () => false)) {
      throw new InputError(`${path} appeared while the results were being written; it was left as it is. Run again with another output path, or with --overwrite.`, { file: path });
    }
    await rename(tmp, path);
    return;
  }
  await unlink(tmp);
}
