// Text that XML cannot carry, in the results workbook. Source: ECMA-376 Part 1, §22.9.2.19
// (ST_Xstring: a character is written _xHHHH_, a literal "_xHHHH_" has its underscore written
// _x005F_); well-formedness is checked with saxes, the strict XML parser exceljs itself reads with,
// and the text read back with exceljs (which undoes the escapes as spreadsheet programs do).
import { describe, expect, it } from 'vitest';
import ExcelJS from 'exceljs';
import { unzipSync } from 'fflate';
import { SaxesParser } from 'saxes';
import { writeResultsWorkbook, cleanSheetName, ooxmlText } from '../src/workbook/index.js';
import type { Report } from '../src/report/index.js';

const ODD = ['A\u0001B', 'AB', 'x\uFFFEy', 'z\uFFFF', '_x0041_', 'tab\there', 'lone\uD800high', 'bell\u0007', 'plain'];

function wellFormed(xml: string): void {
  const parser = new SaxesParser();
  let error: Error | null = null;
  parser.on('error', (e) => { error = e; });
  parser.write(xml).close();
  expect(error).toBeNull();
}

async function cellTexts(bytes: Uint8Array, sheet: string): Promise<unknown[]> {
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load(bytes as unknown as ArrayBuffer);
  const out: unknown[] = [];
  wb.getWorksheet(sheet)!.eachRow((row) => row.eachCell((c) => { out.push(c.value); }));
  return out;
}

describe('text the XML cannot carry', () => {
  it('ooxmlText escapes what XML forbids and protects literal escapes; plain text is unchanged', () => {
    expect(ooxmlText('A\u0001B')).toBe('A_x0001_B');
    expect(ooxmlText('x\uFFFEy')).toBe('x_xFFFE_y');
    expect(ooxmlText('_x0041_')).toBe('_x005F_x0041_');
    expect(ooxmlText('tab\there\nline')).toBe('tab\there\nline');
    expect(ooxmlText('plain')).toBe('plain');
  });

  it('the results sheets stay well-formed and every text comes back as written, distinct', async () => {
    const report: Report = {
      sheets: [{
        name: 'Odd\u0001text',
        role: 'overview',
        blocks: [{ kind: 'table', title: 'IDs', columns: [{ header: 'id' }], rows: ODD.map((s) => [s]) }],
      }],
    };
    const bytes = await writeResultsWorkbook(report);
    const parts = unzipSync(bytes);
    for (const [name, part] of Object.entries(parts)) if (name.endsWith('.xml')) wellFormed(new TextDecoder().decode(part));
    const texts = await cellTexts(bytes, 'Odd text');
    expect(texts.slice(2)).toEqual(ODD); // after the table's title and header

    expect(new Set(texts).size).toBe(texts.length);
  });

  it('the user\'s own cells keep their text when the results are added to a copy of their workbook', async () => {
    const base = new ExcelJS.Workbook();
    const ws = base.addWorksheet('Data');
    ws.addRow(ODD.map(ooxmlText)); // as a spreadsheet program would have stored them
    const baseBytes = new Uint8Array(await base.xlsx.writeBuffer() as ArrayBuffer);
    const report: Report = { sheets: [{ name: 'Results', role: 'overview', blocks: [{ kind: 'title', text: 'x' }] }] };
    const bytes = await writeResultsWorkbook(report, { base: baseBytes, baseName: 'book.xlsx' });
    for (const [name, part] of Object.entries(unzipSync(bytes))) if (name.endsWith('.xml')) wellFormed(new TextDecoder().decode(part));
    expect(await cellTexts(bytes, 'Data')).toEqual(await cellTexts(baseBytes, 'Data'));
  });

  it('sheet names lose control characters and are never cut inside a character', () => {
    expect(cleanSheetName('Rates\u0001 by\u001b area')).toBe('Rates by area');
    const name = cleanSheetName(`${'x'.repeat(30)}😀`);
    expect(name).toBe('x'.repeat(30));
  });
});
