import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');

/** Runs the command line from the TypeScript sources, as a user would run `npx spillway`. */
export function runCli(args: string[], opts: { cwd?: string } = {}) {
  const r = spawnSync(process.execPath, [join(ROOT, 'bin', 'spillway.mjs'), ...args], {
    cwd: opts.cwd ?? ROOT,
    encoding: 'utf8',
    env: { ...process.env, SPILLWAY_FROM_SOURCE: '1' },
    timeout: 120_000,
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** A stack trace line, which a user must never see. */
export const STACK_LINE = /^\s+at .+[:(]/m;
