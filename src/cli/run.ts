import { InputError, printable } from '../errors.js';
import { runAnalysis, resultToJson } from '../pipeline/index.js';
import { ENGINE_VERSION } from '../version.js';
import { FIT_USAGE, parseFitArgs } from './args.js';
import { boundaryPaths, readBoundaryFiles, readNamedFile } from './read-files.js';
import { planOutput, planPictureFolder, writeOptions, type InputPath } from './output-file.js';
import { formatSummary } from './summary.js';
import { startNodeHelper } from './helper-thread.js';

const USAGE = `Spillway ${ENGINE_VERSION}: spatial regression for area-level data.

Commands
  spillway fit ...     fit the models and print a summary, JSON, or a results workbook
  spillway help        this text

${FIT_USAGE}`;

export interface CliIo {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
}

const processIo: CliIo = {
  stdout: (t) => { process.stdout.write(t); },
  stderr: (t) => { process.stderr.write(t); },
};

/** JSON text with the characters `printable` escapes written as JSON escapes (the document stays valid). */
function jsonPrintable(text: string): string {
  return printable(text, (hex) => `\\u${hex}`);
}

/** Returns the exit code: 0 done, 2 bad input or usage, 1 an internal failure. */
export async function main(argv: string[], rawIo: CliIo = processIo): Promise<number> {
  const [command, ...rest] = argv;
  // Everything shown passes through one escaping function: values read from files cannot send terminal codes.
  const io: CliIo = { stdout: (t) => rawIo.stdout(printable(t)), stderr: (t) => rawIo.stderr(printable(t)) };
  try {
    if (!command || command === 'help' || command === '--help' || command === '-h') {
      io.stdout(USAGE);
      return command ? 0 : 2;
    }
    if (command === '--version') { io.stdout(`${ENGINE_VERSION}\n`); return 0; }
    if (command !== 'fit') throw new InputError(`Unknown command "${command}". Try: spillway fit --help`);
    if (rest.includes('--help') || rest.includes('-h')) { io.stdout(FIT_USAGE); return 0; }
    const args = parseFitArgs(rest);
    // the output is checked before anything is read or run: against every file the run will read
    const inputs: InputPath[] = [
      ...boundaryPaths(args.boundary).map((path) => ({ path, option: '--boundary' })),
      ...(args.data ? [{ path: args.data, option: '--data' }] : []),
      ...(args.edgeList ? [{ path: args.edgeList, option: '--neighbours' }] : []),
    ];
    const output = args.out ? planOutput(args.out, inputs, args.overwrite) : undefined;
    const geojson = args.outGeojson ? planOutput(args.outGeojson, inputs, args.overwrite, '--out-geojson') : undefined;
    const pictures = args.pictures ? planPictureFolder(args.pictures) : undefined;
    if (output && geojson && output.target === geojson.target) {
      throw new InputError(`--out-geojson "${geojson.given}" is the same file as --out "${output.given}"; name two different files.`, { file: geojson.given });
    }
    for (const other of [output && { plan: output, option: '--out' }, geojson && { plan: geojson, option: '--out-geojson' }]) {
      if (other && pictures && other.plan.target === pictures.folder) {
        throw new InputError(`${other.option} "${other.plan.given}" is the --pictures folder "${pictures.given}"; name a file for ${other.option} and a folder for the pictures.`, { file: other.plan.given });
      }
    }
    for (const note of [...output?.notes ?? [], ...geojson?.notes ?? [], ...pictures?.notes ?? []]) io.stderr(`spillway: note: ${note}\n`);
    const data = args.data ? readNamedFile(args.data, 'data') : undefined;
    const result = await runAnalysis({
      boundary: readBoundaryFiles(args.boundary),
      layer: args.layer,
      coordinates: args.coordinates,
      data,
      sheet: args.sheet,
      id: args.id,
      boundaryId: args.boundaryId,
      idsIgnoreLeadingZeros: args.idsIgnoreLeadingZeros,
      ...(args.label ? { label: args.label } : {}),
      y: args.y,
      x: args.x,
      weights: args.weights,
      edgeList: args.edgeList ? readNamedFile(args.edgeList, 'neighbour list') : undefined,
      compareWeights: args.compare,
      transform: args.transform,
      linkUnneighboured: args.linkUnneighboured,
      models: args.models,
      dropMissing: args.dropMissing,
      robust: args.robust,
      seed: args.seed,
      impactDraws: args.draws,
      permutations: args.permutations,
      ...(args.local ? { local: { ...args.local, permutations: args.permutations } } : {}),
      ...(args.rates ? { rates: args.rates } : {}),
      algebra: args.algebra,
    }, args.threads === 2 ? { helper: startNodeHelper } : {});
    // the pictures' names are known once they are drawn: all are checked before any output is written
    const picturePlan = pictures ? (await import('./write-extras.js')).planPictureFiles(result, pictures, inputs, args.overwrite,
      [...(output ? [{ plan: output, option: '--out' }] : []), ...(geojson ? [{ plan: geojson, option: '--out-geojson' }] : [])]) : undefined;
    // a later output that fails says which earlier ones were written (each one is whole)
    const written: string[] = [];
    try {
    if (output) {
      const { writeResultsFile } = await import('./write-results.js');
      const source = args.data && data ? { path: args.data, bytes: data.bytes } : undefined;
      for (const note of await writeResultsFile(result, output.target, source, writeOptions(output), picturePlan?.report)) io.stderr(`spillway: note: ${note}\n`);
      written.push(`the results workbook ${output.given}`);
    }
    if (geojson) {
      const { writeGeoJsonFile } = await import('./write-extras.js');
      for (const note of await writeGeoJsonFile(result, geojson)) io.stderr(`spillway: note: ${note}\n`);
      written.push(`the GeoJSON ${geojson.given}`);
    }
    if (picturePlan) {
      const { writePictureFiles } = await import('./write-extras.js');
      io.stderr(`spillway: pictures in ${picturePlan.pictures.given}: ${(await writePictureFiles(picturePlan)).join(', ')}\n`);
    }
    } catch (e) {
      if (e instanceof InputError && written.length > 0) {
        throw new InputError(`${e.message} Already written, and complete: ${written.join('; ')}.`, e.where);
      }
      throw e;
    }
    if (args.json) rawIo.stdout(jsonPrintable(JSON.stringify(resultToJson(result, { perArea: args.perArea }), null, 2)) + '\n');
    else io.stdout(formatSummary(result) + '\n' + (args.out ? `\nResults workbook: ${args.out}\n` : '') + (args.outGeojson ? `Areas with results (GeoJSON): ${args.outGeojson}\n` : ''));
    return 0;
  } catch (e) {
    if (e instanceof InputError) {
      io.stderr(`spillway: ${e.message}\n`);
      return 2;
    }
    const err = e as Error;
    io.stderr(`spillway: internal error: ${err?.message ?? String(e)}. Please report this with the command you ran.\n`);
    if (process.env.SPILLWAY_DEBUG) io.stderr(`${err?.stack ?? ''}\n`);
    return 1;
  }
}

