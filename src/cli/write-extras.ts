/**
 * Outputs beside the workbook: the per-area results joined to the shapes as GeoJSON (--out-geojson),
 * and the report's maps and plots as separate SVG and PNG files (--pictures DIR). Each file is written
 * whole or not at all (write-file.ts), and never over one of the run's input files.
 */
import { readdirSync } from 'node:fs';
import { mkdir, stat } from 'node:fs/promises';
import { basename, dirname, extname, join, resolve } from 'node:path';
import { InputError } from '../errors.js';
import type { AnalysisResult } from '../pipeline/index.js';
import { buildReport, projectedNote, resultsGeoJsonText } from '../report/index.js';
import { renderPng } from '../report/render-png.js';
import { writeWorkbookFile } from '../workbook/write-file.js';

/** The run's input files: the boundary (with a shapefile's companions), the table, the neighbour list. */
export function inputPaths(boundary: string, data?: string, edgeList?: string): string[] {
  const paths = [boundary, ...(data ? [data] : []), ...(edgeList ? [edgeList] : [])];
  if (extname(boundary).toLowerCase() === '.shp') {
    const stem = basename(boundary, extname(boundary)).toLowerCase();
    try {
      for (const entry of readdirSync(dirname(boundary))) {
        if (basename(entry, extname(entry)).toLowerCase() === stem) paths.push(join(dirname(boundary), entry));
      }
    } catch { /* the boundary was read, so its folder exists; nothing more to add */ }
  }
  return paths;
}

/** Refuses an output path that names one of the inputs: an input file is never overwritten. */
export function refuseInputPath(outPath: string, inputs: readonly string[], option: string): void {
  const target = resolve(outPath);
  const hit = inputs.find((p) => resolve(p) === target);
  if (hit) throw new InputError(`${option} ${outPath} is one of the input files; choose another name so the input is not overwritten.`, { file: outPath });
}

/** Writes the GeoJSON; returns notes for the user (projected coordinates). */
export async function writeGeoJsonFile(result: AnalysisResult, outPath: string, inputs: readonly string[]): Promise<string[]> {
  refuseInputPath(outPath, inputs, '--out-geojson');
  await writeWorkbookFile(outPath, new TextEncoder().encode(resultsGeoJsonText(result)));
  const note = projectedNote(result);
  return note ? [note] : [];
}

/** A file name from a picture's name: lower case, words joined by hyphens. */
export function pictureFileName(name: string): string {
  return name.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'picture';
}

/** Writes every picture of the report as NAME.svg and NAME.png into dir (made when missing); returns the file names. */
export async function writePictureFiles(result: AnalysisResult, dir: string, inputs: readonly string[]): Promise<string[]> {
  const existing = await stat(dir).catch(() => null);
  if (existing && !existing.isDirectory()) throw new InputError(`--pictures ${dir} is a file, not a folder; name a folder for the pictures.`, { file: dir });
  await mkdir(dir, { recursive: true });
  const report = buildReport(result, { renderPng });
  const written: string[] = [];
  const used = new Set<string>();
  for (const sheet of report.sheets) {
    for (const im of sheet.images ?? []) {
      let stem = pictureFileName(im.name);
      for (let k = 2; used.has(stem); k++) stem = `${pictureFileName(im.name)}-${k}`;
      used.add(stem);
      for (const [ext, bytes] of [['svg', new TextEncoder().encode(im.svg)], ['png', im.png]] as const) {
        if (bytes.length === 0) continue;
        const path = join(dir, `${stem}.${ext}`);
        refuseInputPath(path, inputs, '--pictures');
        await writeWorkbookFile(path, bytes);
        written.push(`${stem}.${ext}`);
      }
    }
  }
  return written;
}
