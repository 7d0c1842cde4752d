// Outputs never overwrite inputs (issue #17 part 1), on the command line: every --out that would
// write over an input (by path after `..` and links, or by file identity: hard links), an existing
// or read-only file, a folder, a named pipe or a dangling link is refused before the run with a
// message naming it, and the inputs and the folder are left byte for byte as they were. Inputs that
// are not regular files are refused by name. An interrupted write leaves no temporary file, and one
// left by a run killed outright is swept by the next run. Source of the file-system facts: POSIX
// link(2), rename(2) and stat(2) (device and inode identify a file), as Node's fs exposes them.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync, execFileSync } from 'node:child_process';
import {
  chmodSync, closeSync, existsSync, linkSync, mkdirSync, mkdtempSync, openSync, readdirSync, readFileSync, rmSync, statSync,
  symlinkSync, utimesSync, writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createHash } from 'node:crypto';
import { main } from '../../src/cli/run.js';
import { errorInWords, partName } from '../../src/workbook/write-file.js';
import { writePictureFiles } from '../../src/cli/write-extras.js';
import { ROOT, STACK_LINE } from '../helpers/cli.js';
import { columbus, gridCodesOnly, gridCsv, gridSheet, xlsxFile } from './make.js';

let dir = '';
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'spillway-out-')); });
afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

const BASE = ['fit', '--id', 'code', '--y', 'y', '--x', 'x1,x2', '--models', 'ols', '--permutations', '0', '--draws', '10'];

async function runMain(args: string[]) {
  let stdout = '';
  let stderr = '';
  const code = await main(args, { stdout: (t) => { stdout += t; }, stderr: (t) => { stderr += t; } });
  return { code, stdout, stderr };
}

/** A fresh folder with the grid as GeoJSON, its table as CSV and as a workbook. */
async function folder(name: string) {
  const f = join(dir, name);
  mkdirSync(f, { recursive: true });
  writeFileSync(join(f, 'districts.geojson'), gridCodesOnly().bytes);
  writeFileSync(join(f, 'table.csv'), gridCsv().bytes);
  writeFileSync(join(f, 'book.xlsx'), (await xlsxFile('book.xlsx', { Districts: gridSheet() })).bytes);
  return f;
}

function snapshot(f: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const name of readdirSync(f).sort()) {
    const p = join(f, name);
    const st = statSync(p, { throwIfNoEntry: false });
    out[name] = !st ? 'dangling' : st.isFile() ? `${createHash('sha256').update(readFileSync(p)).digest('hex')}:${(st.mode & 0o777).toString(8)}` : st.isDirectory() ? 'folder' : 'special';
  }
  return out;
}

/** Runs and checks a refusal: exit 2, one message with the fragments, the folder exactly as before. */
async function refused(f: string, args: string[], expected: (string | RegExp)[]) {
  const before = snapshot(f);
  const r = await runMain(args);
  expect(r.code, r.stderr).toBe(2);
  expect(r.stdout).toBe('');
  expect(r.stderr.startsWith('spillway: ')).toBe(true);
  expect(r.stderr).not.toMatch(STACK_LINE);
  expect(r.stderr.trimEnd().split('\n').length).toBe(1);
  for (const e of expected) {
    if (typeof e === 'string') expect(r.stderr).toContain(e);
    else expect(r.stderr).toMatch(e);
  }
  expect(snapshot(f)).toEqual(before);
  return r;
}

describe('--out never writes over an input', () => {
  it('--out equal to --data (a workbook) is refused and the workbook is untouched', async () => {
    const f = await folder('same');
    const book = join(f, 'book.xlsx');
    await refused(f, [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', book, '--out', book],
      [`--out "${book}" is the same file as the --data file`, 'never writes over its inputs', 'book-results.xlsx']);
    // --overwrite does not change that
    await refused(f, [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', book, '--out', book, '--overwrite'], ['is the same file as the --data file']);
  });

  it('./sub/../book.xlsx, a symbolic link and a hard link to the workbook are the same file', async () => {
    const f = await folder('aliases');
    mkdirSync(join(f, 'sub'));
    symlinkSync(join(f, 'book.xlsx'), join(f, 'link.xlsx'));
    linkSync(join(f, 'book.xlsx'), join(f, 'hard.xlsx'));
    const args = [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'book.xlsx')];
    for (const out of [join(f, 'sub', '..', 'book.xlsx'), join(f, 'link.xlsx'), join(f, 'hard.xlsx')]) {
      await refused(f, [...args, '--out', out, '--overwrite'], [`--out "${out}" is the same file as the --data file`]);
    }
  });

  it('a GeoJSON boundary file named areas.xlsx is not replaced by --out areas.xlsx', async () => {
    const f = await folder('boundary');
    writeFileSync(join(f, 'areas.xlsx'), gridCodesOnly().bytes);
    await refused(f, [...BASE, '--boundary', join(f, 'areas.xlsx'), '--data', join(f, 'table.csv'), '--out', join(f, 'areas.xlsx'), '--overwrite'],
      ['is the same file as the --boundary file']);
  });

  it('a shapefile part (the .dbf beside the .shp, hard-linked as an .xlsx name) is an input too', async () => {
    const f = await folder('shapefile');
    const cb = columbus();
    for (const ext of ['shp', 'shx', 'dbf'] as const) writeFileSync(join(f, `columbus.${ext}`), cb[ext]);
    linkSync(join(f, 'columbus.dbf'), join(f, 'attributes.xlsx'));
    await refused(f, ['fit', '--boundary', join(f, 'columbus.shp'), '--id', 'POLYID', '--y', 'CRIME', '--x', 'INC', '--models', 'ols', '--out', join(f, 'attributes.xlsx'), '--overwrite'],
      [/is the same file as the --boundary file ".*columbus\.dbf"/]);
  });

  it('the neighbour list is an input too', async () => {
    const f = await folder('edges');
    writeFileSync(join(f, 'links.xlsx'), 'origin,neighbour\nD01,D02\nD02,D01\n');
    await refused(f, [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv'), '--neighbours', join(f, 'links.xlsx'), '--out', join(f, 'links.xlsx'), '--overwrite'],
      ['is the same file as the --neighbours file']);
  });
});

describe('--out: existing, read-only and odd targets', () => {
  it('an existing file is kept unless --overwrite is given, and then keeps its permissions', async () => {
    const f = await folder('existing');
    const out = join(f, 'results.xlsx');
    writeFileSync(out, 'an earlier result');
    chmodSync(out, 0o640);
    const args = [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv'), '--out', out];
    await refused(f, args, [`"${out}" already exists (17 bytes, last changed`, 'add --overwrite to replace it']);
    const r = await runMain([...args, '--overwrite']);
    expect(r.code, r.stderr).toBe(0);
    expect(readFileSync(out).subarray(0, 2).toString()).toBe('PK');
    expect(statSync(out).mode & 0o777).toBe(0o640);
    expect(readdirSync(f).filter((n) => n.endsWith('.part'))).toEqual([]);
  });

  it('a read-only file is never replaced, not even with --overwrite, and its mode is unchanged', async () => {
    const f = await folder('read-only');
    const out = join(f, 'results.xlsx');
    writeFileSync(out, 'keep me');
    chmodSync(out, 0o444);
    await refused(f, [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv'), '--out', out, '--overwrite'],
      ['already exists', 'is read-only; Spillway does not replace read-only files, not even with --overwrite']);
    expect(statSync(out).mode & 0o777).toBe(0o444);
  });

  it('a folder, a named pipe, a dangling link and a path through a file are refused by name', async () => {
    const f = await folder('odd-targets');
    const args = [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv')];
    mkdirSync(join(f, 'folder.xlsx'));
    await refused(f, [...args, '--out', join(f, 'folder.xlsx'), '--overwrite'], ['folder.xlsx": it is a folder']);
    execFileSync('mkfifo', [join(f, 'pipe.xlsx')]);
    await refused(f, [...args, '--out', join(f, 'pipe.xlsx'), '--overwrite'], ['pipe.xlsx": it is a named pipe (FIFO), not a regular file']);
    symlinkSync(join(f, 'gone.xlsx'), join(f, 'dangling.xlsx'));
    await refused(f, [...args, '--out', join(f, 'dangling.xlsx')], ['it is a link to a file that does not exist']);
    await refused(f, [...args, '--out', join(f, 'table.csv', 'r.xlsx')], [`"${join(f, 'table.csv')}" is a file, not a folder`]);
    await refused(f, [...args, '--out', join(f, 'missing', 'r.xlsx')], [`there is no folder "${join(f, 'missing')}"`]);
    const r = await runMain([...args, '--overwrite']);
    expect(r.stderr).toContain('--overwrite goes with --out');
  });
});

describe('inputs that are not regular files, or not where they are said to be', () => {
  it('a named pipe as --data, --boundary or --neighbours is refused at once, not read (which would wait for a writer)', async () => {
    const f = await folder('pipes');
    const pipe = join(f, 'pipe.csv');
    execFileSync('mkfifo', [pipe]);
    const base = [...BASE, '--boundary', join(f, 'districts.geojson')];
    await refused(f, [...base, '--data', pipe], [`The data "${pipe}" is a named pipe (FIFO), not a regular file`]);
    await refused(f, [...BASE, '--boundary', pipe], ['is a named pipe (FIFO)']);
    await refused(f, [...base, '--neighbours', pipe], ['The neighbour list "', 'is a named pipe (FIFO)']);
    const dev = await runMain([...base, '--data', '/dev/null']);
    expect(dev.stderr).toContain('"/dev/null" is a character device, not a regular file');
  });

  it('a file in a missing folder, a file used as a folder and a letter-case slip are told apart', async () => {
    const f = await folder('paths');
    const base = [...BASE, '--boundary', join(f, 'districts.geojson')];
    await refused(f, [...base, '--data', join(f, 'nowhere', 'table.csv')], ['table.csv" does not exist: there is no folder', 'nowhere"']);
    await refused(f, [...base, '--data', join(f, 'table.csv', 'x.csv')], [`"${join(f, 'table.csv')}" is a file, not a folder`]);
    await refused(f, [...base, '--data', join(f, 'Table.csv')], ['does not exist: there is "table.csv" in that folder, which differs in letter case']);
  });

  it('an input emptied by redirecting this very command\'s output into it is named as such', () => {
    const f = join(dir, 'redirect');
    mkdirSync(f, { recursive: true });
    writeFileSync(join(f, 'districts.geojson'), gridCodesOnly().bytes);
    const table = join(f, 'table.csv');
    const fd = openSync(table, 'w'); // what `> table.csv` does before the command starts
    try {
      const r = spawnSync(process.execPath, [join(ROOT, 'bin', 'spillway.mjs'), ...BASE, '--boundary', join(f, 'districts.geojson'), '--data', table],
        { stdio: ['ignore', fd, 'pipe'], encoding: 'utf8', env: { ...process.env, SPILLWAY_FROM_SOURCE: '1' }, timeout: 60_000 });
      expect(r.status).toBe(2);
      expect(r.stderr).toContain('table.csv" is empty. It is also where this command\'s output is redirected');
    } finally {
      closeSync(fd);
    }
  });
});

describe('the temporary file', () => {
  /** A child process that writes a file and stops just before the file takes its name, then reports where. */
  function interruptedWriter(target: string) {
    const script = `
      import { writeWorkbookFile } from ${JSON.stringify(join(ROOT, 'src', 'workbook', 'write-file.ts'))};
      await writeWorkbookFile(${JSON.stringify(target)}, new Uint8Array(100000), {
        afterWrite: async (tmp) => { process.stdout.write(tmp + '\\n'); await new Promise(() => setInterval(() => {}, 1000)); },
      });`;
    return spawn(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
  }

  for (const signal of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) {
    it(`${signal} during the write removes the hidden .part file and ends the process by that signal`, async () => {
      const f = join(dir, `signal-${signal}`);
      mkdirSync(f, { recursive: true });
      const child = interruptedWriter(join(f, 'results.xlsx'));
      const tmp = await new Promise<string>((done, fail) => {
        let out = '';
        child.stdout.on('data', (d) => { out += d; if (out.includes('\n')) done(out.trim()); });
        child.on('exit', () => fail(new Error('the writer ended early')));
      });
      expect(existsSync(tmp)).toBe(true);
      expect(tmp).toMatch(/[\\/]\.results\.xlsx\.spillway-[0-9a-f]{6}-\d+-[0-9a-f]+\.part$/);
      const ended = new Promise<NodeJS.Signals | null>((done) => child.on('exit', (_code, sig) => done(sig)));
      child.kill(signal);
      expect(await ended).toBe(signal);
      expect(readdirSync(f)).toEqual([]);
    }, 60_000);
  }

  it('one left by a run killed outright is swept by the next run (with a note); a live run\'s and a fresh foreign one are kept', async () => {
    const f = await folder('stale');
    const gone = spawnSync(process.execPath, ['-e', '0']).pid!; // a process that has ended
    const stale = partName(join(f, 'results.xlsx')).replace(/-\d+-([0-9a-f]+)\.part$/, `-${gone}-$1.part`);
    const live = partName(join(f, 'other.xlsx')); // this test's own process: alive
    const foreign = join(f, '.old.xlsx.spillway-abcdef-1-ab.part');
    const oldStyle = join(f, '.results.xlsx.0123456789ab.part');
    for (const p of [stale, live, foreign, oldStyle]) writeFileSync(p, 'partial');
    const day = Date.now() / 1000 - 2 * 24 * 3600;
    utimesSync(oldStyle, day, day);
    const r = await runMain([...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv'), '--out', join(f, 'results.xlsx')]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/note: removed 2 unfinished temporary file\(s\) left in .* by an earlier run that was stopped/);
    expect(existsSync(stale)).toBe(false);
    expect(existsSync(oldStyle)).toBe(false);
    expect(existsSync(live)).toBe(true);
    expect(existsSync(foreign)).toBe(true); // another machine's, less than a day old: perhaps still being written
    expect(existsSync(join(f, 'results.xlsx'))).toBe(true);
  });
});

describe('--out-geojson and --pictures meet the same rules as --out', () => {
  it('--out-geojson naming the boundary file, or a link to it, is refused even with --overwrite, before the run', async () => {
    const f = await folder('geojson-input');
    const boundary = join(f, 'districts.geojson');
    symlinkSync(boundary, join(f, 'link.geojson'));
    linkSync(boundary, join(f, 'hard.json'));
    const args = [...BASE, '--boundary', boundary, '--data', join(f, 'table.csv'), '--overwrite'];
    for (const out of [boundary, join(f, 'sub', '..', 'districts.geojson'), join(f, 'link.geojson'), join(f, 'hard.json')]) {
      await refused(f, [...args, '--out-geojson', out],
        [`--out-geojson "${out}" is the same file as the --boundary file`, 'never writes over its inputs', /e\.g\. --out-geojson .*districts-results\.(geo)?json\./]);
    }
  });

  it('--out-geojson as a hard link to the table or the neighbour list is refused', async () => {
    const f = await folder('geojson-table');
    writeFileSync(join(f, 'links.csv'), 'origin,neighbour\nD01,D02\nD02,D01\n');
    linkSync(join(f, 'table.csv'), join(f, 'table.geojson'));
    linkSync(join(f, 'links.csv'), join(f, 'links.geojson'));
    const args = [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv'), '--overwrite'];
    await refused(f, [...args, '--out-geojson', join(f, 'table.geojson')], ['is the same file as the --data file']);
    await refused(f, [...args, '--neighbours', join(f, 'links.csv'), '--out-geojson', join(f, 'links.geojson')], ['is the same file as the --neighbours file']);
  });

  it('an existing GeoJSON is kept without --overwrite, replaced with it (permissions kept), never when read-only', async () => {
    const f = await folder('geojson-existing');
    const out = join(f, 'areas.geojson');
    writeFileSync(out, '{"earlier":1}');
    chmodSync(out, 0o640);
    const args = [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv'), '--out-geojson', out];
    await refused(f, args, [`"${out}" already exists (13 bytes`, 'add --overwrite to replace it']);
    const r = await runMain([...args, '--overwrite']);
    expect(r.code, r.stderr).toBe(0);
    expect(JSON.parse(readFileSync(out, 'utf8')).type).toBe('FeatureCollection');
    expect(statSync(out).mode & 0o777).toBe(0o640);
    expect(readdirSync(f).filter((n) => n.endsWith('.part'))).toEqual([]);
    chmodSync(out, 0o444);
    await refused(f, [...args, '--overwrite'], ['is read-only; Spillway does not replace read-only files, not even with --overwrite']);
  });

  it('--pictures naming an input file, a named pipe or a folder under a missing one is refused before the run', async () => {
    const f = await folder('pictures-odd');
    const args = [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv')];
    await refused(f, [...args, '--pictures', join(f, 'table.csv')], [`--pictures "${join(f, 'table.csv')}" is a file, not a folder`]);
    execFileSync('mkfifo', [join(f, 'pipe')]);
    await refused(f, [...args, '--pictures', join(f, 'pipe')], ['is a named pipe (FIFO), not a folder']);
    await refused(f, [...args, '--pictures', join(f, 'missing', 'pictures')], [`Cannot make the --pictures folder`, `there is no folder "${join(f, 'missing')}"`]);
  });

  it('a picture file that is a link to an input is refused before any output is written, even with --overwrite', async () => {
    const f = await folder('pictures-input');
    mkdirSync(join(f, 'pictures'));
    symlinkSync(join(f, 'table.csv'), join(f, 'pictures', 'map-of-the-outcome.svg'));
    const before = snapshot(join(f, 'pictures'));
    const out = join(f, 'results.xlsx');
    await refused(f, [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv'), '--out', out, '--pictures', join(f, 'pictures'), '--overwrite'],
      [/--pictures ".*map-of-the-outcome\.svg" is the same file as the --data file/, 'Name another folder for the pictures']);
    expect(snapshot(join(f, 'pictures'))).toEqual(before);
    expect(existsSync(out)).toBe(false); // the workbook was not written either
  });

  it('an existing picture is kept without --overwrite and replaced with it; a new folder is made; no temporary file stays', async () => {
    const f = await folder('pictures-existing');
    const pics = join(f, 'pictures');
    const args = [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv'), '--pictures', pics];
    const first = await runMain(args);
    expect(first.code, first.stderr).toBe(0);
    expect(first.stderr).toMatch(/pictures in .*map-of-the-outcome\.svg/);
    const svg = join(pics, 'map-of-the-outcome.svg');
    writeFileSync(svg, 'an earlier picture');
    const r = await runMain(args);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`"${svg}" already exists`);
    expect(r.stderr).toContain('add --overwrite to replace it');
    expect(readFileSync(svg, 'utf8')).toBe('an earlier picture');
    const again = await runMain([...args, '--overwrite']);
    expect(again.code, again.stderr).toBe(0);
    expect(readFileSync(svg, 'utf8')).toMatch(/^<svg[\s>]/);
    expect(readdirSync(pics).filter((n) => n.endsWith('.part'))).toEqual([]);
  });

  it('--overwrite alone names the outputs it goes with; control characters in an output path are shown escaped', async () => {
    const f = await folder('overwrite-alone');
    const args = [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv')];
    expect((await runMain([...args, '--overwrite'])).stderr).toContain('--overwrite goes with --out, --out-geojson or --pictures');
    const odd = join(f, 'missing\u001b[2J', 'areas.geojson');
    const r = await refused(f, [...args, '--out-geojson', odd], ['Cannot write --out-geojson', 'missing\\u{001B}[2J']);
    expect(r.stderr).not.toContain('\u001b');
  });

  it('--out or --out-geojson naming the --pictures folder is refused before anything is written', async () => {
    const f = await folder('pictures-clash');
    const pics = join(f, 'pictures');
    const args = [...BASE, '--boundary', join(f, 'districts.geojson'), '--data', join(f, 'table.csv'), '--pictures', pics];
    const oddFolder = join(f, 'maps.xlsx');
    await refused(f, [...args.slice(0, -1), oddFolder, '--out', oddFolder], [`--out "${oddFolder}" is the --pictures folder`]);
    const geoFolder = join(f, 'maps.geojson');
    await refused(f, [...args.slice(0, -1), geoFolder, '--out-geojson', geoFolder], [`--out-geojson "${geoFolder}" is the --pictures folder`]);
  });

  it('pictures are written all or none: a failure midway removes those written and the folder it made, and says so', async () => {
    const f = await folder('pictures-all-or-none');
    const pics = join(f, 'pictures');
    const bytes = new TextEncoder().encode('<svg/>');
    // the third file's folder does not exist: its write fails after two pictures are in place
    const plan = { pictures: { given: pics, folder: pics, exists: false, notes: [] }, report: { sheets: [] } as never,
      files: [{ name: 'a.svg', bytes }, { name: 'b.svg', bytes }, { name: join('gone', 'c.svg'), bytes }] };
    const err = await writePictureFiles(plan).then(() => null, (e: Error) => e);
    expect(err?.message).toContain('No pictures were kept: the 2 written before it were removed');
    expect(err?.message).not.toMatch(STACK_LINE);
    expect(existsSync(pics)).toBe(false);
  });

  it('file-system refusals are named in words (disk full, read-only, permission), the code kept', () => {
    expect(errorInWords('ENOSPC')).toBe('the disk is full (ENOSPC)');
    expect(errorInWords('EROFS')).toBe('the disk or folder is read-only (EROFS)');
    expect(errorInWords('EACCES')).toContain('permission denied');
    expect(errorInWords('EXDEV')).toBe('the system refused (EXDEV)');
  });

  it('a --data workbook with parts a copy would drop (text boxes, sparklines) is left alone: results go to a new workbook, and the note says why', async () => {
    const { unzipSync, zipSync, strToU8 } = await import('fflate');
    const f = await folder('data-parts');
    const book = join(f, 'book.xlsx');
    const parts = unzipSync(readFileSync(book));
    parts['xl/drawings/drawing7.xml'] = strToU8('<xdr:wsDr><xdr:oneCellAnchor><xdr:sp><xdr:txBody/></xdr:sp></xdr:oneCellAnchor></xdr:wsDr>');
    writeFileSync(book, zipSync(parts));
    const before = snapshot(f);
    const out = join(f, 'results.xlsx');
    const r = await runMain([...BASE, '--boundary', join(f, 'districts.geojson'), '--data', book, '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('book.xlsx holds shapes or text boxes, which a copy could not keep; the results were written to a new workbook instead');
    const after = snapshot(f);
    delete after['results.xlsx'];
    expect(after).toEqual(before);
    expect(Object.keys(unzipSync(readFileSync(out))).some((n) => n.startsWith('xl/drawings/drawing7'))).toBe(false);
  });
});
