// The worksheet row limit (1,048,576 rows, "Excel specifications and limits"): a table that would
// pass it goes on to further sheets, shown here with the limit forced down to a few dozen rows, and
// read back from the written .xlsx with exceljs.
import { describe, expect, it } from 'vitest';
import { buildReport, layoutBlocks, SHEET_ROW_LIMIT, splitLongSheets, type Block, type Cell, type Report } from '../src/report/index.js';
import { readWorkbook, writeResultsWorkbook } from '../src/workbook/index.js';
import { fakeResult } from './helpers/fake-result.js';

const tables = (blocks: Block[]) => blocks.filter((b): b is Extract<Block, { kind: 'table' }> => b.kind === 'table');

describe('sheets longer than a worksheet', () => {
  it('is the worksheet limit', () => expect(SHEET_ROW_LIMIT).toBe(1_048_576));

  it('continues the neighbour list on further sheets, every link kept once, each part within the limit', () => {
    const limit = 30;
    const whole = buildReport(fakeResult());
    const split = buildReport(fakeResult(), { sheetRowLimit: limit });
    const links = tables(whole.sheets.find((s) => s.role === 'neighbours')!.blocks).find((t) => t.title === 'Every link')!.rows;
    expect(links.length).toBeGreaterThan(limit);
    const parts = split.sheets.filter((s) => s.role === 'neighbours');
    expect(parts.map((p) => p.name)).toEqual(['Neighbours', ...parts.slice(1).map((_, k) => `Neighbours, part ${k + 2}`)]);
    for (const p of parts) {
      expect(layoutBlocks(p.blocks).lastRow).toBeLessThanOrEqual(limit);
      // the sheet's caution on every part
      expect(p.blocks.at(-1)).toMatchObject({ kind: 'paragraph', style: 'caution' });
    }
    const pieces = parts.flatMap((p) => tables(p.blocks).filter((t) => t.title.startsWith('Every link')));
    expect(pieces.flatMap((t) => t.rows)).toEqual(links);
    expect(pieces[0].title).toBe(`Every link (rows 1 to ${pieces[0].rows.length} of ${links.length})`);
    expect(pieces[1].title).toMatch(/^Every link, continued \(rows \d+ to \d+ of \d+\)$/);
    expect(pieces[0].note).toContain('The table goes on at the top of the next sheet, "Neighbours, part 2"');
    expect(pieces.at(-1)!.note).not.toContain('goes on');
    // each continued table is the first block of its sheet, so its header stays in view
    for (const p of parts.slice(1)) expect(p.blocks[0].kind).toBe('table');
    // sheets that fit are left alone
    const short = whole.sheets.filter((s) => layoutBlocks(s.blocks).lastRow <= limit);
    expect(short.length).toBeGreaterThan(0);
    for (const s of short) expect(split.sheets.find((t) => t.name === s.name)).toEqual(s);
  });

  it('writes the parts as sheets of the workbook', async () => {
    const report = buildReport(fakeResult(), { sheetRowLimit: 40 });
    const sheets = await readWorkbook(await writeResultsWorkbook(report));
    const parts = sheets.filter((s) => s.name.startsWith('Neighbours'));
    expect(parts.length).toBeGreaterThan(1);
    const ids = parts.flatMap((s) => s.rows.filter((r) => typeof r[0] === 'string' && /^W\d+$/.test(r[0] as string) && typeof r[2] === 'number'));
    const links = tables(buildReport(fakeResult()).sheets.find((s) => s.role === 'neighbours')!.blocks).find((t) => t.title === 'Every link')!.rows;
    expect(ids.map((r) => [r[0], r[1]])).toEqual(links.map((r) => [r[0], r[1]]));
  });

  it('refuses, before writing anything, a sheet that is still too long', async () => {
    const rows: Cell[][] = Array.from({ length: SHEET_ROW_LIMIT }, (_, i) => [i]);
    const report: Report = { sheets: [{ name: 'Long', role: 'areas', blocks: [{ kind: 'table', title: 'Too long', columns: [{ header: 'n', format: 'integer' }], rows }] }] };
    await expect(writeResultsWorkbook(report)).rejects.toThrow(/"Long" would need 1,048,578 rows, and a worksheet holds at most 1,048,576\. Nothing was written\./);
    // the same table split by the report fits
    const parts = splitLongSheets(report.sheets);
    expect(parts.map((p) => p.name)).toEqual(['Long', 'Long, part 2']);
    expect(parts.every((p) => layoutBlocks(p.blocks).lastRow <= SHEET_ROW_LIMIT)).toBe(true);
  });
});
