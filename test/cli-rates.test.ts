// `spillway fit --rate` end to end on the North Carolina counties (test/fixtures/sids, Debian's
// r-cran-spdata, CC0): the JSON `rates` object of issue #14, the modelled column equal to the chosen
// smoothed rate, and a bad recipe refused on one line. The smoothed values
// themselves are checked against numpy in stats-rates-reference.test.ts.
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli } from './helpers/cli.js';
import { parseFitArgs } from '../src/cli/args.js';

const SIDS = fileURLToPath(new URL('./fixtures/sids/sids.shp', import.meta.url));

describe('spillway fit --rate', () => {
  it('defines a rate column, models the chosen smoothed rate and writes rates in the JSON', () => {
    const run = runCli(['fit', '--boundary', SIDS, '--id', 'FIPS', '--y', 'sids', '--x', 'NWBIR74', '--models', 'ols',
      '--rate', 'sids=SID74/BIR74', '--per', '1000', '--smooth', 'local', '--permutations', '99', '--json']);
    expect(run.code, run.stderr).toBe(0);
    const out = JSON.parse(run.stdout);
    const r = out.rates.sids;
    expect(r).toMatchObject({ events: 'SID74', population: 'BIR74', per: 1000, smoothing: 'local' });
    expect(r.flagRule).toMatch(/fewer than 20 events/);
    expect(r.ebMoran).toMatchObject({ permutations: 99 });
    expect(r.areas).toHaveLength(100);
    expect(Object.keys(r.areas[0])).toEqual(['id', 'rate', 'flagged', 'ebGlobal', 'ebLocal', 'neighbourhood']);
    expect(out.question.y).toBe("sids");
  });
  it('--withhold-flagged says in the JSON which areas the workbook leaves blank, and takes the standardised rates to the local statistics', () => {
    const run = runCli(['fit', '--boundary', SIDS, '--id', 'FIPS', '--y', 'sids', '--x', 'NWBIR74', '--models', 'ols',
      '--rate', 'sids=SID74/BIR74', '--withhold-flagged', '--permutations', '0', '--local', 'moran', '--local-of', 'rate:sids', '--json']);
    expect(run.code, run.stderr).toBe(0);
    const out = JSON.parse(run.stdout);
    const r = out.rates.sids;
    expect(r.withholdFlagged).toBe(true);
    // the flag's rule of thumb (fewer than 20 events; common practice) decides who is withheld
    expect(r.withheldInWorkbook).toEqual(r.areas.filter((a: { flagged: boolean }) => a.flagged).map((a: { id: string }) => a.id));
    expect(r.withheldInWorkbook.length).toBeGreaterThan(0);
    expect(r.moranOfRawRate).toMatchObject({ permutations: 0 });
    expect(out.local.moran.of).toBe('rate:sids');
    expect(out.local.moran.variable).toBe('sids, standardised by empirical Bayes');
    const stray = runCli(['fit', '--boundary', SIDS, '--id', 'FIPS', '--y', 'SID74', '--x', 'NWBIR74', '--withhold-flagged']);
    expect(stray.code).toBe(2);
    expect(stray.stderr).toMatch(/--withhold-flagged goes with --rate/);
  });
  it('refuses a malformed recipe and a stray --smooth on one line', () => {
    const bad = runCli(['fit', '--boundary', SIDS, '--id', 'FIPS', '--y', 'sids', '--x', 'NWBIR74', '--rate', 'SID74/BIR74']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/NAME=EVENTS\/POPULATION/);
    const stray = runCli(['fit', '--boundary', SIDS, '--id', 'FIPS', '--y', 'SID74', '--x', 'NWBIR74', '--smooth', 'local']);
    expect(stray.code).toBe(2);
    expect(stray.stderr).toMatch(/--smooth goes with --rate/);
  });

  it('one --per applies to every rate; one after each --rate gives each its own; a lone repeat is refused, never the last silently kept', () => {
    const base = ['--boundary', 'b.shp', '--id', 'FIPS', '--y', 'sids', '--x', 'nw'];
    const pers = (extra: string[]) => parseFitArgs([...base, ...extra]).rates!.recipes.map((r) => [r.name, r.per]);
    expect(pers(['--rate', 'sids=SID74/BIR74', '--rate', 'nw=NWBIR74/BIR74', '--per', '100'])).toEqual([['sids', 100], ['nw', 100]]);
    expect(pers(['--per', '100000', '--rate', 'sids=SID74/BIR74', '--rate', 'nw=NWBIR74/BIR74'])).toEqual([['sids', 100000], ['nw', 100000]]);
    expect(pers(['--rate', 'sids=SID74/BIR74', '--per', '1000', '--rate', 'nw=NWBIR74/BIR74', '--per', '100'])).toEqual([['sids', 1000], ['nw', 100]]);
    expect(() => parseFitArgs([...base, '--rate', 'sids=SID74/BIR74', '--rate', 'nw=NWBIR74/BIR74', '--per', '1000', '--per', '100']))
      .toThrow(/--rate nw=NWBIR74\/BIR74 is followed by --per 1000 and --per 100/);
    expect(() => parseFitArgs([...base, '--rate', 'sids=SID74/BIR74', '--per', '1000', '--rate', 'nw=NWBIR74/BIR74', '--rate', 'w=NWBIR79/BIR79', '--per', '100']))
      .toThrow(/--per follows some rates but not --rate nw=NWBIR74\/BIR74/);
  });

  it('any other option given twice is refused with both values (--x INC --x HOVAL would have fitted HOVAL alone)', () => {
    const base = ['--boundary', 'b.shp', '--id', 'FIPS', '--y', 'sids'];
    expect(() => parseFitArgs([...base, '--x', 'INC', '--x', 'HOVAL'])).toThrow(/--x is given 2 times \("INC", "HOVAL"\); name the explanatory columns once, comma-separated: --x INC,HOVAL/);
    expect(() => parseFitArgs([...base, '--x', 'INC', '--weights', 'queen', '--weights', 'rook'])).toThrow(/--weights is given 2 times \("queen", "rook"\); give it once/);
    expect(() => parseFitArgs([...base, '--x', 'INC', '--local', 'moran', '--local', 'gistar'])).toThrow(/--local is given 2 times .*comma-separated/);
    expect(() => parseFitArgs([...base, '--x', 'INC', '--json', '--json'])).toThrow(/--json is given 2 times; give it once/);
  });
});
