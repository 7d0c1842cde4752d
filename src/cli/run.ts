import { InputError } from '../errors.js';
import { runAnalysis, resultToJson } from '../pipeline/index.js';
import { ENGINE_VERSION } from '../version.js';
import { FIT_USAGE, parseFitArgs } from './args.js';
import { readBoundaryFiles, readNamedFile } from './read-files.js';
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

/** Returns the exit code: 0 done, 2 bad input or usage, 1 an internal failure. */
export async function main(argv: string[], io: CliIo = processIo): Promise<number> {
  const [command, ...rest] = argv;
  try {
    if (!command || command === 'help' || command === '--help' || command === '-h') {
      io.stdout(USAGE);
      return command ? 0 : 2;
    }
    if (command === '--version') { io.stdout(`${ENGINE_VERSION}\n`); return 0; }
    if (command !== 'fit') throw new InputError(`Unknown command "${command}". Try: spillway fit --help`);
    if (rest.includes('--help') || rest.includes('-h')) { io.stdout(FIT_USAGE); return 0; }
    const args = parseFitArgs(rest);
    const result = await runAnalysis({
      boundary: readBoundaryFiles(args.boundary),
      layer: args.layer,
      coordinates: args.coordinates,
      data: args.data ? readNamedFile(args.data, 'data') : undefined,
      sheet: args.sheet,
      id: args.id,
      boundaryId: args.boundaryId,
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
    if (args.out) {
      const { writeResultsFile } = await import('./write-results.js');
      for (const note of await writeResultsFile(result, args.out, args.data)) io.stderr(`spillway: note: ${note}\n`);
    }
    if (args.outGeojson || args.pictures) {
      const extras = await import('./write-extras.js');
      const inputs = extras.inputPaths(args.boundary, args.data, args.edgeList);
      if (args.outGeojson) for (const note of await extras.writeGeoJsonFile(result, args.outGeojson, inputs)) io.stderr(`spillway: note: ${note}\n`);
      if (args.pictures) io.stderr(`spillway: pictures in ${args.pictures}: ${(await extras.writePictureFiles(result, args.pictures, inputs)).join(', ')}\n`);
    }
    if (args.json) io.stdout(JSON.stringify(resultToJson(result, { perArea: args.perArea }), null, 2) + '\n');
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

