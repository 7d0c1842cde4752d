// The "Rates" sheet, the rate lines of the Summary and the run record, and withholding flagged areas,
// on the North Carolina counties (test/fixtures/sids, Debian's r-cran-spdata, CC0): events SID74,
// population BIR74, queen contiguity. The figures on the sheet are checked against the numpy
// reference test/golden/rates.json (scripts/reference/rates.py) and, for the plain Moran's I of the
// raw rate, against its definition (Moran 1950) computed here from the weights' edge list.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { runAnalysis, parseRateRecipe, type AnalysisResult } from '../src/pipeline/index.js';
import { buildReport, layoutBlocks, resultsGeoJson, type Block, type ReportSheet } from '../src/report/index.js';

const golden = JSON.parse(readFileSync(new URL('./golden/rates.json', import.meta.url), 'utf8'));
const boundary = ['sids.shp', 'sids.dbf', 'sids.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(new URL(`./fixtures/sids/${name}`, import.meta.url))) }));

function run(opts: { withhold?: boolean; smoothing?: 'global' | 'local' | 'neighbourhood'; local?: string; y?: string; x?: string }): Promise<AnalysisResult> {
  return runAnalysis({
    boundary, id: 'FIPS', y: opts.y ?? 'sids', x: [opts.x ?? 'NWBIR74'], weights: { method: 'queen' }, transform: 'row', models: ['ols'], permutations: 99, seed: 7,
    rates: { recipes: [parseRateRecipe('sids=SID74/BIR74', 1000)], smoothing: opts.smoothing ?? 'local', withholdFlagged: opts.withhold },
    ...(opts.local ? { local: { statistics: ['moran'], of: opts.local, permutations: 0 } } : {}),
  });
}

const table = (sheet: ReportSheet, title: RegExp) => sheet.blocks.find((b): b is Extract<Block, { kind: 'table' }> => b.kind === 'table' && title.test(b.title))!;
const keyValue = (sheet: ReportSheet, label: string | RegExp) => {
  for (const b of sheet.blocks) if (b.kind === 'keyValues') for (const r of b.rows) if (typeof label === 'string' ? r[0] === label : label.test(r[0])) return r[1];
  return undefined;
};
const relClose = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-10 * Math.abs(b));

describe('the Rates sheet (North Carolina counties, SID74 per 1,000 BIR74)', async () => {
  const result = await run({});
  const report = buildReport(result);
  const sheet = report.sheets.find((s) => s.role === 'rates')!;

  it('comes after the model sheets with its name, and lists every area in table order', () => {
    expect(sheet.name).toBe('Rates');
    const areas = table(sheet, /each area in table order/);
    expect(areas.rows.map((r) => r[0])).toEqual(golden.ids);
    expect(areas.columns.map((c) => c.header)).toEqual([
      'Area ID', 'Table row', 'Events', 'Population', 'Raw rate per 1,000', 'Smoothed, global empirical Bayes',
      'Smoothed, local empirical Bayes', 'Smoothed, neighbourhood', 'Few events (flagged)', 'Shrinkage weight, global', 'Shrinkage weight, local',
    ]);
  });

  it('shows the smoothed rates and the global shrinkage weight of the numpy reference, per 1,000', () => {
    const rows = table(sheet, /each area in table order/).rows;
    rows.forEach((row, i) => {
      relClose(row[5] as number, golden.ebGlobal[i] * 1000);
      relClose(row[6] as number, golden.ebLocal[i] * 1000);
      relClose(row[7] as number, golden.neighbourhood[i] * 1000);
      relClose(row[9] as number, golden.ebGlobalWeight[i]);
      // the raw rate is the ratio of the two counts beside it
      relClose(row[4] as number, (1000 * (row[2] as number)) / (row[3] as number));
      // the flag follows the stated rule (fewer than 20 events: common practice)
      expect(row[8]).toBe((row[2] as number) < 20 ? 'yes' : 'no');
    });
  });

  it('puts the rate-adjusted Moran’s I of the reference beside the plain Moran’s I of the raw rate, computed by its definition', () => {
    const tests = table(sheet, /plain and the rate-adjusted Moran/);
    relClose(tests.rows[1][1] as number, golden.ebMoranI);
    // Moran (1950): I = (n / S0) Σ w_ij z_i z_j / Σ z_i², z the centred raw rates, from the run's edge list
    const rate = table(sheet, /each area in table order/).rows.map((r) => r[4] as number);
    const mean = rate.reduce((a, b) => a + b, 0) / rate.length;
    const z = rate.map((v) => v - mean);
    const { from, to, weight } = result.weights.edges;
    let s0 = 0, cross = 0;
    for (let e = 0; e < from.length; e++) { s0 += weight[e]; cross += weight[e] * z[from[e]] * z[to[e]]; }
    const plain = (rate.length / s0) * cross / z.reduce((a, b) => a + b * b, 0);
    expect(Math.abs((tests.rows[0][1] as number) - plain)).toBeLessThan(1e-12);
    expect(tests.rows[0][5]).toBe(99);
    // why the two differ is said once, in the sheet's reading, and the note points to it
    expect(sheet.blocks.some((b) => b.kind === 'paragraph' && /The two differ because a raw rate resting on few events swings widely by chance/.test(b.text))).toBe(true);
    expect(tests.note).toMatch(/^Why the two differ: see the reading at the top of this sheet\./);
  });

  it('draws the raw and the smoothed rate side by side in shared classes, with the flagged areas hatched', () => {
    expect(sheet.images).toHaveLength(1);
    const im = sheet.images![0];
    expect(im.svg).toContain('Raw rate (as counted)');
    expect(im.svg).toContain('Smoothed: local empirical-Bayes rate');
    expect(im.alt).toMatch(/hatched: few events: unreliable \(95\)/);
    expect(im.svg.match(/url\(#flaghatch\)/g)!.length).toBe(2 * 95 + 1); // both maps, and the legend
    // the picture sits in the space left for it, above the area table
    const { starts } = layoutBlocks(sheet.blocks);
    const spaceIndex = sheet.blocks.findIndex((b) => b.kind === 'space');
    expect(im.anchor.row).toBeGreaterThanOrEqual(starts[spaceIndex]);
  });

  it('carries the cautions the issue asks for', () => {
    const text = sheet.blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text).join(' ');
    expect(text).toMatch(/Smoothing changes the rates of small areas most/);
    expect(text).toMatch(/Do not publish smoothed rates as observed/);
    expect(text).toMatch(/answers a different question/);
    expect(text).toMatch(/overstate clustering/);
    expect(text).toMatch(/department’s own rules on suppressing small counts/);
  });

  it('the Summary and the run record carry the recipe', () => {
    const summary = report.sheets.find((s) => s.role === 'overview')!;
    expect(keyValue(summary, 'Rate sids')).toMatch(/^SID74 per 1,000 BIR74; the outcome, as its local empirical-Bayes rate; 95 areas flagged/);
    const cautions = summary.blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text).join(' ');
    expect(cautions).toMatch(/borrows from neighbours and so creates spatial correlation of its own/);
    const record = report.sheets.find((s) => s.role === 'record')!;
    expect(keyValue(record, 'Rate sids')).toMatch(/SID74 \/ BIR74 per 1000; modelled as the local smoothed rate/);
    expect(keyValue(record, 'Rule for flagging rates')).toMatch(/fewer than 20 events/);
    expect(keyValue(record, 'Flagged areas withheld in this workbook')).toBe('no');
  });
});

describe('local statistics of a smoothed rate carry the caution that smoothing induces spatial correlation', () => {
  const paragraphs = (sheet: ReportSheet) => sheet.blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text).join(' ');
  it('on Local patterns and in the Summary, for the outcome, its residuals and the rate by name; not for rate:NAME', async () => {
    for (const [of, y, x] of [['outcome', 'sids', 'NWBIR74'], ['residuals', 'sids', 'NWBIR74'], ['sids', 'NWBIR74', 'BIR74']]) {
      const report = buildReport(await run({ local: of, y, x }));
      const local = report.sheets.find((s) => s.role === 'local')!;
      expect(paragraphs(local), of).toMatch(/local empirical-Bayes rate of sids, which borrows strength from neighbours and so induces spatial correlation of its own.*overstate clustering/);
      expect(paragraphs(report.sheets.find((s) => s.role === 'overview')!), of).toMatch(/The local statistics \("Local patterns"\) are of .*overstate clustering/);
    }
    const global = buildReport(await run({ local: 'outcome', smoothing: 'global' })).sheets.find((s) => s.role === 'local')!;
    expect(paragraphs(global)).toMatch(/global empirical-Bayes rate of sids, which pulls each small area towards the overall rate/);
    const standardised = buildReport(await run({ local: 'rate:sids', y: 'NWBIR74', x: 'BIR74' })).sheets.find((s) => s.role === 'local')!;
    expect(paragraphs(standardised)).not.toMatch(/induces spatial correlation/);
  });
});

describe('withholding the flagged areas (privacy)', async () => {
  const result = await run({ withhold: true });
  const report = buildReport(result);
  const sheet = report.sheets.find((s) => s.role === 'rates')!;
  const flagged = result.rates![0].areas.map((a) => a.flagged);

  it('blanks the events, every rate and the weights of flagged areas, keeping the others', () => {
    const rows = table(sheet, /each area in table order/).rows;
    rows.forEach((row, i) => {
      if (flagged[i]) {
        expect([row[2], row[4], row[5], row[6], row[7], row[9], row[10]]).toEqual([null, null, null, null, null, null, null]);
        expect(row[8]).toBe('yes, withheld');
      } else {
        expect(row[2]).toBeGreaterThanOrEqual(20);
        relClose(row[5] as number, golden.ebGlobal[i] * 1000);
      }
    });
    expect(keyValue(sheet, 'Withheld in this workbook')).toMatch(/^yes: the events and rates of the 95 flagged areas are blank/);
    expect(sheet.images![0].alt).toMatch(/grey: withheld for privacy \(95\)/);
    expect(sheet.images![0].svg).not.toContain('url(#flaghatch)'); // every flagged area is grey, none hatched
  });

  it('blanks the outcome and residuals of those areas on the By area sheet and leaves them off the scatter plot', () => {
    const byArea = report.sheets.find((s) => s.role === 'areas')!;
    const rows = table(byArea, /Each area/).rows;
    rows.forEach((row, i) => {
      expect(row[2] === null).toBe(flagged[i]);
      expect(row[4] === null).toBe(flagged[i]);
      expect(row[3]).not.toBeNull(); // fitted values stay
    });
    const scatter = report.sheets[0].images!.find((im) => im.name === 'Moran scatter plot')!;
    expect(scatter.svg.match(/<circle/g)!.length).toBe(100 - 95);
    expect(scatter.alt).toMatch(/95 withheld area\(s\) not shown/);
  });

  it('blanks the local statistics of those areas too, counts them apart and maps them grey (withheld), not in a group colour', async () => {
    for (const of of ['outcome', 'rate:sids', 'residuals']) {
      const withLocal = await run({ withhold: true, local: of });
      const local = buildReport(withLocal).sheets.find((s) => s.role === 'local')!;
      const rows = table(local, /each area in table order/).rows;
      rows.forEach((row, i) => {
        if (flagged[i]) {
          expect(row.slice(2, 9), of).toEqual([null, null, null, null, null, null, null]);
          expect(row.slice(9), of).toEqual(['withheld for privacy', 'withheld for privacy', 'withheld for privacy']);
        } else {
          expect(typeof row[2], of).toBe('number');
        }
      });
      expect(keyValue(local, 'Withheld in this workbook'), of).toMatch(/^yes: the local figures of the 95 areas whose sids rests on few events are blank/);
      const groups = table(local, /How many areas fall in each group/).rows;
      expect(groups.find((r) => r[0] === 'withheld for privacy')![1]).toBe(95);
      expect(groups.reduce((t, r) => t + (r[1] as number), 0)).toBe(100);
      for (const image of local.images!) {
        expect(image.alt, of).toMatch(/withheld for privacy \(95\)/);
        expect(image.svg).toContain('#dcdcdc');
      }
    }
    // the areas' GeoJSON (--out-geojson, "Save areas with results") leaves the same figures blank
    const geo = resultsGeoJson(await run({ withhold: true, local: 'outcome' })).features as { properties: Record<string, unknown> }[];
    geo.forEach((f, i) => {
      expect(f.properties.sids === null, `area ${i}`).toBe(flagged[i]);
      expect(f.properties.plain_regression_residual === null).toBe(flagged[i]);
      expect(f.properties.local_moran === null).toBe(flagged[i]);
      if (flagged[i]) expect(f.properties.local_moran_group).toBe('withheld for privacy');
    });
    // without withholding nothing is blank
    const open = buildReport(await run({ local: 'outcome' })).sheets.find((s) => s.role === 'local')!;
    expect(table(open, /each area in table order/).rows.every((r) => typeof r[2] === 'number')).toBe(true);
    expect(keyValue(open, 'Withheld in this workbook')).toBeUndefined();
  });

  it('records what was withheld in the run record', () => {
    const record = report.sheets.find((s) => s.role === 'record')!;
    expect(keyValue(record, 'Flagged areas withheld in this workbook')).toMatch(/^yes/);
    const list = table(record, /Areas withheld for privacy/);
    expect(list.rows.map((r) => r[1])).toEqual(result.rates![0].areas.filter((a) => a.flagged).map((a) => a.id));
  });
});

describe('local statistics of a rate’s standardised values (--local-of rate:NAME)', async () => {
  const result = await run({ local: 'rate:sids', y: 'NWBIR74', x: 'BIR74', smoothing: 'global' });
  it('tests the empirical-Bayes standardised rates of the numpy reference', () => {
    const l = result.local!;
    expect(l.variable).toBe('sids, standardised by empirical Bayes');
    expect(l.of).toBe('rate:sids');
    // Anselin (1995), eq. 7, with the reference's standardised rates z and the run's row-standardised edges
    const v = golden.standardised as number[];
    const mean = v.reduce((a, b) => a + b, 0) / v.length;
    const z = v.map((x) => x - mean);
    const m2 = z.reduce((a, b) => a + b * b, 0) / z.length;
    const lag = new Array(z.length).fill(0);
    const { from, to, weight } = result.weights.edges;
    for (let e = 0; e < from.length; e++) lag[from[e]] += weight[e] * z[to[e]];
    l.results.moran!.value.forEach((x, i) => expect(Math.abs(x - (z[i] / m2) * lag[i])).toBeLessThan(1e-9));
  });
  it('refuses a rate that was not defined, naming the ones that were', async () => {
    await expect(run({ local: 'rate:deaths' })).rejects.toThrow(/no rate is called "deaths"; the rates defined are sids/);
  });
});
