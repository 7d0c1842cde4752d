// What Excel on the web refuses, and how the add-in stays inside it. The limits are Microsoft's:
// "Resource limits and performance optimization for Office Add-ins" (Excel add-ins section: 5 MB per
// request and per response on the web, at most 5,000,000 cells per range read) and "Delay execution
// while cell is being edited" (a batch sent during a cell edit fails unless Excel.run is given
// delayForCellEdit). The stand-in (test/helpers/fake-excel.ts) enforces them; the first block shows
// that it does, so the later checks fail when the add-in breaks a rule. The large results are
// invented (test/helpers/large-report.ts); the counts checked are the report's own.
import { describe, expect, it } from 'vitest';
import { deflateSync } from 'fflate';
import { ExcelAdapter } from '../addin/excel/adapter.js';
import { BOUNDARY_NAMESPACE, MAX_KEPT_CHARS, PART_CHARS } from '../addin/excel/boundary-part.js';
import { sheetGrid } from '../addin/excel/report-grid.js';
import { CELL_EDIT_MESSAGE, canDelayForCellEdit, excelRunner } from '../addin/excel/run.js';
import { seededRandom } from '../src/stats/random.js';
import { FakeExcel, FakeOfficeError, READ_CELL_LIMIT, REQUEST_LIMIT_BYTES, RESPONSE_LIMIT_BYTES } from './helpers/fake-excel.js';
import { largeReport } from './helpers/large-report.js';

const FIVE_MB = 5_000_000;
const jsonBytes = (v: unknown) => Buffer.byteLength(JSON.stringify(v));
const fast = () => Promise.resolve();

function randomBytes(n: number, seed: number): Uint8Array {
  const next = seededRandom(seed);
  const out = new Uint8Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.floor(next() * 256);
  return out;
}

describe('the stand-in keeps the limits of Excel on the web', () => {
  it('uses 5 MB per request and response and 5,000,000 cells per read', () => {
    expect([REQUEST_LIMIT_BYTES, RESPONSE_LIMIT_BYTES, READ_CELL_LIMIT]).toEqual([FIVE_MB, FIVE_MB, 5_000_000]);
  });

  it('refuses a request over 5 MB and applies none of it', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data');
    const grid = Array.from({ length: 20_000 }, (_, r) => Array.from({ length: 10 }, (_, c) => `row ${r} column ${c} of an invented table`));
    expect(jsonBytes(grid)).toBeGreaterThan(FIVE_MB);
    await excel.run(async (ctx) => {
      ctx.workbook.worksheets.getActiveWorksheet().getRangeByIndexes(0, 0, 20_000, 10).values = grid;
      await expect(ctx.sync()).rejects.toMatchObject({ code: 'RequestPayloadSizeLimitExceeded' });
    });
    expect(excel.cell('Data', 'A1')).toBeUndefined();
  });

  it('refuses a response over 5 MB and delivers none of it', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data', Array.from({ length: 120_000 }, (_, r) => [`area ${r}`, r * 1.25, 'an invented note on this area']));
    await excel.run(async (ctx) => {
      const range = ctx.workbook.worksheets.getActiveWorksheet().getRangeByIndexes(0, 0, 120_000, 3);
      range.load('values');
      await expect(ctx.sync()).rejects.toMatchObject({ code: 'ResponsePayloadSizeLimitExceeded' });
      expect(() => range.values).toThrow(FakeOfficeError);
    });
  });

  it('refuses a read of more than 5,000,000 cells', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data', [[1]]);
    await excel.run(async (ctx) => {
      ctx.workbook.worksheets.getActiveWorksheet().getRangeByIndexes(0, 0, 2_500, 2_001).load('values');
      await expect(ctx.sync()).rejects.toThrow(/5000000 cells/);
    });
  });

  it('fails a batch sent while a cell is being edited, unless it asks Excel to wait; then it runs when the edit ends', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data', [['a']]);
    excel.startCellEdit();
    const plain = excel.run(async (ctx) => { ctx.workbook.worksheets.getActiveWorksheet().getRange('B1').values = [[1]]; await ctx.sync(); });
    await expect(plain).rejects.toMatchObject({ code: 'InvalidOperationInCellEditMode' });
    let done = false;
    const held = excel.run({ delayForCellEdit: true }, async (ctx) => {
      ctx.workbook.worksheets.getActiveWorksheet().getRange('B1').values = [[2]];
      await ctx.sync();
      done = true;
    });
    await new Promise((r) => setTimeout(r, 20));
    expect(done).toBe(false);
    expect(excel.cell('Data', 'B1')).toBeUndefined();
    excel.endCellEdit();
    await held;
    expect(excel.cell('Data', 'B1')?.value).toBe(2);
  });
});

describe('writing the results of 90,000 areas', () => {
  it('writes every area, every link and every scatter point, in requests well under 5 MB', async () => {
    const { report, scatter, ids, links } = largeReport(300);
    const nbSheet = report.sheets.find((s) => s.role === 'neighbours')!;
    const grid = sheetGrid(nbSheet);
    // in one request (as before) the Neighbours sheet alone would be refused
    expect(jsonBytes(grid.values) + jsonBytes(grid.formats)).toBeGreaterThan(FIVE_MB);

    const excel = new FakeExcel();
    excel.addSheet('Data');
    const names = await new ExcelAdapter(excel.run).writeReport({ report, scatter });
    expect(names).toEqual(['Summary', 'By area', 'Neighbours']);
    expect(Math.max(...excel.requestBytes)).toBeLessThan(2_000_000);
    expect(excel.requestBytes.length).toBeGreaterThan(20);

    // Neighbours: the header of "Every link" and then one row per link (the report's own count)
    const header = grid.values.findIndex((r) => r[0] === 'Area ID');
    const linkTable = nbSheet.blocks.find((b) => b.kind === 'table' && b.title === 'Every link');
    expect(linkTable?.kind === 'table' && linkTable.rows.length).toBe(links);
    const last = header + links;
    expect(excel.cellAt('Neighbours', last, 0)?.value).toBe(ids[ids.length - 1]);
    expect(excel.cellAt('Neighbours', last, 0)?.format).toBe('@');
    expect(excel.cellAt('Neighbours', last, 2)?.value).toBeCloseTo(grid.values[last][2] as number, 12);
    expect(excel.cellAt('Neighbours', last + 1, 0)?.value).toBe(grid.values[last + 1][0]);
    expect(grid.values[last + 1][0]).toMatch(/^Each row is one directed link/);

    // By area: one row per area, in order
    const areaGrid = sheetGrid(report.sheets[1]);
    const areaHeader = areaGrid.values.findIndex((r) => r[0] === 'Area ID');
    expect(excel.cellAt('By area', areaHeader + 1, 0)?.value).toBe(ids[0]);
    expect(excel.cellAt('By area', areaHeader + ids.length, 0)?.value).toBe(ids[ids.length - 1]);

    // the scatter chart covers all 90,000 points, written beside the Summary
    const summary = excel.sheet('Summary')!;
    expect(summary.charts).toHaveLength(1);
    expect(summary.charts[0].source.rows).toBe(ids.length + 1);
    const { row, col } = summary.charts[0].source;
    expect(summary.cells.get(row + ids.length, col)?.value).toBeCloseTo(scatter.z[ids.length - 1], 12);
    expect(summary.cells.get(row + ids.length, col + 1)?.format).toBe('0.0000');
  }, 120_000);

  it('removes every sheet it added when a later block of a later sheet fails', async () => {
    const { report, scatter } = largeReport(150);
    const excel = new FakeExcel();
    excel.addSheet('Data', [['keep me']]);
    let blocks = 0;
    excel.failWhen = (c) => c.kind === 'values' && c.sheet === 'Neighbours' && ++blocks === 3;
    await expect(new ExcelAdapter(excel.run).writeReport({ report, scatter })).rejects.toThrow(/stopped at the sheet "Neighbours".*removed again/);
    expect(blocks).toBe(3);
    expect(excel.sheetNames()).toEqual(['Data']);
    expect(excel.cell('Data', 'A1')?.value).toBe('keep me');
  }, 60_000);
});

describe('reading a large table', () => {
  const columns = ['tract', ...Array.from({ length: 11 }, (_, i) => `indicator_${i + 1}`)];

  it('reads 90,000 rows of 12 columns in blocks under 5 MB, keeping the sheet row numbers', async () => {
    const rows = Array.from({ length: 90_000 }, (_, r) => [`TV${String(r + 1).padStart(6, '0')}`, ...Array.from({ length: 11 }, (_, c) => (r * 31 + c * 7) / 13)]);
    expect(jsonBytes(rows)).toBeGreaterThan(FIVE_MB);
    const excel = new FakeExcel();
    excel.addSheet('Tracts', [columns, ...rows], { row: 1, col: 0 });
    const t = await new ExcelAdapter(excel.run).readActiveTable();
    expect(t.headers).toEqual(columns);
    expect(t.headerRow).toBe(2);
    expect(t.rows).toHaveLength(90_000);
    expect(t.rows[89_999]).toEqual(rows[89_999]);
    expect(t.rowNumbers[89_999]).toBe(90_002);
    expect(Math.max(...excel.responseBytes)).toBeLessThan(2_000_000);
  }, 60_000);

  it('names the row that is too large to send on its own', async () => {
    const long = 'x'.repeat(30_000);
    const excel = new FakeExcel();
    excel.addSheet('Notes', [['id', ...Array.from({ length: 199 }, (_, i) => `note_${i}`)], ['A1', ...Array.from({ length: 199 }, () => long)]]);
    await expect(new ExcelAdapter(excel.run).readActiveTable()).rejects.toThrow(/Row 2 of the sheet holds more than Excel can send in one piece/);
  });
});

describe('while the analyst is typing in a cell', () => {
  it('uses delayForCellEdit where ExcelApi 1.11 is there, and otherwise not', () => {
    expect(canDelayForCellEdit((name, v) => name === 'ExcelApi' && v === '1.11')).toBe(true);
    expect(canDelayForCellEdit(() => false)).toBe(false);
    expect(canDelayForCellEdit(undefined)).toBe(false);
    expect(canDelayForCellEdit(() => { throw new Error('no requirements here'); })).toBe(false);
  });

  it('with ExcelApi 1.11, a write started during an edit waits for it and then completes', async () => {
    const { report, scatter } = largeReport(20);
    const excel = new FakeExcel();
    excel.addSheet('Data');
    excel.startCellEdit();
    const writing = new ExcelAdapter(excelRunner(excel.run, true)).writeReport({ report, scatter });
    await new Promise((r) => setTimeout(r, 20));
    expect(excel.sheetNames()).toEqual(['Data']);
    excel.endCellEdit();
    expect(await writing).toEqual(['Summary', 'By area', 'Neighbours']);
    expect(excel.runOptions.every((o) => o.delayForCellEdit === true)).toBe(true);
  });

  it('without it, a read refused for an edit is sent again once the edit ends', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Tracts', [['tract', 'rate'], ['TV1', 3]]);
    excel.startCellEdit();
    setTimeout(() => excel.endCellEdit(), 30);
    const t = await new ExcelAdapter(excelRunner(excel.run, false, { retryEveryMs: 5 })).readActiveTable();
    expect(t.rows).toEqual([['TV1', 3]]);
    expect(excel.runOptions.every((o) => o.delayForCellEdit === undefined)).toBe(true);
  });

  it('without it, an edit begun half-way through a sheet has that sheet written again, whole and once', async () => {
    const { report, scatter, ids } = largeReport(150);
    const excel = new FakeExcel();
    excel.addSheet('Data');
    let interrupted = false;
    excel.beforeSync = (syncs) => {
      // the Neighbours sheet is being written when its second block goes out
      if (!interrupted && excel.sheet('Neighbours') && syncs > 0) {
        interrupted = true;
        excel.startCellEdit();
        setTimeout(() => excel.endCellEdit(), 15);
      }
    };
    const names = await new ExcelAdapter(excelRunner(excel.run, false, { retryEveryMs: 5 })).writeReport({ report, scatter });
    expect(interrupted).toBe(true);
    expect(names).toEqual(['Summary', 'By area', 'Neighbours']);
    expect(excel.sheetNames()).toEqual(['Data', 'Summary', 'By area', 'Neighbours']);
    const grid = sheetGrid(report.sheets[2]);
    const last = grid.values.length - 1;
    expect(excel.cellAt('Neighbours', last, 0)?.value ?? null).toBe(grid.values[last][0]);
    const header = grid.values.findIndex((r) => r[0] === 'Area ID');
    expect(excel.cellAt('Neighbours', header + 1, 0)?.value).toBe(ids[0]);
  }, 60_000);

  it('without it, gives up after a while with a plain message', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Tracts', [['tract'], ['TV1']]);
    excel.startCellEdit();
    const run = excelRunner(excel.run, false, { wait: fast, retryEveryMs: 1000, patienceMs: 3000 });
    await expect(new ExcelAdapter(run).readActiveTable()).rejects.toThrow(CELL_EDIT_MESSAGE);
  });
});

describe('the boundary file kept in the workbook', () => {
  it('is split into parts of at most a megabyte, each sent on its own, and read back byte for byte', async () => {
    // incompressible bytes: about 3.7 MB once deflated and base64-encoded, the size that used to fail
    const shp = randomBytes(2_800_000, 11);
    const dbf = new TextEncoder().encode('invented attribute table\n'.repeat(2000));
    const excel = new FakeExcel();
    excel.addSheet('Data');
    const adapter = new ExcelAdapter(excel.run);
    await adapter.storeBoundary([{ name: 'tarn-vale.shp', bytes: shp }, { name: 'tarn vale & co.dbf', bytes: dbf }]);
    expect(excel.xmlParts.length).toBe(4);
    for (const p of excel.xmlParts) expect(p.xml.length).toBeLessThan(PART_CHARS + 1000);
    expect(Math.max(...excel.requestBytes)).toBeLessThan(1_100_000);
    const back = await adapter.loadBoundary();
    expect(back!.map((f) => f.name)).toEqual(['tarn-vale.shp', 'tarn vale & co.dbf']);
    expect(Buffer.from(back![0].bytes).equals(Buffer.from(shp))).toBe(true);
    expect(Buffer.from(back![1].bytes).equals(Buffer.from(dbf))).toBe(true);
    expect(Math.max(...excel.responseBytes)).toBeLessThan(1_100_000);
  });

  it('keeps the earlier boundary when a part is refused, and says plainly that the new one was not kept', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data');
    const adapter = new ExcelAdapter(excel.run);
    const first = new TextEncoder().encode('{"type":"FeatureCollection","features":[]}');
    await adapter.storeBoundary([{ name: 'first.geojson', bytes: first }]);
    let parts = 0;
    excel.failWhen = (c) => c.kind === 'addXmlPart' && ++parts === 2;
    await expect(adapter.storeBoundary([{ name: 'second.shp', bytes: randomBytes(1_500_000, 5) }]))
      .rejects.toThrow(/boundary file \(second\.shp\) was not kept in this workbook: Excel refused to store it .*Keep the file beside the workbook/);
    excel.failWhen = null;
    expect(excel.xmlParts).toHaveLength(1);
    expect((await adapter.loadBoundary())!.map((f) => f.name)).toEqual(['first.geojson']);
  });

  it('does not keep a boundary too large for a workbook, and says why', async () => {
    expect(MAX_KEPT_CHARS).toBe(20_000_000);
    const excel = new FakeExcel();
    excel.addSheet('Data');
    // a 2 MB limit in place of the 20 MB one, so the check needs no 15 MB file
    const adapter = new ExcelAdapter(excel.run, { maxBoundaryChars: 2_000_000 });
    await expect(adapter.storeBoundary([{ name: 'all-tracts.shp', bytes: randomBytes(1_600_000, 3) }]))
      .rejects.toThrow(/all-tracts\.shp\) was not kept in this workbook: even compressed it takes 2\.1 MB, more than the 2\.0 MB Spillway stores/);
    expect(excel.xmlParts).toHaveLength(0);
    expect(excel.requestBytes).toHaveLength(0);
  });

  it('reads a boundary stored whole in one part (as before parts were split), and refuses an incomplete set', async () => {
    const bytes = new TextEncoder().encode('{"type":"FeatureCollection","features":[]}');
    const b64 = Buffer.from(deflateSync(bytes, { level: 9 })).toString('base64');
    const excel = new FakeExcel();
    excel.addSheet('Data');
    excel.newPart(`<?xml version="1.0" encoding="UTF-8"?><boundaries xmlns="${BOUNDARY_NAMESPACE}"><file name="old.geojson" size="${bytes.length}">${b64}</file></boundaries>`);
    const adapter = new ExcelAdapter(excel.run);
    const back = await adapter.loadBoundary();
    expect(back!.map((f) => f.name)).toEqual(['old.geojson']);
    expect(new TextDecoder().decode(back![0].bytes)).toBe('{"type":"FeatureCollection","features":[]}');

    excel.xmlParts.length = 0;
    excel.newPart(`<boundaries xmlns="${BOUNDARY_NAMESPACE}" set="k1" part="1" parts="2"><file name="a.shp" size="9" piece="1" pieces="2">AAAA</file></boundaries>`);
    await expect(adapter.loadBoundary()).rejects.toThrow(/incomplete \(1 of 2 parts found\)/);
  });

  it('says why a kept boundary cannot be read: Excel refusing to hand it back, or bytes that do not inflate', async () => {
    const excel = new FakeExcel();
    excel.addSheet('Data');
    const adapter = new ExcelAdapter(excel.run);
    // four zero bytes are no deflate stream (RFC 1950: the header's check bits fail)
    excel.newPart(`<boundaries xmlns="${BOUNDARY_NAMESPACE}"><file name="old.geojson" size="9">AAAAAA==</file></boundaries>`);
    await expect(adapter.loadBoundary()).rejects.toThrow(/^The boundary file kept in this workbook is damaged \(.+\); open the original file again\.$/);
    excel.failWhen = (c) => c.kind === 'load';
    await expect(adapter.loadBoundary()).rejects.toThrow(/^Excel did not hand back the boundary file kept in this workbook \(The load request failed\..*GeneralException.*\); open the original file again\.$/);
  });
});
