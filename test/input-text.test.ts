// Text as the engine reads it and shows it (issue #17). Sources: The Unicode Standard §23.8 (U+FEFF
// as byte-order mark, UTF-16 byte orders); ECMA-48 (C0 and C1 control characters: ESC starts the
// terminal sequences that move the cursor, clear the screen or set the window title); Unicode UAX #9
// (the bidirectional overrides and isolates that reorder the text around them); V8's limit on a
// string's length (2^29 − 24 characters).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeSync, ftruncateSync, mkdtempSync, openSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { printable, firstNotText } from '../src/errors.js';
import { decodeText, MAX_TEXT_BYTES, readTable, numericColumn, joinAreas, readBoundary } from '../src/geo/index.js';
import { main } from '../src/cli/run.js';
import { gridCodesOnly, text } from './bad-inputs/make.js';

let dir = '';
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'spillway-text-')); });
afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

describe('printable: what reaches a terminal or a message bar', () => {
  it('escapes control characters, reordering marks, zero-width characters and non-characters; keeps line breaks, tabs and letters', () => {
    const fake = '\u001b[2J\u001b]0;owned\u0007\rspillway: all fine';
    const shown = printable(`row 4 (${fake})`);
    expect(shown).toBe('row 4 (\\u{001B}[2J\\u{001B}]0;owned\\u{0007}\\u{000D}spillway: all fine)');
    expect(shown).not.toMatch(/[\u0000-\u0008\u000B-\u001F\u007F-\u009F]/);
    expect(printable('a\u202Eb\u2066c\u200Bd\uFEFFe\uFFFEf\u0085g')).toBe('a\\u{202E}b\\u{2066}c\\u{200B}d\\u{FEFF}e\\u{FFFE}f\\u{0085}g');
    expect(printable('lone \uD800 high, pair \uD83D\uDE00 kept')).toBe('lone \\u{D800} high, pair \uD83D\uDE00 kept');
    expect(printable('Ärger\tkeine\nZeile')).toBe('Ärger\tkeine\nZeile');
  });

  it('names the first character that is not text', () => {
    expect(firstNotText('A\u0001B')).toBe('U+0001');
    expect(firstNotText('D\uFFFF')).toBe('U+FFFF');
    expect(firstNotText('fine')).toBeNull();
  });

  it('the command line escapes what it prints', async () => {
    let stderr = '';
    const code = await main(['fit', '--boundary', join(dir, 'no\u001b[31mred.geojson'), '--id', 'c', '--y', 'y', '--x', 'x'], { stdout: () => {}, stderr: (t) => { stderr += t; } });
    expect(code).toBe(2);
    expect(stderr).toContain('no\\u{001B}[31mred.geojson');
    expect(stderr).not.toContain('\u001b');
  });
});

describe('decodeText', () => {
  const utf16 = (s: string, le: boolean, bom: boolean) => {
    const b = new Uint8Array((bom ? 2 : 0) + 2 * s.length);
    if (bom) b.set(le ? [0xff, 0xfe] : [0xfe, 0xff]);
    for (let i = 0; i < s.length; i++) {
      const c = s.charCodeAt(i);
      b[(bom ? 2 : 0) + 2 * i + (le ? 0 : 1)] = c & 0xff;
      b[(bom ? 2 : 0) + 2 * i + (le ? 1 : 0)] = c >> 8;
    }
    return b;
  };
  it('reads UTF-16 in both byte orders, with or without a mark, and says when there was none', () => {
    for (const le of [true, false]) {
      expect(decodeText(utf16('code;y\nD01;3,5\n', le, true), 't.csv', { kind: 'a table' })).toMatchObject({ text: 'code;y\nD01;3,5\n', encoding: 'UTF-16', warnings: [] });
      const bare = decodeText(utf16('code;y\nD01;3,5\n', le, false), 't.csv', { kind: 'a table' });
      expect(bare.text).toBe('code;y\nD01;3,5\n');
      expect(bare.warnings[0]).toContain(`without a byte-order mark; it was read as UTF-16 ${le ? 'little' : 'big'}-endian`);
    }
  });

  it('refuses UTF-32 and binary files, naming the kind when it is known', () => {
    expect(() => decodeText(Uint8Array.of(0xff, 0xfe, 0, 0, 0x41, 0, 0, 0), 't.csv', { kind: 'a table' })).toThrow(/saved as UTF-32/);
    expect(() => decodeText(new TextEncoder().encode('%PDF-1.7\n\0\0binary'), 't.csv', { kind: 'a table' })).toThrow(/looks like a PDF document/);
    expect(() => decodeText(Uint8Array.of(0x1f, 0x8b, 8, 0, 0, 0, 0, 0, 0, 3, 0x41), 't.csv', { kind: 'a table' })).toThrow(/gzip-compressed/);
    expect(() => decodeText(new TextEncoder().encode('code,y\nD01,\u0000x\n'), 't.csv', { kind: 'a table' })).toThrow(/holds a zero byte at byte 12/);
    // zero bytes only at the very end are padding
    expect(decodeText(Uint8Array.of(0x61, 0x62, 0, 0), 't.csv', { kind: 'a table' }).text).toBe('ab');
  });

  it('refuses text past the longest string before trying to decode it', () => {
    const huge = { length: MAX_TEXT_BYTES + 1 } as Uint8Array;
    expect(() => decodeText(huge, 'big.geojson', { kind: 'GeoJSON' })).toThrow(/big\.geojson is 512 MiB; text files \(GeoJSON\) can be read up to 512 MiB/);
  });

  it('the command line refuses a 700 MiB GeoJSON before reading it (a sparse file: no disk space used)', async () => {
    const big = join(dir, 'huge.geojson');
    const fd = openSync(big, 'w');
    try { ftruncateSync(fd, 700 * 2 ** 20); } finally { closeSync(fd); }
    let stderr = '';
    const code = await main(['fit', '--boundary', big, '--id', 'c', '--y', 'y', '--x', 'x'], { stdout: () => {}, stderr: (t) => { stderr += t; } });
    expect(code).toBe(2);
    expect(stderr).toContain('huge.geojson" is 700 MiB; text files (GeoJSON, TopoJSON, CSV) can be read up to 511 MiB');
  });
});

describe('decimal commas and dots', () => {
  const columnOf = async (csv: string, name: string) => {
    const table = await readTable(text('t.csv', csv));
    const layer = await readBoundary([gridCodesOnly()]);
    const joined = joinAreas(layer, { ...table, rows: table.rows }, 'code');
    return numericColumn(joined, name, { allowMissing: true });
  };
  const header = 'code;y\n';
  const body = (values: string[]) => values.map((v, i) => `D${String(i + 1).padStart(2, '0')};${v}`).join('\n');
  const sixteen = (first: string[], fill: string) => [...first, ...Array(16 - first.length).fill(fill)];

  it('a semicolon file that writes decimals with dots reads 1.250 as one and a quarter', async () => {
    const y = await columnOf(header + body(sixteen(['1.250', '2.5', '3.75'], '4.5')), 'y');
    expect(Array.from(y.subarray(0, 3))).toEqual([1.25, 2.5, 3.75]);
  });

  it('a semicolon file with decimal commas refuses 1.250 (a thousands group or a decimal point?)', async () => {
    await expect(columnOf(header + body(sixteen(['1.250', '2,5'], '4,5')), 'y')).rejects.toThrow(/row 2 \("1\.250"\).*it is not guessed/);
  });

  it('a semicolon file of whole numbers with dot groups only is not guessed either', async () => {
    await expect(columnOf(header + body(sixteen(['1.000', '12.500'], '7')), 'y')).rejects.toThrow(/row 2 \("1\.000"\), row 3 \("12\.500"\)/);
  });
});
