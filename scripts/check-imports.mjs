#!/usr/bin/env node
// Import-boundary check: the engine's stages import one another only in pipeline order, and never
// reach downward into a later stage; linalg is entered only through src/linalg/index.ts, and core and
// linalg never import each other. The add-in (addin/) reaches the engine only through its public
// files: a stage's index.ts (never the command line's, which touches the file system), src/errors.ts
// and src/version.ts. Prints each offending import and exits 1 when there is one.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, dirname, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const src = join(root, 'src');
const addin = join(root, 'addin');

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
/** The engine files the add-in may import besides the stages' index.ts. */
const ADDIN_FILES = ['errors.ts', 'version.ts'];
/** Stages the add-in never imports, even through their index. */
const ADDIN_BANNED = ['cli'];

function files(dir) {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    if (name === 'node_modules') return [];
    return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') ? [p] : [];
  });
}

/** Relative import specifiers of a file: static and dynamic imports and re-exports. */
function importsOf(file) {
  return [...readFileSync(file, 'utf8').matchAll(/(?:from|import)\s*\(?\s*['"](\.{1,2}\/[^'"]+)['"]/g)].map((m) => m[1]);
}

/** The imported file relative to src/, with .ts for the .js a NodeNext import names. */
const inSrc = (file, spec) => relative(src, resolve(dirname(file), spec)).replace(/\.js$/, '.ts');

const problems = [];
for (const file of files(src)) {
  const stage = relative(src, file).split(sep)[0];
  const banned = FORBIDDEN[stage] ?? [];
  for (const spec of importsOf(file)) {
    const target = inSrc(file, spec);
    const targetStage = target.split(sep)[0];
    if (DOORS.includes(targetStage) && targetStage !== stage && target.split(sep).join('/') !== `${targetStage}/index.ts`) {
      problems.push(`${relative(root, file)} imports ${spec} (only ${targetStage}/index.ts is a door into ${targetStage})`);
      continue;
    }
    if (banned.includes(targetStage)) problems.push(`${relative(root, file)} imports ${spec}`);
  }
}
for (const file of files(addin)) {
  for (const spec of importsOf(file)) {
    const target = inSrc(file, spec);
    if (target.startsWith('..')) continue; // inside addin/, not the engine
    const parts = target.split(sep);
    const door = parts.length === 1
      ? ADDIN_FILES.includes(parts[0])
      : parts.length === 2 && parts[1] === 'index.ts' && !ADDIN_BANNED.includes(parts[0]);
    if (!door) {
      problems.push(`${relative(root, file)} imports ${spec} (the add-in imports only src/<stage>/index.ts, src/errors.ts and src/version.ts, never src/cli)`);
    }
  }
}
if (problems.length) {
  console.error(`import boundaries: ${problems.length} import(s) against the boundaries:\n  ${problems.join('\n  ')}`);
  process.exit(1);
}
console.log('import boundaries: stages import in pipeline order; the add-in imports only the engine\'s public files.');
