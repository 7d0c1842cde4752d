// The report model, built from a hand-made result (test/helpers/fake-result.ts). Checks rest on
// identities (residual = observed − fitted, total = direct + indirect, row weights sum to 1), on
// node:crypto for SHA-256, on Excel's sheet-name rules (recalled from memory) and on the project's
// rules (our own evidence marks, the cautions on every sheet), named beside each check.
import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { buildReport, layoutBlocks, blockHeight, type Block, type Cell, type Report } from '../src/report/index.js';
import { FAKE_BOUNDARY_BYTES, FAKE_DATA_BYTES, fakeResult, spatialLag } from './helpers/fake-result.js';

function allBlocks(report: Report): Block[] {
  return report.sheets.flatMap((s) => s.blocks);
}
function allText(report: Report): string[] {
  const out: string[] = [];
  for (const b of allBlocks(report)) {
    if (b.kind === 'title' || b.kind === 'paragraph') out.push(b.text);
    if (b.kind === 'table') { out.push(b.title, ...b.columns.map((c) => c.header), b.note ?? ''); for (const r of b.rows) for (const c of r) if (typeof c === 'string') out.push(c); }
    if (b.kind === 'keyValues') { out.push(b.title); for (const r of b.rows) { out.push(r[0]); if (typeof r[1] === 'string') out.push(r[1]); } }
  }
  return out;
}
function table(report: Report, sheet: string, title: string): Extract<Block, { kind: 'table' }> {
  const b = report.sheets.find((s) => s.name === sheet)!.blocks.find((x) => x.kind === 'table' && x.title === title);
  if (!b || b.kind !== 'table') throw new Error(`no table ${title} on ${sheet}`);
  return b;
}

describe('buildReport', () => {
  const result = fakeResult();
  const report = buildReport(result);

  it('lays out the sheets in order with their roles', () => {
    expect(report.sheets.map((s) => [s.name, s.role])).toEqual([
      ['Summary', 'overview'], ['Plain regression', 'model'], ['Spatial lag model', 'model'], ['Spatial error model', 'model'],
      ['Checks on residuals', 'diagnostics'], ['Spillover effects', 'impacts'], ['By area', 'areas'], ['Neighbours', 'neighbours'],
      ['How this was made', 'record'],
    ]);
    // Excel's sheet-name rules (at most 31 characters, none of []:*?/\): recalled from memory of Microsoft's documentation
    for (const s of report.sheets) { expect(s.name.length).toBeLessThanOrEqual(31); expect(s.name).not.toMatch(/[[\]:*?/\\]/); }
  });

  it('uses our own marks, no star codes and no all-caps banners', () => {
    const texts = allText(report);
    expect(texts.some((t) => /\*/.test(t))).toBe(false);
    for (const b of allBlocks(report)) if (b.kind === 'title') expect(b.text).not.toMatch(/^[^a-z]{4,}$/);
    const coef = table(report, 'Plain regression', 'Coefficients');
    expect(coef.note).toContain('●');
    expect(coef.note).toContain('○');
  });

  it('keeps coefficient numbers as the same numbers', () => {
    const coef = table(report, 'Plain regression', 'Coefficients');
    result.ols.coefficients.forEach((c, i) => {
      expect(coef.rows[i].slice(0, 5)).toEqual([c.name, c.estimate, c.se, c.stat, c.p]);
    });
    const lag = table(report, 'Spatial lag model', 'Coefficients');
    const last = lag.rows[lag.rows.length - 1];
    expect(last.slice(1, 5)).toEqual([result.fits.lag!.parameter, result.fits.lag!.parameterSe, result.fits.lag!.parameterZ, result.fits.lag!.parameterP]);
  });

  it('keys the per-area sheet by ID in table order, residual = observed − fitted, lag = W·residual', () => {
    const t = report.sheets.find((s) => s.role === 'areas')!.blocks[0] as Extract<Block, { kind: 'table' }>;
    expect(t.rows.map((r) => r[0])).toEqual(result.ids);
    expect(t.rows.map((r) => r[1])).toEqual(result.rows);
    // identity: residual = observed − fitted; the lag of the residual is W e by definition of the spatial lag
    const wE = spatialLag(result.weights.edges, result.ols.residuals);
    t.rows.forEach((r, i) => {
      expect(r[2]).toBe(result.y[i]);
      expect((r[2] as number) - (r[3] as number)).toBeCloseTo(r[4] as number, 12);
      expect(r[5]).toBeCloseTo(wE[i], 12);
    });
    expect(t.columns).toHaveLength(3 + 3 * 3);
  });

  it('lists every neighbour link by ID with its weight', () => {
    const t = table(report, 'Neighbours', 'Every link');
    expect(t.rows).toHaveLength(result.weights.links);
    const e = result.weights.edges;
    t.rows.forEach((r, k) => expect(r).toEqual([result.ids[e.from[k]], result.ids[e.to[k]], e.weight[k]]));
    // row-standardised weights: each area's weights sum to 1 (definition of the transform)
    const sums = new Map<Cell, number>();
    for (const r of t.rows) sums.set(r[0], (sums.get(r[0]) ?? 0) + (r[2] as number));
    for (const s of sums.values()) expect(s).toBeCloseTo(1, 12);
  });

  it('records the inputs with their SHA-256, equal to node:crypto of the bytes', () => {
    const t = table(report, 'How this was made', 'Input files');
    const hash = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');
    expect(t.rows).toEqual([
      ['boundary', 'wards.geojson', FAKE_BOUNDARY_BYTES.length, hash(FAKE_BOUNDARY_BYTES)],
      ['data', 'wards.csv', FAKE_DATA_BYTES.length, hash(FAKE_DATA_BYTES)],
    ]);
    const settings = report.sheets.at(-1)!.blocks.find((b) => b.kind === 'keyValues' && b.title === 'Settings') as Extract<Block, { kind: 'keyValues' }>;
    const get = (k: string) => settings.rows.find((r) => r[0] === k)?.[1];
    expect(get('Random seed')).toBe(result.request.seed);
    expect(get('Log-determinant method')).toBe(result.algebra.logDeterminant);
    expect(get('Engine version')).toBe(result.engineVersion);
    expect(get('Made at')).toBe(result.createdAt);
    // the boundary file's own ID property is recorded only when it differs from the table's column
    expect(settings.rows.some((r) => r[0] === 'ID property in the boundary file')).toBe(false);
    const renamed = fakeResult();
    renamed.request.boundaryId = 'ward_code';
    const again = buildReport(renamed).sheets.at(-1)!.blocks.find((b) => b.kind === 'keyValues' && b.title === 'Settings') as Extract<Block, { kind: 'keyValues' }>;
    expect(again.rows.find((r) => r[0] === 'ID property in the boundary file')?.[1]).toBe('ward_code');
  });

  it('writes impacts with one careful sentence per regressor, total = direct + indirect', () => {
    const t = table(report, 'Spillover effects', 'Direct, indirect and total effects');
    for (const r of t.rows) expect((r[1] as number) + (r[4] as number)).toBeCloseTo(r[7] as number, 12);
    const paragraphs = report.sheets.find((s) => s.role === 'impacts')!.blocks.filter((b) => b.kind === 'paragraph' && b.style === 'interpretation');
    // one per regressor, then once for all of them: association, not cause
    expect(paragraphs).toHaveLength(3);
    expect(paragraphs[2]).toMatchObject({ text: expect.stringMatching(/not what a change would cause/) });
    const sentences = paragraphs.slice(0, 2);
    for (const s of sentences) {
      if (s.kind !== 'paragraph') continue;
      expect(s.text).toMatch(/^A one-unit rise in \w+ in one area goes with a change of .+ in that area's vacancy_rate .+ spread over the other areas .+ total of /);
      expect(s.text).not.toMatch(/\b(causes|leads to|results in|drives)\b/i);
    }
  });

  it('puts the question, comparison, tests, suggestion, cautions and an interpretation on the overview', () => {
    const o = report.sheets[0];
    const texts = allText({ sheets: [o] });
    expect(texts).toContain('vacancy_rate explained by median_rent, distance_km');
    const cmp = table(report, 'Summary', 'How the models compare');
    expect(cmp.rows.map((r) => r[0])).toEqual(['Plain regression', 'Spatial lag model', 'Spatial error model']);
    expect(cmp.rows[1].slice(1, 10)).toEqual([result.fits.lag!.logLik, result.fits.lag!.aic, result.fits.lag!.bic, result.fits.lag!.lr.stat, result.fits.lag!.lr.p,
      result.fits.lag!.parameter, result.fits.lag!.parameterSe, result.fits.lag!.parameterP, result.fits.lag!.pseudoR2]);
    const lm = table(report, 'Summary', 'Evidence of spatial dependence in the plain regression');
    expect(lm.rows.map((r) => r[1])).toEqual([result.ols.lm.error.stat, result.ols.lm.lag.stat, result.ols.lm.robustError.stat, result.ols.lm.robustLag.stat, result.ols.lm.joint.stat]);
    const joined = texts.join('\n');
    for (const w of [/not cause/, /ecological fallacy/, /how neighbours were defined/, /small areas|few people/, /know these places/]) expect(joined).toMatch(w);
    // the condition number 42.7 is above 30, the usual collinearity threshold (common practice)
    expect(joined).toMatch(/condition number 42\.7/);
    const interp = o.blocks.find((b) => b.kind === 'paragraph' && b.style === 'interpretation');
    expect(interp && interp.kind === 'paragraph' && interp.text).toContain(`Moran's I ${result.moranY.I.toPrecision(3)}`);
    expect(interp && interp.kind === 'paragraph' && interp.text).not.toMatch(/\b(causes|leads to|drives)\b/i);
  });

  it('reports convergence trouble and bound hits as warnings', () => {
    const r = fakeResult();
    r.fits.lag!.convergence = { converged: false, iterations: 200, tolerance: 0.01, message: 'iteration limit reached' };
    r.fits.error!.convergence = { converged: true, iterations: 30, tolerance: 1e-8, atBound: 'upper', message: 'converged' };
    const texts = allText(buildReport(r)).join('\n');
    expect(texts).toMatch(/spatial lag model did not converge: iteration limit reached/);
    expect(texts).toMatch(/spatial error model's spatial parameter ended at the upper end/);
  });

  it('leaves out the lag sheets and impacts when only the plain regression was fitted', () => {
    const r = fakeResult({ models: ['ols'] });
    const rep = buildReport(r);
    expect(rep.sheets.map((s) => s.name)).toEqual(['Summary', 'Plain regression', 'Checks on residuals', 'By area', 'Neighbours', 'How this was made']);
  });

  it('places pictures below the overview blocks without overlap; SVG only without a renderer', () => {
    const o = report.sheets[0];
    const { lastRow } = layoutBlocks(o.blocks);
    expect(o.images).toHaveLength(3);
    let below = lastRow + 1;
    for (const im of o.images!) {
      expect(im.anchor.row).toBeGreaterThan(below);
      expect(im.png.length).toBe(0);
      expect(im.svg.startsWith('<svg')).toBe(true);
      expect(im.alt.length).toBeGreaterThan(20);
      below = im.anchor.row + Math.ceil(im.heightPx / 20);
    }
    expect(blockHeight({ kind: 'table', title: 't', columns: [], rows: [[1], [2]], note: 'n' })).toBe(5);
  });

  it('shows robust coefficients, withoutNeighbours, left-out rows and a given title', () => {
    const r = fakeResult();
    r.ols.robustCoefficients = r.ols.coefficients.map((c) => ({ ...c, se: c.se * 1.2 }));
    r.weights.withoutNeighbours = ['W25'];
    r.weights.summary = { ...r.weights.summary, withoutNeighbours: ['W25'] };
    r.droppedRows = [{ row: 9, id: 'W99', columns: ['median_rent'] }];
    const rep = buildReport(r, { title: 'Vacancy in Lake Marrow' });
    expect(rep.sheets[0].blocks[0]).toEqual({ kind: 'title', text: 'Vacancy in Lake Marrow' });
    const robust = table(rep, 'Plain regression', 'Coefficients with standard errors robust to unequal variance');
    expect(robust.rows.map((x) => x[2])).toEqual(r.ols.robustCoefficients.map((c) => c.se));
    expect(table(rep, 'How this was made', 'Rows left out for missing values').rows).toEqual([[9, 'W99', 'median_rent']]);
    const joined = allText(rep).join('\n');
    expect(joined).toMatch(/1 area\(s\) have no neighbours under this definition: W25/);
    expect(joined).toMatch(/Areas without neighbours: W25\./);
  });
});
