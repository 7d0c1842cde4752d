// The results workbook, written and read back with exceljs (a general-purpose library): every number
// stays a number with its format, the user's sheets survive cell by cell, Excel's sheet-name rules
// (recalled from memory), and the real pipeline on the Columbus data (Anselin 1988).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import ExcelJS from 'exceljs';
import { buildReport, planSheet, type Block, type Cell, type NumberFormat, type Report, type ReportSheet } from '../src/report/index.js';
import { renderPng } from '../src/report/render-png.js';
import { writeResultsWorkbook, readWorkbook, uniqueSheetName, cleanSheetName, baseWorkbookRisks, EXCEL_FORMAT, cellFormat, type ReadSheet } from '../src/workbook/index.js';
import { runAnalysis } from '../src/pipeline/index.js';
import { InputError } from '../src/errors.js';
import { fakeResult } from './helpers/fake-result.js';

/** Every cell a block puts on the sheet, at the row the shared sheet plan gives it: [row, col, value, format]. */
function expectedCells(sheet: ReportSheet): [number, number, Cell, NumberFormat | undefined][] {
  const out: [number, number, Cell, NumberFormat | undefined][] = [];
  const plan = planSheet(sheet);
  sheet.blocks.forEach((b: Block, i) => {
    const top = plan.starts[i];
    const p = plan.blocks[i];
    if (b.kind === 'title' || b.kind === 'paragraph') out.push([top, 1, b.text, undefined]);
    if (b.kind === 'table' && p.kind === 'table') {
      out.push([top, 1, b.title, undefined]);
      for (const g of p.groups) out.push([p.groupRow!, g.col + 1, g.text, undefined]);
      b.columns.forEach((c, j) => out.push([p.headerRow, j + 1, c.header, undefined]));
      b.rows.forEach((r, k) => r.forEach((v, j) => out.push([p.firstRow + k, j + 1, v, b.columns[j]?.format])));
      if (b.note) out.push([p.noteRow!, 1, b.note, undefined]);
    }
    if (b.kind === 'keyValues') {
      out.push([top, 1, b.title, undefined]);
      b.rows.forEach(([k, v, f], r) => { out.push([top + 1 + r, 1, k, undefined]); out.push([top + 1 + r, 2, v, f]); });
    }
  });
  return out;
}

function compareSheet(written: ReadSheet, sheet: ReportSheet): number {
  let numbers = 0;
  for (const [r, c, v, f] of expectedCells(sheet)) {
    const got = written.rows[r - 1]?.[c - 1] ?? null;
    const want = typeof v === 'number' && !Number.isFinite(v) ? null : v;
    expect(got, `${sheet.name} row ${r} column ${c}`).toEqual(want);
    if (typeof want === 'number') {
      numbers++;
      // stored as a number with a number format, not as text
      expect(typeof got).toBe('number');
      if (f && f !== 'text') expect(written.numberFormats[r - 1][c - 1] ?? 'General').toBe(cellFormat(f, want));
    }
  }
  return numbers;
}

async function baseWorkbook(): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  const data = wb.addWorksheet('Data');
  data.addRow(['ward', 'rate', 'ok', 'when', 'double']);
  data.addRow(['W01', 4.25, true, new Date(Date.UTC(2023, 0, 15)), { formula: 'B2*2', result: 8.5 }]);
  data.addRow(['0042', -1e-9, false, null, { formula: 'B3*2', result: -2e-9 }]);
  data.getCell('B2').numFmt = '0.0';
  data.mergeCells('A5:C5');
  data.getCell('A5').value = 'a merged note';
  wb.addWorksheet('summary').getCell('A1').value = 'the user’s own summary';
  wb.addWorksheet('SUMMARY (2)').getCell('B2').value = 7;
  wb.addWorksheet('By area').getCell('C3').value = 'kept';
  return new Uint8Array(await wb.xlsx.writeBuffer() as ArrayBuffer);
}

describe('number formats', () => {
  it('a four-decimal number below 0.001 in size keeps its digits and sign in one scientific format (0.0000 would read as no effect); others keep their format', () => {
    // a coefficient per birth or per dollar is routinely this small (the North Carolina counties' nonwhite births per 1,000: 0.0017, its neighbours' average −0.0004)
    for (const v of [-0.000404794, 0.0000123, 1e-9, -2.5e-7]) expect(cellFormat('decimal4', v), String(v)).toBe('0.000E+00');
    for (const v of [0, 0.001, -0.0012, 1.5835, -73.1056]) expect(cellFormat('decimal4', v), String(v)).toBe(EXCEL_FORMAT.decimal4);
    expect(cellFormat(undefined, 0.0003)).toBe('0.000E+00');
    expect(cellFormat(undefined, 0.3)).toBe(EXCEL_FORMAT.decimal4);
    // p-values keep "<0.0001"; other formats are untouched
    expect(cellFormat('pvalue', 1e-7)).toBe(EXCEL_FORMAT.pvalue);
    expect(cellFormat('integer', 0)).toBe(EXCEL_FORMAT.integer);
    expect(cellFormat('text', 3)).toBe('General');
  });
});

describe('sheet names', () => {
  it('follows Excel’s rules: ≤ 31 characters, no []:*?/\\, unique without regard to case', () => {
    // rules recalled from memory of Microsoft's "Rename a worksheet" documentation
    expect(cleanSheetName('a[b]:c*d?e/f\\g')).toBe('abcdefg');
    expect(cleanSheetName("'quoted'")).toBe('quoted');
    expect(cleanSheetName('   ')).toBe('Results');
    const taken = new Set(['summary', 'summary (2)']);
    expect(uniqueSheetName('Summary', taken)).toBe('Summary (3)');
    expect(uniqueSheetName('Summary', taken)).toBe('Summary (4)');
    const long = 'A sheet name that is far too long for Excel';
    const first = uniqueSheetName(long, taken);
    const second = uniqueSheetName(long, taken);
    expect(first).toBe(long.slice(0, 31).trimEnd());
    expect(second.length).toBeLessThanOrEqual(31);
    expect(second.endsWith(' (2)')).toBe(true);
    expect(uniqueSheetName('History', new Set())).toBe('History (2)');
  });
});

describe('writeResultsWorkbook', () => {
  it('writes every number of the report as a number with its format, pictures at their anchors', async () => {
    const report = buildReport(fakeResult(), { renderPng });
    const back = await readWorkbook(await writeResultsWorkbook(report));
    expect(back.map((s) => s.name)).toEqual(report.sheets.map((s) => s.name));
    let numbers = 0;
    report.sheets.forEach((s, i) => { numbers += compareSheet(back[i], s); });
    expect(numbers).toBeGreaterThan(400);
    const o = back[0];
    expect(o.images.map((im) => [im.row, im.col, im.width, im.height, im.extension])).toEqual(
      report.sheets[0].images!.map((im) => [im.anchor.row, im.anchor.col, im.widthPx, im.heightPx, 'png']));
    // the per-area table's headings (rows 2 and 3: the models over their columns, under the title) stay in view
    expect(back.find((s) => s.name === 'By area')!.frozenRows).toBe(3);
  });

  it('keeps the user’s sheets cell by cell and gives new sheets unique names', async () => {
    const base = await baseWorkbook();
    const report = buildReport(fakeResult());
    const before = await readWorkbook(base);
    const after = await readWorkbook(await writeResultsWorkbook(report, { base }));
    expect(after.slice(0, before.length)).toEqual(before.map((s) => ({ ...s })));
    const names = after.map((s) => s.name);
    const taken = new Set(before.map((s) => s.name.toLowerCase()));
    expect(names.slice(before.length)).toEqual(report.sheets.map((s) => uniqueSheetName(s.name, taken)));
    expect(names).toContain('Summary (3)');
    expect(names).toContain('By area (2)');
    expect(new Set(names.map((n) => n.toLowerCase())).size).toBe(names.length);
    for (const n of names) expect(n.length).toBeLessThanOrEqual(31);
    report.sheets.forEach((s, i) => compareSheet(after[before.length + i], s));
    // formulas survive as formulas, not only their results
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load((await writeResultsWorkbook(report, { base })) as unknown as ArrayBuffer);
    expect((wb.getWorksheet('Data')!.getCell('E2').value as ExcelJS.CellFormulaValue).formula).toBe('B2*2');
    expect(wb.getWorksheet('Data')!.getCell('B2').numFmt).toBe('0.0');
  });

  it('refuses a base that is not a workbook with a message naming it', async () => {
    const report: Report = { sheets: [] };
    await expect(writeResultsWorkbook(report, { base: new TextEncoder().encode('ward,rate\n'), baseName: 'wards.csv' }))
      .rejects.toThrow(InputError);
    await expect(writeResultsWorkbook(report, { base: new Uint8Array([1, 2, 3]), baseName: 'wards.csv' })).rejects.toThrow(/wards\.csv/);
  });
});

describe('results of the real pipeline on the Columbus neighbourhoods', () => {
  const dir = new URL('./fixtures/columbus/', import.meta.url);
  const files = ['columbus.shp', 'columbus.shx', 'columbus.dbf'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(new URL(name, dir))) }));

  it('round-trips every number and records the SHA-256 of each input', async () => {
    const result = await runAnalysis({
      boundary: files, id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row', models: ['ols', 'lag', 'error'],
    });
    const report = buildReport(result);
    const back = await readWorkbook(await writeResultsWorkbook(report));
    report.sheets.forEach((s, i) => compareSheet(back[i], s));

    // against the result itself, not only the report
    const plain = back.find((s) => s.name === 'Plain regression')!;
    const coefRows = plain.rows.filter((r) => result.ols.coefficients.some((c) => c.name === r[0]));
    expect(coefRows.map((r) => r.slice(0, 5))).toEqual(result.ols.coefficients.map((c) => [c.name, c.estimate, c.se, c.stat, c.p]));
    const areas = back.find((s) => s.name === 'By area')!;
    result.ids.forEach((id, i) => {
      expect(areas.rows[3 + i].slice(0, 5)).toEqual([id, result.rows[i], result.y[i], result.ols.fitted[i], result.ols.residuals[i]]);
    });
    // Moran's I of CRIME with queen, row-standardised weights: 0.500 (recalled from memory of the
    // published Columbus analyses); the report's scatter slope is computed independently of the engine
    expect(result.moranY.I).toBeCloseTo(0.5, 2);

    const record = back.find((s) => s.name === 'How this was made')!;
    for (const f of files) {
      const row = record.rows.find((r) => r[1] === f.name)!;
      expect(row[2]).toBe(f.bytes.length);
      expect(row[3]).toBe(createHash('sha256').update(f.bytes).digest('hex'));
    }
  });
});

describe('baseWorkbookRisks', () => {
  it('names the parts a copy would lose, and none for a plain workbook', async () => {
    const { zipSync, strToU8 } = await import('fflate');
    const zip = zipSync({
      '[Content_Types].xml': strToU8('<Types/>'),
      'xl/workbook.xml': strToU8('<workbook/>'),
      'xl/charts/chart1.xml': strToU8('<chart/>'),
      'xl/vbaProject.bin': new Uint8Array([0, 1]),
    });
    expect(baseWorkbookRisks(zip).sort()).toEqual(['charts', 'macros']);
    expect(baseWorkbookRisks(await baseWorkbook())).toEqual([]);
    expect(baseWorkbookRisks(new Uint8Array([1, 2, 3]))).toEqual([]);
  });

  it('names shapes and text boxes, sparklines, 2010 data validations, controls, embedded objects, connections and add-in parts', async () => {
    const { zipSync, strToU8 } = await import('fflate');
    // element names from ECMA-376 Part 1 (SpreadsheetML drawing: xdr:sp, xdr:grpSp) and the [MS-XLSX]
    // 2010 extensions (x14:sparklineGroups, x14:dataValidations)
    const zip = zipSync({
      '[Content_Types].xml': strToU8('<Types/>'),
      'xl/workbook.xml': strToU8('<workbook/>'),
      'xl/drawings/drawing1.xml': strToU8('<xdr:wsDr><xdr:twoCellAnchor><xdr:sp macro=""><xdr:txBody/></xdr:sp></xdr:twoCellAnchor></xdr:wsDr>'),
      'xl/worksheets/sheet1.xml': strToU8('<worksheet><extLst><ext><x14:sparklineGroups><x14:sparklineGroup/></x14:sparklineGroups></ext>' +
        '<ext><x14:dataValidations count="1"><x14:dataValidation/></x14:dataValidations></ext></extLst></worksheet>'),
      'xl/ctrlProps/ctrlProp1.xml': strToU8('<formControlPr/>'),
      'xl/embeddings/oleObject1.bin': new Uint8Array([0]),
      'xl/connections.xml': strToU8('<connections/>'),
      'xl/webextensions/webextension1.xml': strToU8('<we:webextension/>'),
    });
    expect(baseWorkbookRisks(zip).sort()).toEqual(['add-in parts', 'data connections', 'data validations of the 2010 format', 'embedded objects',
      'form controls', 'shapes or text boxes', 'sparklines']);
    // a drawing with only a picture (which the copy keeps) is no risk
    const pictureOnly = zipSync({ 'xl/workbook.xml': strToU8('<workbook/>'), 'xl/drawings/drawing1.xml': strToU8('<xdr:wsDr><xdr:pic/><xdr:spPr/></xdr:wsDr>') });
    expect(baseWorkbookRisks(pictureOnly)).toEqual([]);
  });
});
