// The bad-input corpus: every case goes through the engine (runAnalysis must throw InputError with
// the expected words) and through the command line in process (exit 2, a short message on stderr
// naming the fault, no stack trace, nothing on stdout, no --out file). Cases are listed in
// cases-geo.ts, cases-table.ts and cases-model.ts; the files are built in code by make.ts.
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { closeSync, existsSync, mkdirSync, mkdtempSync, openSync, rmSync, writeFileSync, ftruncateSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { InputError } from '../../src/errors.js';
import { runAnalysis, type AnalysisRequest } from '../../src/pipeline/index.js';
import { main } from '../../src/cli/run.js';
import { STACK_LINE, runCli } from '../helpers/cli.js';
import { BASE, weightsRule, type BadInput, type CaseFiles } from './case.js';
import { geoCases } from './cases-geo.js';
import { tableCases } from './cases-table.js';
import { modelCases } from './cases-model.js';
import { valueCases } from './cases-values.js';
import { readingCases } from './cases-reading.js';
import { zipCases } from './cases-zips.js';
import { auditCases } from './cases-audit.js';
import { gridFile } from './make.js';

export const ALL_CASES: BadInput[] = [...geoCases, ...tableCases, ...modelCases, ...valueCases, ...readingCases, ...zipCases, ...auditCases];

const QUICK = { permutations: 0, impactDraws: 10 };
let dir = '';
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'spillway-bad-')); });
afterAll(() => { if (dir) rmSync(dir, { recursive: true, force: true }); });

function request(c: BadInput, f: CaseFiles): AnalysisRequest {
  return { ...BASE, ...QUICK, ...c.request, boundary: f.boundary, data: f.data, edgeList: f.edgeList };
}

function matchesAll(message: string, fragments: (string | RegExp)[]): void {
  for (const frag of fragments) {
    if (typeof frag === 'string') expect(message, `message should contain ${JSON.stringify(frag)}`).toContain(frag);
    else expect(message).toMatch(frag);
  }
}

/** Writes the case's files into their own folder and returns the command line for them. */
function cliArgs(c: BadInput, f: CaseFiles, folder: string, out?: string): string[] {
  mkdirSync(folder, { recursive: true });
  const put = (file: { name: string; bytes: Uint8Array }) => {
    const path = join(folder, file.name);
    writeFileSync(path, file.bytes);
    return path;
  };
  const paths = f.boundary.map(put);
  const boundary = paths.find((p) => /\.shp$/i.test(p)) ?? paths[0];
  const r = { ...BASE, ...c.request };
  const args = ['fit', '--boundary', boundary, '--id', r.id, '--y', r.y, '--x', r.x.join(','),
    '--transform', r.transform, '--models', r.models.join(','),
    '--permutations', String(c.request?.permutations ?? 0), '--draws', String(c.request?.impactDraws ?? 10)];
  if (r.seed !== undefined) args.push('--seed', String(r.seed));
  if (r.boundaryId) args.push('--boundary-id', r.boundaryId);
  if (f.data) args.push('--data', put(f.data));
  // a neighbour list replaces the rule (the command line refuses both at once)
  if (f.edgeList) args.push('--neighbours', put(f.edgeList));
  else args.push('--weights', weightsRule(r.weights));
  if (r.layer) args.push('--layer', r.layer);
  if (r.sheet) args.push('--sheet', r.sheet);
  if (r.dropMissing) args.push('--drop-missing');
  if ('order' in r.weights && r.weights.order !== undefined) args.push('--order', String(r.weights.order));
  if ('tolerance' in r.weights && r.weights.tolerance !== undefined) args.push('--tolerance', String(r.weights.tolerance));
  if (r.weights.method === 'knn' && r.weights.ties) args.push('--ties', r.weights.ties);
  // a case's own option replaces the harness's default of it (the command line refuses an option given twice)
  const extra = c.cliExtra ?? [];
  for (let j = 0; j < extra.length; j++) {
    const at = extra[j].startsWith('--') ? args.indexOf(extra[j]) : -1;
    const value = extra[j + 1];
    if (at >= 0 && value !== undefined && !value.startsWith('--') && !args[at + 1]?.startsWith('--')) {
      args[at + 1] = value;
      j++;
    } else args.push(extra[j]);
  }
  if (out) args.push('--out', out);
  return args;
}

async function runMain(args: string[]) {
  let stdout = '';
  let stderr = '';
  const code = await main(args, { stdout: (t) => { stdout += t; }, stderr: (t) => { stderr += t; } });
  return { code, stdout, stderr };
}

describe(`bad-input corpus (${ALL_CASES.length} cases)`, () => {
  it('has at least 60 cases with distinct names, each expecting words', () => {
    expect(ALL_CASES.length).toBeGreaterThanOrEqual(60);
    expect(new Set(ALL_CASES.map((c) => c.name)).size).toBe(ALL_CASES.length);
    for (const c of ALL_CASES) expect(c.expect.length, c.name).toBeGreaterThan(0);
  });

  describe.each(ALL_CASES.map((c, i) => [`${String(i + 1).padStart(2, '0')} ${c.group}: ${c.name}`, c, i] as const))('%s', (_label, c, i) => {
    it.skipIf(c.engine === 'skip')('engine: runAnalysis names the fault', async () => {
      const files = await c.files();
      if ((c.outcome ?? 'refuse') === 'refuse') {
        let caught: unknown = null;
        try {
          await runAnalysis(request(c, files));
        } catch (e) {
          caught = e;
        }
        expect(caught, 'runAnalysis should refuse').toBeInstanceOf(InputError);
        matchesAll((caught as Error).message, c.expect);
      } else {
        const result = await runAnalysis(request(c, files));
        matchesAll(result.warnings.join('\n'), c.expect);
      }
    });

    it.skipIf(c.cli === 'skip')(`command line: ${c.cli === 'skip' ? c.cliNote : 'short message, right exit code'}`, async () => {
      const files = await c.files();
      const folder = join(dir, `case-${i + 1}`);
      const out = join(folder, 'results.xlsx');
      const refuse = (c.outcome ?? 'refuse') === 'refuse';
      // nothing a library prints may reach the terminal: it would come before, or instead of, our message
      const printed = (['log', 'info', 'warn', 'error', 'debug'] as const).map((m) => vi.spyOn(console, m).mockImplementation(() => {}));
      let r;
      try {
        r = await runMain(cliArgs(c, files, folder, refuse ? out : undefined));
      } finally {
        for (const spy of printed) spy.mockRestore();
      }
      expect(printed.flatMap((spy) => spy.mock.calls.map((a) => a.join(' '))), 'printed by a library').toEqual([]);
      // values from the files never reach the terminal as control codes (only line breaks are ours)
      expect(r.stderr + r.stdout).not.toMatch(/[\u0000-\u0008\u000B-\u001F\u007F-\u009F]/);
      if (refuse) {
        expect(r.code, r.stderr).toBe(2);
        expect(r.stdout).toBe('');
        expect(r.stderr.startsWith('spillway: ')).toBe(true);
        expect(r.stderr).not.toMatch(STACK_LINE);
        expect(r.stderr).not.toMatch(/internal error/);
        // one line, or a short list under one heading (the join report)
        expect(r.stderr.trimEnd().split('\n').length).toBeLessThanOrEqual(8);
        expect(r.stderr.length).toBeLessThan(1500);
        matchesAll(r.stderr, c.expect);
        expect(existsSync(out), 'no results file after a refusal').toBe(false);
      } else {
        expect(r.code, r.stderr).toBe(0);
        matchesAll(r.stdout, c.expect);
      }
    });
  });

  it('command line: a boundary file over the 1 GiB cap is refused before it is read (sparse file)', async () => {
    const folder = join(dir, 'oversize');
    mkdirSync(folder, { recursive: true });
    const big = join(folder, 'huge.geojson');
    const fd = openSync(big, 'w');
    try {
      ftruncateSync(fd, 2 ** 30 + 1); // a hole: no disk space is used
    } finally {
      closeSync(fd);
    }
    const r = await runMain(['fit', '--boundary', big, '--id', 'code', '--y', 'y', '--x', 'x1', '--out', join(folder, 'out.xlsx')]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/huge\.geojson" is 1024 MiB, over the 1024 MiB limit/);
    expect(existsSync(join(folder, 'out.xlsx'))).toBe(false);
    rmSync(big);
  });

  it('the real command (bin/spillway.mjs, a separate process) behaves the same on a few cases', async () => {
    const picks = ['JSON cut off mid-way', 'numbers vs zero-padded text (1001 vs 01001): reported, not guessed', 'edge list naming an unknown ID'];
    for (const name of picks) {
      const c = ALL_CASES.find((x) => x.name === name)!;
      const folder = join(dir, `spawned-${picks.indexOf(name)}`);
      const out = join(folder, 'results.xlsx');
      const r = runCli(cliArgs(c, await c.files(), folder, out));
      expect(r.code, r.stderr).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).not.toMatch(STACK_LINE);
      matchesAll(r.stderr, c.expect);
      expect(existsSync(out)).toBe(false);
    }
  });

  it('command line: a missing file, a folder and an empty file are named', async () => {
    const folder = join(dir, 'paths');
    mkdirSync(folder, { recursive: true });
    writeFileSync(join(folder, 'empty.geojson'), '');
    writeFileSync(join(folder, 'districts.geojson'), gridFile().bytes);
    const base = ['fit', '--id', 'code', '--y', 'y', '--x', 'x1'];
    const missing = await runMain([...base, '--boundary', join(folder, 'nowhere.geojson')]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toContain('nowhere.geojson" does not exist');
    const folderArg = await runMain([...base, '--boundary', folder]);
    expect(folderArg.stderr).toContain('is a folder; name a file');
    const empty = await runMain([...base, '--boundary', join(folder, 'empty.geojson')]);
    expect(empty.stderr).toContain('empty.geojson" is empty');
    const noData = await runMain([...base, '--boundary', join(folder, 'districts.geojson'), '--data', join(folder, 'table.csv')]);
    expect(noData.stderr).toContain('table.csv" does not exist');
    for (const r of [missing, folderArg, empty, noData]) {
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).not.toMatch(STACK_LINE);
    }
  });
});
