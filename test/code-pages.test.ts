// The single-byte code pages a .dbf header can name: every byte of 437, 850, 852 and 865 decoded by
// src/geo/single-byte.ts, and Windows-1252 too (Node 20's TextDecoder reads that label as
// ISO-8859-1: 0x80 as U+0080 instead of the euro sign), against test/golden/code-pages.json, written
// with Python's codecs module:
//   python3 -c "import json; ... bytes([b]).decode('cp437') for b in range(256) ..." (see the file's "source").
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { decodeSingleByte, SINGLE_BYTE_CODE_PAGES, windows1252Bytes } from '../src/geo/single-byte.js';
import { decodeText } from '../src/geo/index.js';

const golden = JSON.parse(readFileSync(new URL('./golden/code-pages.json', import.meta.url), 'utf8')) as Record<string, (number | null)[]>;
const allBytes = Uint8Array.from({ length: 256 }, (_v, i) => i);

describe('single-byte code pages (reference: Python codecs)', () => {
  it.each([437, 850, 852, 865])('code page %i: all 256 bytes', (cp) => {
    expect(SINGLE_BYTE_CODE_PAGES).toContain(cp);
    const text = decodeSingleByte(allBytes, cp);
    expect([...text].map((c) => c.codePointAt(0))).toEqual(golden[`cp${cp}`]);
  });

  it('Windows-1252: every byte Python defines decoded alike by the table (the five undefined ones as their C1 control, as WHATWG does)', () => {
    const text = decodeSingleByte(allBytes, 1252);
    golden.cp1252.forEach((code, b) => expect(text.codePointAt(b), `byte ${b}`).toBe(code ?? b));
  });

  it('the bytes behind a Windows-1252 reading are recovered exactly (the path the .dbf reader takes)', () => {
    expect([...windows1252Bytes(new TextDecoder('windows-1252').decode(allBytes))]).toEqual([...allBytes]);
    // a WHATWG decoder's reading (the euro sign for 0x80, U+2021 for 0x87) leads back as well
    expect([...windows1252Bytes(decodeSingleByte(allBytes, 1252))]).toEqual([...allBytes]);
  });

  it('a CSV in Windows-1252 keeps its euro sign and curly quotes (0x80, 0x93, 0x94: cp1252 in the golden file)', () => {
    const csv = Uint8Array.of(0x63, 0x6f, 0x73, 0x74, 0x0a, 0x80, 0x35, 0x20, 0x93, 0x61, 0x94, 0x0a); // "cost\n€5 “a”\n"
    const read = decodeText(csv, 'costs.csv', { kind: 'a table', latinFallback: true });
    expect(read.text).toBe(`cost\n${String.fromCodePoint(golden.cp1252[0x80]!)}5 ${String.fromCodePoint(golden.cp1252[0x93]!)}a${String.fromCodePoint(golden.cp1252[0x94]!)}\n`);
    expect(read.text).toContain('€5 “a”');
  });
});

