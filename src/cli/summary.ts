import { categoryCounts, describeControl, LOCAL_CATEGORY_LABEL, LOCAL_STATISTIC_LABEL, type AnalysisResult, type ComparedFit, type WeightsComparison } from '../pipeline/index.js';
import type { LocalCategory } from '../stats/index.js';
import type { Coefficient } from '../models/types.js';
import { inSentence, MODELS, fittedInOrder, type Fitted, type ModelEntry } from '../models/index.js';
import { formatCount } from '../core/count.js';
import { familyReading } from '../report/index.js';

/** The readable summary printed by `spillway fit` without --json. Plain words, aligned columns. */
export function formatSummary(r: AnalysisResult): string {
  const lines: string[] = [];
  const w = r.weights;
  lines.push(`Spillway ${r.engineVersion}: ${r.request.y} explained by ${r.request.x.join(', ')} in ${formatCount(r.n)} areas`);
  lines.push(`Neighbours: ${w.description}.`);
  lines.push(`  ${formatCount(w.links)} links, ${fmt(w.summary.meanNeighbours, 3)} neighbours per area on average (fewest ${w.summary.minNeighbours}, most ${w.summary.maxNeighbours}); ` +
    `${w.withoutNeighbours.length ? `${formatCount(w.withoutNeighbours.length)} without neighbours` : 'every area has a neighbour'}; ${w.components} connected group${w.components === 1 ? '' : 's'}.`);
  if (r.droppedRows.length) lines.push(`  Left out for missing values: ${formatCount(r.droppedRows.length)} row(s).`);
  lines.push('');

  const o = r.ols;
  lines.push('Plain regression (least squares)');
  lines.push(...coefficientTable(o.coefficients, 't'));
  if (o.robustCoefficients) lines.push(...robustTable(o.robustCoefficients, 't'));
  // grouped as the workbook's sheet groups them: how well it fits, then the figures for comparing models
  lines.push(`  How well it fits: R² ${fmt(o.r2, 4)}, adjusted for the number of terms ${fmt(o.adjR2, 4)}; residual variance ${fmt(o.sigma2, 5)} (divided by n − k = ${o.n - o.k}); ` +
    `F ${fmt(o.f.stat, 4)} on ${o.f.df} and ${o.f.df2} degrees of freedom, p ${p(o.f.p)}`);
  lines.push(`  For comparing models: log-likelihood ${fmt(o.logLik, 6)}; AIC ${fmt(o.aic, 6)}; BIC ${fmt(o.bic, 6)}`);
  lines.push(`  Note: the maximum-likelihood residual variance (divided by n = ${o.n}) is ${fmt(o.sigma2ML, 5)}; it is the one inside the log-likelihood, AIC and BIC, and the one to set beside the spatial models' σ².`);
  lines.push(`  Residual checks: normality (Jarque–Bera) p ${p(o.jarqueBera.p)}; constant variance (Breusch–Pagan) p ${p(o.breuschPagan.p)}, studentised p ${p(o.breuschPaganStudentised.p)}; condition number ${fmt(o.conditionNumber, 4)}`);
  lines.push('');
  lines.push('Spatial pattern left in the residuals');
  lines.push(`  Moran's I ${fmt(o.moran.I, 4)} (expected ${fmt(o.moran.expected, 4)} without pattern), z ${fmt(o.moran.z, 4)}, p ${p(o.moran.p)}`);
  const lm = o.lm;
  lines.push(...table(['Lagrange-multiplier test', 'statistic', 'df', 'p'], [
    ['for a spatial error', fmt(lm.error.stat, 5), String(lm.error.df), p(lm.error.p)],
    ['for a spatial lag', fmt(lm.lag.stat, 5), String(lm.lag.df), p(lm.lag.p)],
    ['for error, robust to lag', fmt(lm.robustError.stat, 5), String(lm.robustError.df), p(lm.robustError.p)],
    ['for lag, robust to error', fmt(lm.robustLag.stat, 5), String(lm.robustLag.df), p(lm.robustLag.p)],
    ['for both together', fmt(lm.joint.stat, 5), String(lm.joint.df), p(lm.joint.p)],
  ]));
  lines.push(`  Guidance: ${o.recommendation.text}`);
  if (!o.recommendation.fitted) lines.push(`  To fit ${o.recommendation.notFitted.length === 2 ? 'them' : 'it'}: run again with --models ${modelsWith(r.request.models, o.recommendation.notFitted)}`);
  lines.push('');
  for (const { entry, fit } of fittedInOrder(r.fits)) {
    if (entry.baseline) continue;
    lines.push(...modelBlock(entry, fit), '');
    if (fit.impacts) {
      lines.push(`Spillover effects of the ${inSentence(entry.label)} (${fit.impacts.draws > 0 ? `standard errors from ${fit.impacts.draws} simulated draws, seed ${fit.impacts.seed}` : fit.impacts.method})`);
      lines.push(...table(['term', 'in the area itself', 'SE', 'in the other areas', 'SE', 'total', 'SE'],
        fit.impacts.impacts.map((i) => [i.name, fmt(i.direct, 5), fmt(i.directSe, 3), fmt(i.indirect, 5), fmt(i.indirectSe, 3), fmt(i.total, 5), fmt(i.totalSe, 3)])));
      lines.push('');
    }
  }
  // the wider family: the reading of the tests between the models, as on the Summary sheet
  if (fittedInOrder(r.fits).some(({ entry }) => entry.onRequest)) {
    lines.push('Which model: guidance from the tests between them', ...wrap(familyReading(r), 100).map((l) => `  ${l}`), '');
  }
  if (r.comparison) {
    lines.push('The same question under other neighbour definitions');
    // one column per spatial parameter of each model fitted, headed by the model as --models spells it
    const fitted = MODELS.filter((m) => !m.baseline && (r.request.models as readonly string[]).includes(m.key));
    const columns = fitted.flatMap((m) => m.parameters.map((q) => ({
      head: `${q.symbol} ${m.cli}`,
      pick: (c: WeightsComparison) => (c.fits as Record<string, ComparedFit | undefined>)[m.key]?.parameters.find((x) => x.key === q.key)?.estimate,
    })));
    // as on the sheets: a definition that links the same neighbours as an earlier one is named once, not given a row of repeated figures
    lines.push(...table(['definition', "Moran's I p", 'suggested', ...columns.map((c) => c.head)],
      r.comparison.filter((c) => !c.sameAs).map((c) => [
        `${c.label}${c.asRun ? ' (this run)' : ''}`,
        c.failed ? 'could not be built' : p(c.moran.p),
        c.suggestion ? SUGGESTION[c.suggestion] : '',
        ...columns.map((col) => { const v = col.pick(c); return v === undefined ? '' : fmt(v, 4); }),
      ])));
    for (const c of r.comparison) {
      if (c.sameAs) lines.push(`  "${c.label}" links exactly the same neighbours as "${c.sameAs}" on these areas, so it gives the same figures; its row is not repeated.`);
      else if (c.failed) lines.push(`  ${c.label}: ${c.failed}`);
    }
    lines.push('');
  }
  if (r.local) lines.push(...localBlock(r), '');
  for (const rate of r.rates ?? []) {
    const flagged = rate.areas.filter((x) => x.flagged).length;
    const mp = (m: typeof rate.ebMoran) => p(m.permutationP ?? m.p);
    lines.push(`Rate ${rate.name} = ${rate.events} / ${rate.population} per ${rate.per}; modelled where used as the ${rate.smoothing} smoothed rate`);
    lines.push(`  ${formatCount(flagged)} of ${formatCount(rate.areas.length)} areas flagged for few events${rate.withholdFlagged ? ' (withheld in the workbook)' : ''}; overall rate ${fmt(rate.overall.rate, 4)}`);
    lines.push(`  Moran's I of the raw rate ${fmt(rate.moranRaw.I, 4)} (p ${mp(rate.moranRaw)}); rate-adjusted (Assunção & Reis) ${fmt(rate.ebMoran.I, 4)} (p ${mp(rate.ebMoran)})`, '');
  }
  lines.push(`Log-determinant: ${r.algebra.logDeterminant}${r.algebra.accuracy === 'exact' ? '' : ` (${r.algebra.accuracy})`}; admissible range ${fmt(r.algebra.range.lower, 5)} to ${fmt(r.algebra.range.upper, 5)}.`);
  if (r.warnings.length) {
    lines.push('', 'Warnings');
    for (const wn of r.warnings) lines.push(`  - ${wn}`);
  }
  lines.push('', CAUTION);
  return lines.join('\n');
}

const SUGGESTION = { lag: 'spatial lag', error: 'spatial error', ols: 'no spatial model', either: 'either spatial model' } as const;

export const CAUTION =
  'Read with care: these are associations between areas, not proof of cause; what holds for areas need not hold for the ' +
  'people in them; a different neighbour definition can change the answers; rates for areas with few people are unstable. ' +
  'Check the results with people who know the places.';

/** One model's block: its spatial parameters, coefficients, fit figures, test against the plain regression and search. */
function modelBlock(entry: ModelEntry, f: Fitted): string[] {
  const h = entry.headline(f);
  const out = [`${entry.label} (${entry.method}): ${entry.about}`];
  for (const q of h.parameters) out.push(`  ${q.symbol} (${q.name}) ${fmt(q.estimate, 6)}, SE ${fmt(q.se, 4)}, z ${fmt(q.z, 4)}, p ${p(q.p)}`);
  const stat = entry.leastSquares ? 't' : 'z';
  out.push(...coefficientTable(f.coefficients, stat));
  const robust = (f as { robustCoefficients?: Coefficient[] }).robustCoefficients;
  if (robust) out.push(...robustTable(robust, stat));
  else {
    // the estimators by instruments and moments: which standard errors the table carries
    const shown = (f as { covarianceKind?: string }).covarianceKind;
    if (shown) out.push(`  Standard errors shown: ${shown === 'classical' ? 'classical (equal variance assumed; --robust gives ones robust to unequal variance)' : shown}`);
  }
  const figures = h.logLik === undefined ? [] : [`log-likelihood ${fmt(h.logLik, 6)}`, `AIC ${fmt(h.aic!, 6)}`, `BIC ${fmt(h.bic!, 6)}`];
  out.push(`  ${[...figures, `σ² ${fmt(h.sigma2, 5)}`, `squared correlation of observed and fitted ${fmt(h.r2, 4)}`].join('; ')}`);
  if (h.lr) out.push(`  Likelihood-ratio test against the plain regression: ${fmt(h.lr.stat, 5)} (df ${h.lr.df}), p ${p(h.lr.p)}`);
  // a nested test against the plain regression is the line above when it tests the same restriction (the neighbours' columns model's θ = 0)
  for (const t of (f.nestedTests ?? []).filter((t) => !(h.lr && t.against === 'ols' && t.df === h.lr.df && t.stat === h.lr.stat))) {
    out.push(`  Likelihood-ratio test of ${t.restriction} (the ${modelLabel(t.against)}): ${fmt(t.stat, 5)} (df ${t.df}), p ${p(t.p)}`);
  }
  for (const t of (f as { wald?: { against: string; restriction: string; stat: number; df: number; p: number }[] }).wald ?? []) {
    out.push(`  Wald test of ${t.restriction} (the ${modelLabel(t.against)}): ${fmt(t.stat, 5)} (df ${t.df}), p ${p(t.p)}`);
  }
  const remaining = (f as { lmRemainingError?: { stat: number; p: number } }).lmRemainingError;
  if (remaining) out.push(`  Spatial error pattern left after the lag: Lagrange multiplier ${fmt(remaining.stat, 4)}, p ${p(remaining.p)}`);
  if (h.convergence) out.push(`  Search: ${h.convergence.message}`);
  return out;
}

function modelLabel(key: string): string {
  return inSentence((MODELS as readonly ModelEntry[]).find((m) => m.key === key)?.label ?? key);
}

function coefficientTable(cs: Coefficient[], stat: 't' | 'z'): string[] {
  return table(['term', 'estimate', 'SE', stat, 'p'], cs.map((c) => [c.name, fmt(c.estimate, 6), fmt(c.se, 5), fmt(c.stat, 4), p(c.p)]));
}

/** The --robust table beside the classical one (plain regression, neighbours' columns model), said to be so. */
function robustTable(cs: Coefficient[], stat: 't' | 'z'): string[] {
  return ['  The same with standard errors robust to unequal variance (White 1980, HC0; --robust):', ...coefficientTable(cs, stat)];
}

/** Words in lines of at most `width` characters (a longer word keeps its own line). */
function wrap(text: string, width: number): string[] {
  const out: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/)) {
    if (line && line.length + 1 + word.length > width) { out.push(line); line = word; } else line = line ? `${line} ${word}` : word;
  }
  if (line) out.push(line);
  return out;
}

function table(head: string[], rows: string[][]): string[] {
  const widths = head.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: string[]) => '  ' + cells.map((c, j) => (j === 0 ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ');
  return [line(head), ...rows.map(line)];
}

/** What the summary prints for a figure that is not a number (NaN, a test that could not be computed): never "NaN". */
export const NOT_GIVEN = 'not given';

function fmt(v: number, digits: number): string {
  if (!Number.isFinite(v)) return NOT_GIVEN;
  if (v !== 0 && (Math.abs(v) >= 1e7 || Math.abs(v) < 1e-4)) return v.toExponential(digits - 1).replace('-', '−');
  return Number(v.toPrecision(digits)).toString().replace('-', '−');
}

function p(v: number): string {
  if (!Number.isFinite(v)) return NOT_GIVEN;
  return v < 0.0001 ? '< 0.0001' : v.toFixed(4);
}

function localBlock(r: AnalysisResult): string[] {
  const l = r.local!;
  const out = [`Where the pattern is: local statistics of ${l.variable} (${l.permutations ? `${formatCount(l.permutations)} permutations, seed ${l.seed}` : 'analytic p-values'}; ${describeControl(l.control)})`];
  for (const [kind, s] of Object.entries(l.results)) {
    const significant = s.significant.filter(Boolean).length;
    const uncontrolled = s.significantUncontrolled.filter(Boolean).length;
    // the other control at the same level, for comparison (fdr beside bonferroni and back; both when none was chosen)
    const others = (['fdr', 'bonferroni'] as const).filter((m) => m !== l.control.method)
      .map((m) => `${formatCount(s.significantUnder[m].filter(Boolean).length)} under ${m === 'fdr' ? 'the false discovery rate' : 'Bonferroni'}`);
    let line = `  ${LOCAL_STATISTIC_LABEL[kind as keyof typeof LOCAL_STATISTIC_LABEL]}: ${formatCount(significant)} of ${formatCount(s.tests)} areas significant after control (${others.join(', ')}; ${formatCount(uncontrolled)} without control)`;
    if (s.categories) {
      const counts = categoryCounts(s.categories);
      const parts = (['high-high', 'low-low', 'high-low', 'low-high'] as LocalCategory[]).map((c) => `${counts[c]} ${LOCAL_CATEGORY_LABEL[c]}`);
      line += `: ${parts.join(', ')}`;
    }
    out.push(line);
  }
  return out;
}

/** The --models value that adds the missing models (registry keys) to the ones this run fitted, in registry order. */
export function modelsWith(fitted: readonly string[], add: readonly string[]): string {
  return MODELS.filter((m) => m.baseline || fitted.includes(m.key) || add.includes(m.key)).map((m) => m.cli).join(',');
}
