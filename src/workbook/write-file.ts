/**
 * Writing the finished workbook to disk for the CLI (Node only). The bytes go to a temporary file in
 * the same folder, which is then renamed over the target: a reader never sees half a file, and on any
 * failure the temporary file is removed and nothing is left behind.
 */
import { open, rename, rm, stat } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { InputError } from '../errors.js';

const USER_FIXABLE = new Set(['ENOENT', 'ENOTDIR', 'EACCES', 'EPERM', 'EISDIR', 'EROFS', 'ENOSPC', 'EEXIST']);

export async function writeWorkbookFile(path: string, bytes: Uint8Array): Promise<void> {
  const dir = dirname(path);
  const tmp = join(dir, `.${basename(path)}.${randomBytes(6).toString('hex')}.part`);
  let created = false;
  try {
    const dirStat = await stat(dir).catch(() => null);
    if (!dirStat?.isDirectory()) {
      throw new InputError(`Cannot write ${path}: the folder ${dir} does not exist. Create it or choose another output path.`, { file: path });
    }
    const handle = await open(tmp, 'wx');
    created = true;
    try {
      await handle.writeFile(bytes);
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(tmp, path);
    created = false;
  } catch (e) {
    if (created) await rm(tmp, { force: true });
    if (e instanceof InputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    if (code && USER_FIXABLE.has(code)) {
      throw new InputError(`Cannot write ${path} (${code}: ${(e as Error).message}). Check the path and permissions, or choose another output path.`, { file: path });
    }
    throw e;
  }
}
