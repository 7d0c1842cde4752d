// "Where the pattern is" end to end: the command line's JSON and summary, the Local patterns sheet and
// its maps, and the maps' palette. Sources beside each check: the published Benjamini–Hochberg
// step-up rule (Benjamini & Hochberg 1995) applied directly to the reported p-values; the colour-vision
// simulation matrices of Machado, Oliveira & Fernandes (2009, severity 1.0; recalled from memory);
// relative luminance as defined in WCAG 2.1 (sRGB to linear, 0.2126 R + 0.7152 G + 0.0722 B).
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readWorkbook } from '../src/workbook/read-back.js';
import { LOCAL_FILL, P_BAND_FILL } from '../src/report/pictures/local-palette.js';
import { bonferroniFloor } from '../src/report/local-patterns.js';
import { runCli, ROOT, STACK_LINE } from './helpers/cli.js';

const COLUMBUS = join(ROOT, 'test/fixtures/columbus/columbus.shp');
const base = ['fit', '--boundary', COLUMBUS, '--id', 'POLYID', '--y', 'CRIME', '--x', 'INC,HOVAL'];
const dir = mkdtempSync(join(tmpdir(), 'spillway-local-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('spillway fit --local on Columbus', () => {
  const run = runCli([...base, '--models', 'ols', '--local', 'moran,gi,gistar', '--permutations', '499', '--seed', '11', '--json']);
  const out = run.code === 0 ? JSON.parse(run.stdout) : null;

  it('writes a local object keyed by statistic with the documented fields', () => {
    expect(run.stderr).toBe('');
    expect(Object.keys(out.local).sort()).toEqual(['gi', 'gistar', 'moran']);
    for (const k of ['moran', 'gi', 'gistar']) {
      const s = out.local[k];
      expect(s.variable).toBe('CRIME');
      expect(s.permutations).toBe(499);
      expect(s.seed).toBe(11);
      expect(s.permutationRule).toMatch(/\(M \+ 1\)\/\(R \+ 1\)/);
      expect(s.control).toMatchObject({ method: 'fdr', level: 0.05 });
      expect(s.areas).toHaveLength(49);
      for (const key of ['id', 'value', 'expected', 'variance', 'z', 'p', 'pPermutation', 'significant']) expect(s.areas[0]).toHaveProperty(key);
    }
    expect(out.local.moran.areas[0]).toHaveProperty('category');
    expect(out.local.gi.areas[0]).not.toHaveProperty('category');
  });

  it('decides significance by the Benjamini–Hochberg step-up rule on the permutation p-values', () => {
    for (const k of ['moran', 'gi', 'gistar']) {
      const p: number[] = out.local[k].areas.map((a: any) => a.pPermutation);
      const sorted = p.map((x, i) => [x, i] as const).sort((a, b) => a[0] - b[0] || a[1] - b[1]);
      let cut = 0;
      sorted.forEach(([x], r) => { if (x <= ((r + 1) * 0.05) / p.length) cut = r + 1; });
      const expected = new Array(p.length).fill(false);
      sorted.slice(0, cut).forEach(([, i]) => { expected[i] = true; });
      expect(out.local[k].areas.map((a: any) => a.significant)).toEqual(expected);
    }
  });

  it('counts the areas passing under each control, the chosen and the others, by the published rules applied directly', () => {
    for (const k of ['moran', 'gi', 'gistar']) {
      const p: number[] = out.local[k].areas.map((a: any) => a.pPermutation);
      const m = p.length;
      // Benjamini & Hochberg (1995) step-up: the largest rank r with p(r) ≤ r·q/m, and every p at or below it
      const sorted = [...p].sort((a, b) => a - b);
      let cut = -1;
      sorted.forEach((x, r) => { if (x <= ((r + 1) * 0.05) / m) cut = x; });
      const fdr = p.filter((x) => x <= cut).length;
      // Bonferroni: p ≤ q/m; none: p ≤ q
      const bonferroni = p.filter((x) => x <= 0.05 / m).length;
      const none = p.filter((x) => x <= 0.05).length;
      expect(out.local[k].control.significantUnder, k).toEqual({ fdr, bonferroni, none });
      // per area: the chosen control's decision is `significant`, and every control's sits under significantUnder
      expect(out.local[k].areas.map((a: any) => a.significantUnder.fdr)).toEqual(out.local[k].areas.map((a: any) => a.significant));
      expect(out.local[k].areas.map((a: any) => a.significantUnder.bonferroni)).toEqual(p.map((x) => x <= 0.05 / m));
      expect(out.local[k].areas.map((a: any) => a.significantUnder.none)).toEqual(p.map((x) => x <= 0.05));
    }
  });

  it('gives a category only to significant areas, matching the signs of the value and its neighbours', () => {
    for (const a of out.local.moran.areas) {
      if (!a.significant) expect(a.category).toBe('not-significant');
      else expect(['high-high', 'low-low', 'high-low', 'low-high']).toContain(a.category);
      // I_i > 0 exactly when the area and its neighbours lie on the same side of the mean
      if (a.significant) expect(a.value > 0).toBe(a.category === 'high-high' || a.category === 'low-low');
    }
  });

  it('says in the readable summary how many areas stand out', () => {
    const text = runCli([...base, '--models', 'ols', '--local', 'moran', '--multiple-testing', 'bonferroni']);
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(/Where the pattern is: local statistics of CRIME/);
    expect(text.stdout).toMatch(/Bonferroni/);
    // the other control beside the chosen one, and the uncontrolled count labelled as such
    expect(text.stdout).toMatch(/areas significant after control \(\d+ under the false discovery rate; \d+ without control\)/);
  });

  it('refuses unknown statistics, controls and levels with a plain message', () => {
    for (const [args, message] of [
      [['--local', 'moran,hotspot'], /unknown statistic "hotspot"/],
      [['--local', 'moran', '--multiple-testing', 'holm'], /--multiple-testing must be fdr, bonferroni or none/],
      [['--local', 'moran', '--fdr-level', '5'], /--fdr-level must be a number between 0 and 1/],
      [['--local-of', 'residuals'], /--local-of goes with --local/],
      [['--local', 'moran', '--local-of', 'NOPE'], /NOPE/],
      [['--local', 'moran', '--local-of', 'residuals:error'], /spatial error model was not fitted/],
      [['--local', 'gistar', '--local-of', 'residuals'], /need values of zero or more, but residuals of the plain regression is -?[\d.]+ for area \d+ \(row \d+\).*use local Moran/],
    ] as const) {
      const r = runCli([...base, '--models', 'ols', ...args]);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr).not.toMatch(STACK_LINE);
    }
  });
});

describe('local statistics of a spatial model\'s residuals', () => {
  it('runs on the lag model\'s residuals and names them', () => {
    const r = runCli([...base, '--models', 'ols,lag', '--local', 'moran', '--local-of', 'residuals:lag', '--json']);
    expect(r.code, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout).local.moran.variable).toBe('residuals of the spatial lag model');
  });
});

describe('the Local patterns sheet', () => {
  it('is written with its two maps, the per-area tables and the cautions', async () => {
    const file = join(dir, 'local.xlsx');
    const r = runCli([...base, '--models', 'ols', '--local', 'moran,gistar', '--local-of', 'HOVAL', '--out', file]);
    expect(r.code, r.stderr).toBe(0);
    const sheets = await readWorkbook(new Uint8Array(readFileSync(file)));
    const local = sheets.find((s) => s.name === 'Local patterns')!;
    expect(local).toBeDefined();
    expect(local.images).toHaveLength(2);
    const text = local.rows.flat().filter((c) => typeof c === 'string').join(' ');
    expect(text).toMatch(/local statistics of HOVAL/);
    expect(text).toMatch(/Benjamini–Hochberg/);
    expect(text).toMatch(/clusters are of areas, not of people/);
    expect(text).toMatch(/Getis–Ord Gi\* \(area included\), each area in table order/);
    // the counts under the chosen control and the others, labelled
    expect(text).toMatch(/How many areas are significant at 0.05, under the chosen control and the others/);
    expect(text).toMatch(/False discovery rate \(Benjamini–Hochberg\) yes \(chosen\)/);
    expect(text).toMatch(/Any false finding \(Bonferroni\) no \(for comparison\)/);
    expect(text).toMatch(/No control: each area on its own \(uncontrolled\) no \(uncontrolled\)/);
    // 999 permutations do reach 0.05/49 (the smallest p, 1/1,000, is below 0.00102), so no note here
    expect(text).not.toMatch(/no area can pass under Bonferroni/);
    expect(text).toMatch(/Under Bonferroni \(for comparison\)/);
  });
});

describe('the floor of permutation p-values under Bonferroni', () => {
  it('says when no area can pass: the smallest p, 1/(R + 1) (Anselin 1995), above level/tests', () => {
    expect(bonferroniFloor(999, 150, 0.05)).toBe(' With 999 permutations no permutation p-value can fall below 0.001, above Bonferroni’s threshold of 0.05/150, so no area can pass under Bonferroni; it would take at least 2,999 permutations.');
    expect(bonferroniFloor(2999, 150, 0.05)).toBe(''); // 1/3,000 = 0.05/150 exactly passes
    expect(bonferroniFloor(9999, 3000, 0.05)).toMatch(/fall below 1\.0e-4, .* at least 59,999 permutations/);
    expect(bonferroniFloor(0, 150, 0.05)).toBe(''); // analytic p-values have no floor
  });
});

describe('the palette of the local maps', () => {
  const linear = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
  const rgb = (hex: string) => [1, 3, 5].map((i) => linear(parseInt(hex.slice(i, i + 2), 16) / 255));
  const luminance = ([r, g, b]: number[]) => 0.2126 * r + 0.7152 * g + 0.0722 * b;
  // Machado, Oliveira & Fernandes (2009), severity 1.0, applied to linear RGB (recalled from memory)
  const simulations: Record<string, number[][]> = {
    none: [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
    protanopia: [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216], [-0.003882, -0.048116, 1.051998]],
    deuteranopia: [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413], [-0.01182, 0.04294, 0.968881]],
    tritanopia: [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602], [0.004733, 0.691367, 0.3039]],
  };
  const seen = (hex: string, m: number[][]) => {
    const c = rgb(hex);
    return luminance(m.map((row) => Math.min(1, Math.max(0, row[0] * c[0] + row[1] * c[1] + row[2] * c[2]))));
  };

  it('keeps the solid groups apart in lightness in grey and under each simulated deficiency', () => {
    // solid fills: high among high, low among low, not significant, no neighbours, withheld (the outliers are striped)
    const solid = [LOCAL_FILL.highHigh, LOCAL_FILL.lowLow, LOCAL_FILL.none, LOCAL_FILL.noNeighbours, LOCAL_FILL.withheld];
    for (const [name, m] of Object.entries(simulations)) {
      const l = solid.map((h) => seen(h, m)).sort((a, b) => a - b);
      // contrast ratio of at least 1.25 between neighbours in lightness (WCAG's ratio form; our threshold)
      for (let i = 1; i < l.length; i++) expect((l[i] + 0.05) / (l[i - 1] + 0.05), name).toBeGreaterThan(1.25);
    }
  });

  it('orders the p-value bands by lightness under every simulation', () => {
    for (const [name, m] of Object.entries(simulations)) {
      const l = P_BAND_FILL.map((h) => seen(h, m));
      for (let i = 1; i < l.length; i++) expect(l[i], name).toBeGreaterThan(l[i - 1] * 1.3);
    }
  });

  it('is not the conventional red / blue / pale pink / pale blue code', () => {
    const hue = (hex: string) => {
      const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));
      const max = Math.max(r, g, b), min = Math.min(r, g, b);
      if (max === min) return -1;
      const h = max === r ? ((g - b) / (max - min)) % 6 : max === g ? (b - r) / (max - min) + 2 : (r - g) / (max - min) + 4;
      return (h * 60 + 360) % 360;
    };
    // high values are brown (hue 20–40°), low values green-teal (hue 150–180°): neither red nor blue
    for (const h of [LOCAL_FILL.highHigh, LOCAL_FILL.highLow]) expect(hue(h)).toBeGreaterThan(18);
    for (const h of [LOCAL_FILL.lowLow, LOCAL_FILL.lowHigh]) expect(hue(h)).toBeLessThan(190);
  });
});
