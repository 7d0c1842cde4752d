/** The written forms of the samples: GeoJSON text, the workbooks and their "About this data" sheet. */
import ExcelJS from 'exceljs';
import { unzipSync, zipSync } from 'fflate';

/** Workbook timestamps and zip entry times are pinned so the .xlsx bytes do not change on rerun. */
const FIXED_DATE = new Date(Date.UTC(2024, 0, 1));

export interface ColumnSpec {
  name: string;
  width: number;
  format?: string;
  meaning: string;
}

/** GeoJSON with one feature per line, so diffs stay readable. */
export function geojsonText(features: { properties: Record<string, string>; geometry: object }[]): string {
  const lines = features.map((f) => JSON.stringify({ type: 'Feature', properties: f.properties, geometry: f.geometry }));
  return `{"type":"FeatureCollection","spillway:coordinates":"projected metres, invented local grid","features":[\n${lines.join(',\n')}\n]}\n`;
}

export async function workbookBytes(sheetName: string, columns: ColumnSpec[], rows: Record<string, string | number>[], about: (string | number)[][]): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Spillway sample generator';
  wb.created = FIXED_DATE;
  wb.modified = FIXED_DATE;
  const ws = wb.addWorksheet(sheetName, { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.columns = columns.map((c) => ({ header: c.name, key: c.name, width: c.width }));
  ws.getRow(1).font = { bold: true };
  for (const r of rows) {
    const row = ws.addRow(r);
    columns.forEach((c, k) => {
      if (c.format) row.getCell(k + 1).numFmt = c.format;
    });
  }
  const wide = columns.reduce((w, c) => w + c.width, 0) > 95;
  ws.pageSetup = { orientation: wide ? 'landscape' : 'portrait', fitToPage: true, fitToWidth: 1, fitToHeight: 0, printTitlesRow: '1:1' };
  const info = wb.addWorksheet('About this data');
  info.getColumn(1).width = 26;
  info.getColumn(2).width = 100;
  for (const line of about) {
    const row = info.addRow(line);
    row.getCell(2).alignment = { wrapText: true, vertical: 'top' };
    row.getCell(1).alignment = { vertical: 'top' };
    if (line.length === 1 && line[0] !== '') row.font = { bold: true };
    // wrapped text gets the height of its lines (about 0.85 width units a character), so rows never overlap
    const text = typeof line[1] === 'string' ? line[1] : '';
    const lines = Math.ceil((text.length * 0.85 + 1) / 100);
    if (lines > 1) row.height = lines * 15 + 3;
  }
  info.pageSetup = { orientation: 'landscape', fitToPage: true, fitToWidth: 1, fitToHeight: 0 };
  const raw = new Uint8Array(await wb.xlsx.writeBuffer());
  // Re-pack with fixed entry times so an unchanged workbook has unchanged bytes.
  const entries = unzipSync(raw);
  const pinned: Record<string, [Uint8Array, { mtime: Date; level: 6 }]> = {};
  for (const [name, data] of Object.entries(entries)) pinned[name] = [data, { mtime: FIXED_DATE, level: 6 }];
  return zipSync(pinned);
}

/** The "About this data" sheet: one or two cells a row; a single-cell row is a heading. */
export function buildAboutRows(kind: 'districts' | 'villages', truth: Record<string, unknown>, columns: ColumnSpec[]): (string | number)[][] {
  const t = truth as { n: number; seed: number; sigma: number; beta: Record<string, number>; rho?: number; lambda?: number; solver: { iterations: number } };
  const betas = Object.entries(t.beta).map(([k, b]) => [`beta: ${k}`, b]);
  const lag = kind === 'districts';
  return [
    [lag ? 'Vell Basin districts: invented sample data' : 'Vell Basin villages: invented sample data'],
    ['', 'Every number, name and boundary here is made up by a program. The Vell Basin is not a real place; do not use these figures for anything but trying out Spillway.'],
    ['', lag
      ? `${t.n} districts tile an invented river basin. Coordinates are projected metres on an invented local grid. Boundaries: vell-basin-districts.geojson (join on district_id).`
      : `${t.n} villages in the same invented basin, given as points (x_m, y_m in projected metres). Also as vell-basin-villages.geojson (join on village_id).`],
    [''],
    ['How the outcome was made'],
    ['', lag
      ? 'Long commutes spill over: a district whose neighbours commute far shares their roads and their job market. So the outcome was simulated from a spatial lag process, y = (I − ρW)⁻¹(Xβ + ε), where W links districts that share at least one boundary point (queen contiguity), each row scaled to sum to 1.'
      : 'Unmeasured local conditions (a shared market, a walking trail, a good bus) cluster across nearby villages. So the outcome was simulated from a spatial error process, y = Xβ + u with u = (I − λW)⁻¹ε, where W links each village to its 5 nearest villages, each row scaled to sum to 1.'],
    ['', 'ε is independent normal noise with standard deviation σ. A spatial regression on this sheet should land near the values below; it will not hit them exactly, because ε is one random draw.'],
    lag ? ['rho (ρ)', t.rho ?? NaN] : ['lambda (λ)', t.lambda ?? NaN],
    ...betas,
    ['sigma (σ)', t.sigma],
    ['seed', `${t.seed} (mulberry32 generator, normal draws by Box–Muller)`],
    ['solve', `fixed-point iteration, converged in ${t.solver.iterations} steps`],
    ['regenerate', 'node --import tsx scripts/generate-samples.ts'],
    [''],
    ['Columns'],
    ...columns.map((c) => [c.name, c.meaning]),
  ];
}
