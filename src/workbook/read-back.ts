/** Reads a written workbook back into plain values: for tests and for checking a file before it is shown. */
import ExcelJS from 'exceljs';
import type { Cell } from '../report/index.js';

export interface ReadSheet {
  name: string;
  /** rows[r][c] is the cell at row r + 1, column c + 1 */
  rows: Cell[][];
  numberFormats: (string | undefined)[][];
  images: { row: number; col: number; width: number; height: number; extension: string; bytes: number }[];
  frozenRows: number;
}

function plain(v: ExcelJS.CellValue): Cell {
  if (v === null || v === undefined) return null;
  if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean') return v;
  if (v instanceof Date) return v.toISOString();
  if (typeof v === 'object') {
    if ('richText' in v) return v.richText.map((t) => t.text).join('');
    if ('formula' in v || 'sharedFormula' in v) return plain((v as ExcelJS.CellFormulaValue).result as ExcelJS.CellValue);
    if ('text' in v) return String(v.text);
    if ('error' in v) return String(v.error);
  }
  return String(v);
}

export async function readWorkbook(bytes: Uint8Array): Promise<ReadSheet[]> {
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load(bytes as unknown as ArrayBuffer);
  return wb.worksheets.map((ws) => {
    const rows: Cell[][] = [];
    const numberFormats: (string | undefined)[][] = [];
    ws.eachRow({ includeEmpty: true }, (row, r) => {
      row.eachCell({ includeEmpty: false }, (cell, c) => {
        // merged cells repeat the master's value; keep it only in the master
        if (cell.isMerged && cell.master.address !== cell.address) return;
        (rows[r - 1] ??= [])[c - 1] = plain(cell.value);
        (numberFormats[r - 1] ??= [])[c - 1] = cell.numFmt;
      });
    });
    for (let r = 0; r < rows.length; r++) {
      rows[r] ??= [];
      for (let c = 0; c < rows[r].length; c++) if (rows[r][c] === undefined) rows[r][c] = null;
    }
    const images = ws.getImages().map((im) => {
      const media = wb.getImage(Number(im.imageId));
      const tl = im.range.tl as unknown as { nativeRow: number; nativeCol: number };
      const ext = (im.range as unknown as { ext?: { width: number; height: number } }).ext;
      return { row: tl.nativeRow + 1, col: tl.nativeCol + 1, width: ext?.width ?? 0, height: ext?.height ?? 0, extension: media.extension, bytes: (media.buffer as unknown as Uint8Array | undefined)?.length ?? (media.base64 ? Math.floor((media.base64.length * 3) / 4) : 0) };
    });
    const view = ws.views?.[0] as { state?: string; ySplit?: number } | undefined;
    return { name: ws.name, rows, numberFormats, images, frozenRows: view?.state === 'frozen' ? view.ySplit ?? 0 : 0 };
  });
}
