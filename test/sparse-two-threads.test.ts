/**
 * The sparse Cholesky factor shared with a second thread (a Node worker) against the same factor on
 * one thread. Reference: the one-thread factor, itself checked against ml-matrix's dense
 * determinants and eigenvalues in sparse-logdet.test.ts; a split changes only the order in which
 * the same supernodes are eliminated and summed, so the log-determinants agree to rounding
 * (1e-12 relative) and the blocked solves column by column exactly.
 */
import { describe, expect, it } from 'vitest';
import { rookGrid, randomGeometric } from '../bench/grid.js';
import { SparseCholeskyLogDet } from '../src/linalg/sparse/cholesky-logdet.js';
import { CholeskyTraces } from '../src/linalg/sparse/traces.js';
import { NotPositiveDefiniteError } from '../src/linalg/sparse/frontal.js';
import { planSplit } from '../src/linalg/sparse/split.js';
import { symmetricForm } from '../src/linalg/symmetric-form.js';
import { sparseAlgebra } from '../src/linalg/sparse/sparse-algebra.js';
import { startNodeHelper } from '../src/cli/helper-thread.js';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gridGeoJson } from '../bench/grid-geojson.js';
import { runCli, STACK_LINE } from './helpers/cli.js';

describe('a second thread for the sparse Cholesky factor', () => {
  it('splits the nested-dissection tree into two groups of about equal work', () => {
    const g = rookGrid(120, 120);
    const ld = new SparseCholeskyLogDet(g.s);
    const split = planSplit(ld.symbolic)!;
    expect(split).not.toBeNull();
    // every supernode belongs to exactly one group or to the top
    const owner = new Int8Array(ld.symbolic.superCount).fill(-1);
    split.groups.forEach((ranges, gi) => {
      for (let r = 0; r < ranges.length; r += 2) for (let s = ranges[r]; s < ranges[r + 1]; s++) { expect(owner[s]).toBe(-1); owner[s] = gi; }
    });
    for (const s of split.top) { expect(owner[s]).toBe(-1); owner[s] = 2; }
    expect(owner.every((o) => o >= 0)).toBe(true);
    expect(split.groups[0].length).toBeGreaterThan(0);
    expect(split.groups[1].length).toBeGreaterThan(0);
  });

  it('gives the one-thread log-determinant on a 150×150 rook grid and a random geometric graph, and the same pivot failure outside the range', () => {
    const cases = [rookGrid(150, 150).s, randomGeometric(12000, 0.015, 7).s];
    for (const s of cases) {
      const one = new SparseCholeskyLogDet(s);
      const two = new SparseCholeskyLogDet(s, { helper: startNodeHelper });
      expect(two.helper).not.toBeNull();
      expect(two.helper!.available()).toBe(true);
      for (const rho of [0.3, -0.6, 0.95, 0.5]) {
        const a = one.evaluate(rho), b = two.evaluate(rho);
        expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-12 * Math.abs(a));
      }
      expect(() => two.evaluate(1.05)).toThrow(NotPositiveDefiniteError);
      // and the pair goes on working after a failure
      expect(Math.abs(two.evaluate(0.7) - one.evaluate(0.7))).toBeLessThanOrEqual(1e-12 * Math.abs(one.evaluate(0.7)));
    }
  });

  it('gives the one-thread Hutchinson traces (the same probes, half of them solved on the helper)', () => {
    const g = rookGrid(150, 150);
    const form = symmetricForm(g.w, g.s)!;
    const one = new SparseCholeskyLogDet(form.s);
    const two = new SparseCholeskyLogDet(form.s, { helper: startNodeHelper });
    const budget = { exactBudget: 0, probes: 20, seed: 5 };
    const a = new CholeskyTraces(one, form.s, form.t, budget, g.w).traces(0.6);
    const b = new CholeskyTraces(two, form.s, form.t, budget, g.w).traces(0.6);
    for (const key of ['trG', 'trG2', 'trGtG', 'trAinv', 'trWtG', 'trWG'] as const) expect(Math.abs(a[key] - b[key])).toBeLessThanOrEqual(1e-12 * Math.abs(a[key]));
  });

  it('runs the range\'s Lanczos on the helper with the same result as here, even when a factorisation is asked for first', () => {
    const g = randomGeometric(12000, 0.015, 11);
    for (const first of ['factor', 'range'] as const) {
      const here = sparseAlgebra(g.w, g.s, { seed: 9 });
      const there = sparseAlgebra(g.w, g.s, { seed: 9, helper: startNodeHelper });
      expect(there.cholesky!.helper).not.toBeNull();
      if (first === 'factor') there.logdet.evaluate(0.4);
      expect(there.range).toEqual(here.range);
      for (const rho of [-0.5, 0.3, 0.9]) expect(there.roughLogdet!.evaluate(rho)).toBe(here.roughLogdet!.evaluate(rho));
      there.dispose?.();
    }
  });

  it('the command line gives the same lag model with --threads 1 and 2 on a 160×160 grid, and refuses --threads 3 in plain words', () => {
    const dir = mkdtempSync(join(tmpdir(), 'spillway-threads-'));
    try {
      const file = join(dir, 'grid.geojson');
      writeFileSync(file, gridGeoJson(160, 160));
      const base = ['fit', '--boundary', file, '--id', 'id', '--y', 'y', '--x', 'x1,x2', '--models', 'lag', '--weights', 'rook', '--json'];
      const one = runCli([...base, '--threads', '1']);
      const two = runCli(base);
      expect(one.code).toBe(0);
      expect(two.code).toBe(0);
      const a = JSON.parse(one.stdout), b = JSON.parse(two.stdout);
      expect(b.logDeterminant.logDeterminant).toMatch(/two threads/);
      expect(a.logDeterminant.logDeterminant).not.toMatch(/two threads/);
      // the two factorisations differ by rounding, and each search stops within its tolerance of
      // 1e-8 in ρ (bracket-polish.ts): agreement to that, not closer, is what the method promises
      expect(Math.abs(a.lag.rho - b.lag.rho)).toBeLessThan(1e-8);
      expect(Math.abs(a.lag.logLik - b.lag.logLik)).toBeLessThan(1e-6);
      const bad = runCli([...base, '--threads', '3']);
      expect(bad.code).not.toBe(0);
      expect(bad.stderr).toMatch(/--threads must be 1 or 2, not "3"/);
      expect(bad.stderr).not.toMatch(STACK_LINE);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);
});
