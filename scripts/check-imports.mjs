#!/usr/bin/env node
// Import-boundary check: the engine's stages import one another only in pipeline order, and never
// reach downward into a later stage; linalg is entered only through src/linalg/index.ts, and core and
// linalg never import each other. Prints each offending import and exits 1 when there is one.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, dirname, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const src = join(root, 'src');

/** For each stage, the stages it must never import. */
const FORBIDDEN = {
  core: ['linalg', 'geo', 'weights', 'models', 'stats', 'pipeline', 'report', 'workbook', 'cli'],
  linalg: ['core', 'geo', 'weights', 'models', 'stats', 'pipeline', 'report', 'workbook', 'cli'],
  geo: ['weights', 'models', 'stats', 'pipeline', 'report', 'workbook', 'cli'],
  weights: ['models', 'stats', 'pipeline', 'report', 'workbook', 'cli'],
  stats: ['models', 'pipeline', 'report', 'workbook', 'cli'],
  models: ['pipeline', 'report', 'workbook', 'cli'],
  report: ['workbook', 'cli'],
  workbook: ['cli'],
};
/** Stages whose only door is their index.ts: a file outside the stage imports nothing else of it. */
const DOORS = ['linalg'];

function files(dir) {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') ? [p] : [];
  });
}

const problems = [];
for (const file of files(src)) {
  const stage = relative(src, file).split(sep)[0];
  const banned = FORBIDDEN[stage] ?? [];
  const text = readFileSync(file, 'utf8');
  for (const m of text.matchAll(/(?:from|import)\s*\(?\s*'(\.{1,2}\/[^']+)'/g)) {
    const target = relative(src, resolve(dirname(file), m[1])).replace(/\.js$/, '.ts');
    const targetStage = target.split(sep)[0];
    if (DOORS.includes(targetStage) && targetStage !== stage && target.split(sep).join('/') !== `${targetStage}/index.ts`) {
      problems.push(`${relative(root, file)} imports ${m[1]} (only ${targetStage}/index.ts is a door into ${targetStage})`);
      continue;
    }
    if (!banned.includes(targetStage)) continue;
    problems.push(`${relative(root, file)} imports ${m[1]}`);
  }
}
if (problems.length) {
  console.error(`import boundaries: ${problems.length} import(s) against the stage order:\n  ${problems.join('\n  ')}`);
  process.exit(1);
}
console.log('import boundaries: stages import in pipeline order.');
