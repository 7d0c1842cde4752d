// A sheet says each thing once: no sentence of its prose (paragraphs, table notes, the text values of
// key–value blocks) is printed twice on the same sheet, for the demo run (every sheet the districts
// sample makes: local statistics, rates, other neighbour definitions) and for every model of the
// registry on the Columbus data (Anselin 1988), whose sheets all print at a readable size. Also how a duration reads in the run record, and that
// the command line's summary says "not given" where a figure is not a number, never NaN.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runAnalysis } from '../src/pipeline/index.js';
import { buildReport, planSheet, type Report } from '../src/report/index.js';
import { MIN_PRINT_SCALE } from '../src/report/layout.js';
import { MODEL_KEYS } from '../src/models/index.js';
import { sayDuration } from '../src/report/record.js';
import { formatSummary, NOT_GIVEN } from '../src/cli/summary.js';
import { ROOT } from './helpers/cli.js';

const sample = (name: string) => ({ name, bytes: new Uint8Array(readFileSync(join(ROOT, 'sample-workbooks', name))) });
const columbus = ['columbus.shp', 'columbus.dbf', 'columbus.shx'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(join(ROOT, 'test/fixtures/columbus', name))) }));

/** Sentences of the sheet's prose, split where one ends ("." "?" "!" then a space and a capital). */
function sentences(report: Report): Map<string, string[]> {
  const bySheet = new Map<string, string[]>();
  for (const sheet of report.sheets) {
    const texts: string[] = [];
    for (const b of sheet.blocks) {
      if (b.kind === 'paragraph') texts.push(b.text);
      if (b.kind === 'table' && b.note) texts.push(b.note);
      if (b.kind === 'keyValues') for (const [, v] of b.rows) if (typeof v === 'string') texts.push(v);
    }
    // a sentence of four words or fewer ("Not available.") may well repeat
    bySheet.set(sheet.name, texts.flatMap((t) => t.split(/(?<=[.?!])\s+(?=[A-Z])/)).map((s) => s.trim()).filter((s) => s.split(/\s+/).length > 4));
  }
  return bySheet;
}

function repeats(report: Report): string[] {
  const found: string[] = [];
  for (const [name, list] of sentences(report)) {
    const seen = new Set<string>();
    for (const s of list) { if (seen.has(s)) found.push(`${name}: ${s}`); seen.add(s); }
  }
  return found;
}

describe('no sheet says the same sentence twice', () => {
  it('the districts demo: every sheet it makes', async () => {
    const r = await runAnalysis({
      boundary: [sample('vell-basin-districts.geojson')], data: sample('vell-basin.xlsx'), sheet: 'Districts', id: 'district_id', label: 'district_name',
      y: 'long_commute_pct', x: ['broadband_pct', 'rail_km', 'rent_index'], weights: { method: 'queen' }, transform: 'row', models: ['ols', 'lag', 'error'],
      compareWeights: 'suggested', local: { statistics: ['moran', 'gistar'], of: 'clinic_wait_days', permutations: 99 }, impactDraws: 100, permutations: 99,
      rates: { recipes: [{ name: 'falls_per_1000', events: 'fall_admissions', population: 'residents_70plus', per: 1000 }], smoothing: 'local' },
    });
    const report = buildReport(r);
    expect(report.sheets.map((s) => s.role)).toEqual(expect.arrayContaining(['overview', 'impacts', 'local', 'rates', 'comparison', 'record']));
    expect(repeats(report)).toEqual([]);
  });

  it('every model of the registry on the Columbus data', async () => {
    const r = await runAnalysis({
      boundary: columbus, coordinates: 'projected', id: 'POLYID', y: 'CRIME', x: ['INC', 'HOVAL'], weights: { method: 'queen' }, transform: 'row',
      models: [...MODEL_KEYS], permutations: 99, impactDraws: 100,
    });
    const report = buildReport(r);
    expect(repeats(report)).toEqual([]);
    // no sheet prints below about 7 pt type (11 pt at the scale MIN_PRINT_SCALE): the By area table of
    // every model goes on across two pages wide, its ID, row and observed columns repeated on each
    for (const sheet of report.sheets) expect(planSheet(sheet).page.scale, sheet.name).toBeGreaterThanOrEqual(MIN_PRINT_SCALE);
    const byArea = planSheet(report.sheets.find((x) => x.role === 'areas')!).page;
    expect(byArea.fitToPagesWide).toBeGreaterThanOrEqual(2);
    expect(byArea.titleColumns).toEqual({ first: 1, last: 3 });
    // the command line's summary of the same run, and of one where figures could not be computed, never prints NaN
    expect(formatSummary(r)).not.toMatch(/NaN|Infinity/);
    const broken = structuredClone(r);
    broken.ols.moran.p = NaN;
    broken.ols.lm.error.stat = NaN;
    broken.ols.r2 = NaN;
    const text = formatSummary(broken);
    expect(text).not.toMatch(/NaN/);
    expect(text).toContain(`Moran's I ${formatNumberLike(r.ols.moran.I)}`);
    expect(text).toMatch(/p not given/);
    expect(text).toContain(`R² ${NOT_GIVEN}`);
  });
});

/** The summary's own rounding of Moran's I (four significant digits). */
function formatNumberLike(v: number): string {
  return Number(v.toPrecision(4)).toString().replace('-', '−');
}

describe('the run record reads in words', () => {
  it('a duration is said in milliseconds, seconds or minutes, never as a raw fraction of a second', () => {
    expect(sayDuration(7.1596e-5)).toBe('under a millisecond');
    expect(sayDuration(0.0539)).toBe('54 milliseconds');
    expect(sayDuration(1.23)).toBe('1.2 seconds');
    expect(sayDuration(12.6)).toBe('13 seconds');
    expect(sayDuration(125)).toBe('2 minutes 5 seconds');
    expect(sayDuration(NaN)).toBe('not measured');
  });
});
