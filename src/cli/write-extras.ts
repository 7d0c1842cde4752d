/**
 * Outputs beside the workbook: the per-area results joined to the shapes as GeoJSON (--out-geojson),
 * and the report's maps and plots as separate SVG and PNG files (--pictures DIR). They meet the same
 * rules as the results workbook (output-file.ts): never an input, an existing file replaced only with
 * --overwrite and never when read-only, each file written whole through a temporary file that is
 * removed on failure and on signals (write-file.ts).
 */
import { mkdirSync, rmdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../errors.js';
import type { AnalysisResult } from '../pipeline/index.js';
import { buildReport, projectedNote, resultsGeoJsonText, type Report } from '../report/index.js';
import { renderPng } from '../report/render-png.js';
import { errorInWords, writeWorkbookFile } from '../workbook/write-file.js';
import { planOutput, writeOptions, type InputPath, type OutputPlan, type PictureFolder } from './output-file.js';

/** Writes the GeoJSON to a planned path; returns notes for the user (projected coordinates). */
export async function writeGeoJsonFile(result: AnalysisResult, plan: OutputPlan): Promise<string[]> {
  await writeWorkbookFile(plan.target, new TextEncoder().encode(resultsGeoJsonText(result)), writeOptions(plan));
  const note = projectedNote(result);
  return note ? [note] : [];
}

/** A file name from a picture's name: lower case, words joined by hyphens. */
export function pictureFileName(name: string): string {
  return name.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'picture';
}

export interface PicturePlan {
  pictures: PictureFolder;
  files: { name: string; bytes: Uint8Array; plan?: OutputPlan }[];
  /** the report the pictures were drawn for: the results workbook is written from the same one */
  report: Report;
}

/**
 * Draws every picture of the report and checks each file it will be written to (NAME.svg and
 * NAME.png in the planned folder) against the inputs and what is there — before any output of the run
 * is written, so a refusal leaves every folder as it was.
 */
export function planPictureFiles(
  result: AnalysisResult, pictures: PictureFolder, inputs: InputPath[], overwrite: boolean, others: { plan: OutputPlan; option: string }[] = [],
): PicturePlan {
  const report = buildReport(result, { renderPng });
  const files: PicturePlan['files'] = [];
  const used = new Set<string>();
  for (const sheet of report.sheets) {
    for (const im of sheet.images ?? []) {
      let stem = pictureFileName(im.name);
      for (let k = 2; used.has(stem); k++) stem = `${pictureFileName(im.name)}-${k}`;
      used.add(stem);
      for (const [ext, bytes] of [['svg', new TextEncoder().encode(im.svg)], ['png', im.png]] as const) {
        if (bytes.length === 0) continue;
        const name = `${stem}.${ext}`;
        const clash = others.find((o) => o.plan.target === join(pictures.folder, name));
        if (clash) {
          throw new InputError(`${clash.option} "${clash.plan.given}" is also the picture ${name} of --pictures "${pictures.given}"; name another file or folder.`, { file: clash.plan.given });
        }
        // in a folder still to be made there is nothing to compare with
        files.push({ name, bytes, ...(pictures.exists ? { plan: planOutput(join(pictures.folder, name), inputs, overwrite, '--pictures') } : {}) });
      }
    }
  }
  return { pictures, files, report };
}

/**
 * Writes the planned pictures (making their folder when missing); returns the file names. All or
 * none: when one fails (a full disk, a folder made read-only meanwhile), the pictures this call
 * created are removed again, and the folder too when it made it, and the message says so. A picture
 * that replaced an existing file (--overwrite) cannot be put back; the message names those.
 */
export async function writePictureFiles({ pictures, files }: PicturePlan): Promise<string[]> {
  let madeFolder = false;
  if (!pictures.exists) {
    try {
      mkdirSync(pictures.folder);
      madeFolder = true;
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      // made meanwhile by someone else: each file below is then placed without replacing anything
      if (code !== 'EEXIST') throw new InputError(`Cannot make the --pictures folder "${pictures.given}": ${errorInWords(code)}. Check the path and permissions, or name another folder.`, { file: pictures.given });
    }
  }
  const created: string[] = [];
  const replaced: string[] = [];
  for (const f of files) {
    const target = f.plan ? f.plan.target : join(pictures.folder, f.name);
    try {
      await writeWorkbookFile(target, f.bytes, f.plan ? writeOptions(f.plan) : {});
    } catch (e) {
      for (const c of created) rmSync(c, { force: true });
      if (madeFolder) {
        try {
          rmdirSync(pictures.folder);
        } catch {
          // not empty (someone else's file): left as it is
        }
      }
      const why = e instanceof Error ? e.message : String(e);
      throw new InputError(
        `${why} No pictures were kept: the ${created.length} written before it ${created.length === 1 ? 'was' : 'were'} removed` +
          (replaced.length ? `, but ${replaced.length} existing picture(s) had already been replaced (${replaced.join(', ')})` : '') + '.',
        { file: target },
      );
    }
    if (f.plan?.replaceMode !== undefined) replaced.push(f.name);
    else created.push(target);
  }
  return files.map((f) => f.name);
}
