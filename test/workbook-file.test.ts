// Writing the results file safely. Source: POSIX rename(2) semantics as Node's fs.rename exposes them
// (a rename within one folder replaces the target in one step, so a reader sees the old file or the
// new one, never half of either); the folder listings are read back with node:fs itself.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtemp, readdir, readFile, rm, mkdir, writeFile, chmod } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeWorkbookFile } from '../src/workbook/write-file.js';
import { InputError } from '../src/errors.js';

let dir = '';
beforeAll(async () => { dir = await mkdtemp(join(tmpdir(), 'spillway-write-')); });
afterAll(async () => { await rm(dir, { recursive: true, force: true }); });

const bytes = Uint8Array.from({ length: 5000 }, (_, i) => (i * 31) % 251);

describe('writeWorkbookFile', () => {
  it('writes the bytes and leaves no temporary file', async () => {
    const path = join(dir, 'results.xlsx');
    await writeWorkbookFile(path, bytes);
    expect(new Uint8Array(await readFile(path))).toEqual(bytes);
    // replacing an existing file is one rename: the old one stays whole until then
    await writeWorkbookFile(path, bytes.subarray(0, 10), { replace: true });
    expect((await readFile(path)).length).toBe(10);
    expect(await readdir(dir)).toEqual(['results.xlsx']);
  });

  it('refuses a path in a missing folder, naming it, and leaves nothing', async () => {
    const path = join(dir, 'no-such-folder', 'results.xlsx');
    await expect(writeWorkbookFile(path, bytes)).rejects.toThrow(InputError);
    await expect(writeWorkbookFile(path, bytes)).rejects.toThrow(/no-such-folder/);
    expect(await readdir(dir)).toEqual(['results.xlsx']);
  });

  it('removes its temporary file when the final rename fails', async () => {
    // a non-empty folder where the file should go makes the rename fail after the bytes were written
    const sub = join(dir, 'case');
    await mkdir(join(sub, 'taken.xlsx'), { recursive: true });
    await writeFile(join(sub, 'taken.xlsx', 'inside.txt'), 'x');
    await expect(writeWorkbookFile(join(sub, 'taken.xlsx'), bytes)).rejects.toThrow(InputError);
    expect(await readdir(sub)).toEqual(['taken.xlsx']);
    expect(await readdir(join(sub, 'taken.xlsx'))).toEqual(['inside.txt']);
  });

  it('leaves nothing when the folder cannot be written to', async () => {
    if (process.getuid?.() === 0) return; // root writes anywhere; the rename case above covers failure clean-up
    const ro = join(dir, 'read-only');
    await mkdir(ro);
    await chmod(ro, 0o500);
    await expect(writeWorkbookFile(join(ro, 'r.xlsx'), bytes)).rejects.toThrow(InputError);
    expect(await readdir(ro)).toEqual([]);
  });
});
