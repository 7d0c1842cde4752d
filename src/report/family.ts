/**
 * The wider family of models in the report: each model's own sheet, its effects, and on the Summary
 * the family side by side with the tests between them and a reading that follows the published
 * sequence for choosing among them.
 */
import type { AnalysisResult } from '../pipeline/types.js';
import type { Coefficient, TestResult } from '../models/types.js';
import { inSentence, fittedInOrder, modelEntry, type Fitted, type ModelEntry } from '../models/index.js';
import type { Block, Cell, NumberFormat } from './types.js';
import { CAUSE_NOTE, effectColumns } from './impacts.js';
import { MARK_NOTE, SOME_LEVEL, num, say, sayList, sayP, yesNo } from './format.js';
import { testRow } from './test-rows.js';
import { coefficientTable, parameterRow } from './model-tables.js';
import { capital } from '../core/words.js';

/** A test between two models as the family tables show it. */
interface Between extends TestResult {
  general: ModelEntry;
  restricted: ModelEntry;
  restriction: string;
  kind: 'likelihood ratio' | 'Wald';
}

/** The terms of the wider family are longer ("neighbours' average of …"): a wider first column. */
const TERM_WIDTH = 34;

/** What some models carry beyond the headline: read without knowing each fit's type. */
type Extras = Partial<{
  covarianceKind: string;
  instruments: string[];
  firstStage: TestResult & { df2: number };
  wald: (TestResult & { against: string; restriction: string })[];
  evaluations: number;
  evaluationsOf: string;
  traceMethod: string;
  logDeterminantMethod: string;
  lambdaInitial: number;
  criterion: number;
  robustCoefficients: Coefficient[];
}>;

/** A family model's own sheet: coefficients with its spatial parameters, fit, tests against the models it nests, how it was estimated. */
export function familySheet(result: AnalysisResult, fit: Fitted, entry: ModelEntry): Block[] {
  const h = entry.headline(fit);
  const extra = fit as unknown as Extras;
  const statName = entry.leastSquares ? 't-value' : 'z-value';
  const lagged = fit.coefficients.some((c) => c.lagged);
  const blocks: Block[] = [
    { kind: 'title', text: `${entry.label}: ${result.request.y} by ${entry.method}` },
    // the model in plain words (its one-line `about`, which the sidebar and command line show, would say part of it twice)
    { kind: 'paragraph', style: 'note', text: modelInWords(entry.key) || `${capital(entry.about)}.` },
    coefficientTable(
      extra.covarianceKind && extra.covarianceKind !== 'classical' && !extra.robustCoefficients ? `Coefficients with standard errors ${extra.covarianceKind}` : 'Coefficients',
      statName, fit.coefficients, h.parameters.map(parameterRow),
      { termWidth: TERM_WIDTH, note: `${lagged ? 'A “neighbours’ average of” term is that column averaged over each area’s neighbours under the weights used. ' : ''}${MARK_NOTE}` },
    ),
  ];
  if (extra.robustCoefficients) {
    blocks.push(coefficientTable('Coefficients with standard errors robust to unequal variance', statName, extra.robustCoefficients, [], { termWidth: TERM_WIDTH }));
  }
  // grouped as the other models' sheets are: how well it fits, for comparing models, how it was found
  const fits: [string, Cell, NumberFormat?][] = [
    ['Areas', result.n, 'integer'],
    [entry.leastSquares ? 'R²' : 'Pseudo R²: squared correlation of observed and fitted', num(h.r2), 'decimal4'],
    [entry.leastSquares ? 'Residual variance (divided by n − k)' : 'Residual variance (divided by n)', num(h.sigma2), 'decimal4'],
  ];
  const comparing: [string, Cell, NumberFormat?][] = [];
  if (h.logLik !== undefined) {
    comparing.push(['Log-likelihood', num(h.logLik), 'decimal4'], ['AIC', num(h.aic), 'decimal4'], ['Bayesian information criterion (BIC)', num(h.bic), 'decimal4']);
  } else {
    comparing.push(['Log-likelihood, AIC, BIC', `not defined: the model is estimated by ${entry.method}, not by maximum likelihood`, 'text']);
  }
  if (h.lr) comparing.push(['Likelihood ratio against the plain regression', num(h.lr.stat), 'decimal4'], ['Its degrees of freedom', h.lr.df, 'integer'], ['Its p-value', num(h.lr.p), 'pvalue']);
  const found: [string, Cell, NumberFormat?][] = [];
  if (h.range) found.push(['Lowest admissible spatial parameter', num(h.range.lower), 'decimal4'], ['Highest admissible spatial parameter', num(h.range.upper), 'decimal4']);
  if (extra.logDeterminantMethod) found.push(['Log-determinant method', extra.logDeterminantMethod, 'text']);
  if (extra.traceMethod) found.push(['Traces for the standard errors', extra.traceMethod, 'text']);
  if (h.convergence) {
    found.push(['Search converged', yesNo(h.convergence.converged), 'text']);
    if (extra.evaluations !== undefined) found.push([`Evaluations of the ${extra.evaluationsOf ?? 'likelihood'} used`, extra.evaluations, 'integer']);
    found.push(['Search note', h.convergence.atBound ? `${h.convergence.message} (ended at the ${h.convergence.atBound} bound)` : h.convergence.message, 'text']);
  }
  if (extra.instruments) found.push(['Instruments', extra.instruments.join('; '), 'text']);
  if (extra.firstStage) {
    found.push(['Instrument strength: first-stage F of the neighbours’ averages', num(extra.firstStage.stat), 'decimal4'],
      ['Its degrees of freedom', `${extra.firstStage.df} and ${extra.firstStage.df2}`, 'text'], ['Its p-value', num(extra.firstStage.p), 'pvalue']);
  }
  if (extra.lambdaInitial !== undefined) found.push(['λ from the first, unweighted moments step', num(extra.lambdaInitial), 'decimal4']);
  if (extra.criterion !== undefined) found.push(['Weighted moment criterion at the estimate', num(extra.criterion), 'scientific']);
  blocks.push({ kind: 'keyValues', title: 'How well it fits', rows: fits }, { kind: 'keyValues', title: 'For comparing models', rows: comparing });
  if (found.length) blocks.push({ kind: 'keyValues', title: 'How the estimate was found', rows: found });
  const tests = testsOf(result, entry, fit);
  if (tests.length) {
    blocks.push({
      kind: 'table', title: `Tests of the ${inSentence(entry.label)} against the models it contains`,
      columns: [
        { header: 'Simpler model', format: 'text', width: 30 },
        { header: 'Restriction', format: 'text', width: 26 },
        { header: 'Test', format: 'text', width: 18 },
        { header: 'Statistic', format: 'decimal4', width: 12 },
        { header: 'Degrees of freedom', format: 'integer', width: 10 },
        { header: 'p-value', format: 'pvalue', width: 11 },
      ],
      rows: tests.map((t): Cell[] => [t.restricted.label, t.restriction, t.kind, num(t.stat), t.df, num(t.p)]),
      note: 'A small p-value says the restriction does not hold: the simpler model leaves out something the data show. A large one says the simpler model describes the data about as well.',
    });
  }
  return blocks;
}

/** The likelihood-ratio tests the run added to this model, and its Wald tests. */
function testsOf(result: AnalysisResult, entry: ModelEntry, fit: Fitted): Between[] {
  const out: Between[] = [];
  for (const t of fit.nestedTests ?? []) {
    const restricted = modelEntry(t.against);
    if (restricted) out.push({ general: entry, restricted, restriction: t.restriction, kind: 'likelihood ratio', stat: t.stat, df: t.df, p: t.p });
  }
  for (const t of (fit as unknown as Extras).wald ?? []) {
    const restricted = modelEntry(t.against);
    if (restricted) out.push({ general: entry, restricted, restriction: t.restriction, kind: 'Wald', stat: t.stat, df: t.df, p: t.p });
  }
  return out;
}

/** The model in a sentence or two of plain words. */
function modelInWords(key: string): string {
  switch (key) {
    case 'slx': return 'An area’s outcome is explained by its own columns and by its neighbours’ averages of them; there is no feedback through the neighbours’ outcomes, so a change reaches only the neighbours named by the weights.';
    case 'durbin': return 'An area’s outcome moves with its neighbours’ outcome (ρ) and with its neighbours’ averages of the explanatory columns; a change spreads through the whole map, fading with each step.';
    case 'durbinError': return 'The neighbours’ averages of the explanatory columns enter directly, and the unexplained part is shared between neighbours (λ); a change reaches only the neighbours named by the weights.';
    case 'lagError': return 'The outcome moves with the neighbours’ outcome (ρ) and the unexplained part is shared between neighbours as well (λ). The two can be hard to tell apart: look at their standard errors.';
    case 'lagIV': return 'The spatial lag model estimated by two-stage least squares, with the neighbours’ averages of the explanatory columns (and their averages again) standing in for the neighbours’ outcome. It needs no assumption of normal errors.';
    case 'errorGM': return 'The spatial error model estimated from moment conditions that stay valid when the spread of the unexplained part differs between areas; its standard errors allow for that.';
    default: return '';
  }
}

/** Breusch–Pagan and, for the Durbin model, the remaining error dependence. */
export function familyChecks(fit: Fitted): Cell[][] {
  const f = fit as Fitted & { breuschPagan?: TestResult; lmRemainingError?: TestResult };
  const rows: Cell[][] = [];
  if (f.breuschPagan) rows.push(testRow('Breusch–Pagan test of constant variance', f.breuschPagan, 'Does the spread of the residuals change with the explanatory columns?'));
  if (f.lmRemainingError && Number.isFinite(f.lmRemainingError.stat)) rows.push(testRow('Lagrange multiplier: remaining error dependence', f.lmRemainingError, 'Is error dependence left over after the model’s spatial terms?'));
  return rows;
}

/** A family model's part of the spillover sheet. */
export function familyImpacts(result: AnalysisResult, fit: Fitted, entry: ModelEntry): Block[] {
  const im = fit.impacts;
  if (!im) return [];
  const y = result.request.y;
  const how: Record<string, string> = {
    slx: `In the ${inSentence(entry.label)} a change in one area's column moves that area's ${y} by its own coefficient (direct) and its neighbours' ${y} by the coefficient of the neighbours' average (indirect), with no further spread.`,
    durbin: `In the ${inSentence(entry.label)} a change in one area's column moves its own ${y}, its neighbours' through their averages of the column, and then every area through the neighbour links. The figures are averaged over the areas (direct: in the area itself; indirect: all other areas together).`,
    durbinError: `In the ${inSentence(entry.label)} a change in one area's column moves that area's ${y} by its own coefficient (direct) and its neighbours' ${y} by the coefficient of the neighbours' average (indirect); the shared errors (λ) spread no effect.`,
    lagError: `As in the lag model, a change in one area reaches the other areas through the neighbour links (ρ); the shared errors (λ) spread no effect, so the effects come from ρ and the coefficients of this model.`,
    lagIV: `As in the lag model, a change in one area reaches the other areas through the neighbour links; the figures use the estimates by instruments.`,
  };
  return [
    { kind: 'title', text: `Spillover effects in the ${inSentence(entry.label)}` },
    { kind: 'paragraph', style: 'note', text: how[entry.key] ?? `Direct, indirect and total effects of the ${inSentence(entry.label)}, averaged over the areas.` },
    {
      kind: 'table', title: `Direct, indirect and total effects: ${inSentence(entry.label)}`,
      columns: [
        { header: 'Explanatory column', format: 'text', width: 16 },
        ...effectColumns('In the area itself (direct)'), ...effectColumns('Spread over other areas (indirect)'), ...effectColumns('Total'),
      ],
      rows: im.impacts.map((m): Cell[] => [m.name, num(m.direct), num(m.directSe), num(m.directP), num(m.indirect), num(m.indirectSe), num(m.indirectP), num(m.total), num(m.totalSe), num(m.totalP)]),
      note: `How the standard errors and p-values were found: ${im.method}.`,
    },
    ...im.impacts.map((m): Block => ({
      kind: 'paragraph', style: 'interpretation',
      text: `In the ${inSentence(entry.label)}, a one-unit rise in ${m.name} in one area goes with a change of ${say(m.direct)} in that area's ${y} (${sayP(m.directP)}) and ${say(m.indirect)} spread over the other areas (${sayP(m.indirectP)}), a total of ${say(m.total)} (${sayP(m.totalP)}).`,
    })),
    ...(im.impacts.length ? [{ kind: 'paragraph', style: 'interpretation', text: CAUSE_NOTE } as Block] : []),
  ];
}

/** Every test between fitted models (likelihood ratios the run added, Wald tests of IV and GMM fits), general model first. */
export function testsBetweenModels(result: AnalysisResult): Between[] {
  return fittedInOrder(result.fits).flatMap(({ entry, fit }) => testsOf(result, entry, fit));
}

/**
 * The Summary's part for the wider family, when any of it was fitted: the tests between models side
 * by side, and a reading of them that follows the published sequence.
 */
export function familySummaryBlocks(result: AnalysisResult): Block[] {
  const fitted = fittedInOrder(result.fits);
  if (!fitted.some(({ entry }) => entry.onRequest)) return [];
  const tests = testsBetweenModels(result);
  const blocks: Block[] = [];
  if (tests.length) {
    blocks.push({
      kind: 'table', title: 'Tests between the models',
      columns: [
        { header: 'Wider model', format: 'text', width: 26 },
        { header: 'Simpler model', format: 'text', width: 26 },
        { header: 'Restriction', format: 'text', width: 26 },
        { header: 'Test', format: 'text', width: 18 },
        { header: 'Statistic', format: 'decimal4', width: 12 },
        { header: 'Degrees of freedom', format: 'integer', width: 10 },
        { header: 'p-value', format: 'pvalue', width: 11 },
      ],
      rows: tests.map((t): Cell[] => [t.general.label, t.restricted.label, t.restriction, t.kind, num(t.stat), t.df, num(t.p)]),
      note: 'Each row asks whether the simpler model, which is the wider one with the restriction imposed, describes the data as well. θ are the coefficients of the neighbours’ averages of the columns; θ = −ρβ is the common-factor restriction that turns the spatial Durbin model into the error model. Likelihood ratios compare maximum-likelihood fits; Wald tests stand in for models estimated by instruments or moments.',
    });
  }
  blocks.push({ kind: 'paragraph', style: 'interpretation', text: familyReading(result) });
  return blocks;
}

/**
 * Guidance on the choice among the family from the tests, following Elhorst (2010, "Applied spatial
 * econometrics: raising the bar", Spatial Economic Analysis 5(1), §4; recalled from memory): first
 * from specific to general — the Lagrange-multiplier tests on the plain regression (the suggestion
 * on this sheet) — then from general to specific: fit the spatial Durbin model and test θ = 0
 * (does it reduce to the lag model?) and θ = −ρβ (to the error model?) by likelihood ratio.
 *  - both rejected: the Durbin model;
 *  - θ = 0 not rejected and the LM tests point to the lag model: the lag model;
 *  - θ = −ρβ not rejected and the LM tests point to the error model: the error model;
 *  - otherwise (the two steps disagree): the Durbin model, which contains both.
 * Where the LM tests do not separate the lag and error models (both plain tests significant, neither
 * robust one), the restrictions alone speak: the one that holds names the simpler model, and when
 * both hold both simpler models are reported beside the Durbin model (our reading of the sequence).
 * The neighbours' columns model against the plain regression (Halleck Vega & Elhorst 2015) and the
 * lag-and-error model against the lag and error models are read beside it. Guidance, at 5% (common
 * practice), never a verdict.
 */
export function familyReading(result: AnalysisResult): string {
  const fits = result.fits as Record<string, Fitted | undefined>;
  const choice = result.ols.recommendation.choice;
  const parts: string[] = [];
  const sig = (t: TestResult | undefined) => t !== undefined && t.p < SOME_LEVEL;
  const nested = (key: string, against: string) => fits[key]?.nestedTests?.find((t) => t.against === against);
  const phrase = (t: TestResult) => `likelihood ratio ${say(t.stat)} on ${t.df} degree${t.df === 1 ? '' : 's'} of freedom, ${sayP(t.p)}`;
  parts.push('How to choose among the models, following Elhorst (2010): from specific to general with the Lagrange-multiplier tests on the plain regression, then from general to specific with the spatial Durbin model, which contains the lag and the error models.');
  const toLag = nested('durbin', 'lag');
  const toError = nested('durbin', 'error');
  const lmPoints = choice === 'lag' ? 'point to the lag model' : choice === 'error' ? 'point to the error model' : choice === 'either' ? 'do not separate the lag model from the error model' : 'find no spatial dependence';
  if (toLag && toError) {
    parts.push(`Against the spatial Durbin model, leaving out the neighbours' columns (θ = 0, the lag model) ${sig(toLag) ? 'is rejected' : 'is not rejected'} (${phrase(toLag)}), and the common-factor restriction (θ = −ρβ, the error model) ${sig(toError) ? 'is rejected' : 'is not rejected'} (${phrase(toError)}); the Lagrange-multiplier tests ${lmPoints}.`);
    if (sig(toLag) && sig(toError)) parts.push('Both restrictions are rejected, so the spatial Durbin model is the one these data support.');
    else if (!sig(toLag) && choice === 'lag') parts.push('The Durbin model reduces to the lag model and the Lagrange-multiplier tests agree: the lag model is the simpler description the data support.');
    else if (!sig(toError) && choice === 'error') parts.push('The Durbin model reduces to the error model and the Lagrange-multiplier tests agree: the error model is the simpler description the data support.');
    else if (!sig(toLag) && !sig(toError) && choice === 'ols') parts.push('With neither restriction rejected and no spatial dependence in those tests, the spatial terms add little here.');
    else if (!sig(toLag) && !sig(toError) && choice === 'either') parts.push('With neither restriction rejected, the lag and the error model each describe the data about as well as the spatial Durbin model: report both beside it, or keep the Durbin model, which contains both.');
    else if (choice === 'either') parts.push(`Only ${sig(toLag) ? 'the common-factor restriction' : 'θ = 0'} holds, so the ${sig(toLag) ? 'error' : 'lag'} model is the simpler description the data support.`);
    else parts.push('The two steps do not point to the same simpler model, so the spatial Durbin model, which contains both, is the safer choice.');
  } else {
    parts.push(fits.durbin === undefined
      ? 'The spatial Durbin model was not fitted, so the second step cannot be taken here; fit it with the lag and error models to follow it.'
      : 'The lag and error models were not both fitted beside the spatial Durbin model, so the second step cannot be completed here; fit all three to follow it.');
  }
  const slx = nested('slx', 'ols');
  if (slx) parts.push(`The neighbours' averages of the explanatory columns on their own (the neighbours' columns model, Halleck Vega & Elhorst 2015) ${sig(slx) ? 'add to the plain regression' : 'add little to the plain regression'} (${phrase(slx)}).`);
  const both = [nested('lagError', 'lag'), nested('lagError', 'error')];
  if (both[0] && both[1]) {
    parts.push(`In the lag-and-error model, dropping the shared error (λ = 0) ${sig(both[0]) ? 'is rejected' : 'is not rejected'} (${phrase(both[0])}) and dropping the outcome spillover (ρ = 0) ${sig(both[1]) ? 'is rejected' : 'is not rejected'} (${phrase(both[1])})${result.ols.recommendation.bothKinds ? '; the Lagrange-multiplier rule names this model as worth considering when both robust tests are significant, as here' : ''}.`);
  }
  const ml = fits.error as (Fitted & { parameter?: number; parameterSe?: number }) | undefined;
  const gm = fits.errorGM as (Fitted & { lambda?: number; lambdaSe?: number }) | undefined;
  if (gm && ml && ml.parameter !== undefined) {
    const bp = result.ols.breuschPagan;
    parts.push(`The error model by moments puts λ at ${say(gm.lambda!)} (standard error ${say(gm.lambdaSe!)}, robust to unequal variance) against ${say(ml.parameter)} (${say(ml.parameterSe!)}) by maximum likelihood; ${bp.p < SOME_LEVEL ? `the Breusch–Pagan test finds the spread of the residuals unequal (${sayP(bp.p)}), so the robust standard errors are the ones to read` : 'the Breusch–Pagan test finds no clear sign of unequal spread, so the two should agree'}.`);
  }
  const wald = testsBetweenModels(result).filter((t) => t.kind === 'Wald');
  if (wald.length) parts.push(`By instruments or moments: ${sayList(wald.map((t) => `${t.restriction} in the ${inSentence(t.general.label)} ${sig(t) ? 'is rejected' : 'is not rejected'} (Wald ${say(t.stat)}, ${sayP(t.p)})`))}.`);
  parts.push('This is guidance from the tests at the 5% level; what is known about how the outcome arises should weigh more than the tests alone.');
  return parts.join(' ');
}
