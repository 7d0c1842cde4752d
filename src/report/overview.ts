import type { AnalysisResult } from '../pipeline/types.js';
import type { Block, Cell } from './types.js';
import { MODEL_LABEL, num, question, sayList, suggestionLabel } from './format.js';
import { fittedInOrder, inSentence } from '../models/index.js';
import { cautions, collectWarnings } from './cautions.js';
import { interpretation } from './interpretation.js';
import { lmTable } from './diagnostics.js';
import { comparisonReading } from './comparison.js';
import { familySummaryBlocks } from './family.js';
import { rateUse, recipeWords } from './rates.js';
import { formatCount } from '../core/count.js';

/** "ρ for the spatial lag model and λ for the spatial error model": each spatial parameter, from the registry. */
function parameterWords(result: AnalysisResult): string {
  return sayList(fittedInOrder(result.fits).map(({ entry }) => entry).filter((m) => m.parameters.length).map((m) => `${sayList(m.parameters.map((q) => q.symbol))} for the ${inSentence(m.label)}`));
}

function comparisonRows(result: AnalysisResult): Cell[][] {
  // one row per model and spatial parameter (a model with two has a second row for the second)
  return fittedInOrder(result.fits).flatMap(({ entry, fit }) => {
    const h = entry.headline(fit);
    const [first, ...more] = h.parameters;
    const parameter = (q: typeof first | undefined): Cell[] => (q ? [num(q.estimate), num(q.se), num(q.p)] : [null, null, null]);
    return [
      [entry.label, num(h.logLik), num(h.aic), num(h.bic), num(h.lr?.stat), num(h.lr?.p), ...parameter(first), num(h.r2)],
      ...more.map((q): Cell[] => [`${entry.label}: ${q.symbol}`, null, null, null, null, null, ...parameter(q), null]),
    ];
  });
}

/** What the coordinates were read as, and whether that was stated or guessed. */
function coordinatesLine(result: AnalysisResult): string {
  const kind = result.coordinates === 'geographic' ? 'longitude/latitude degrees' : 'projected (planar units)';
  return result.coordinatesGuessed
    ? `${kind}, guessed: the file does not say (see the warnings; --coordinates or the sidebar's Coordinates choice states it)`
    : kind;
}

export function overviewBlocks(result: AnalysisResult, title?: string): Block[] {
  const r = result.request;
  const rec = result.ols.recommendation;
  const blocks: Block[] = [
    { kind: 'title', text: title ?? `Spatial regression: ${question(r.y, r.x)}` },
    {
      kind: 'keyValues', title: 'The analysis',
      rows: [
        ['Question', question(r.y, r.x), 'text'],
        ['Areas analysed', result.n, 'integer'],
        ['Coordinates', coordinatesLine(result), 'text'],
        ['Rows left out for missing values', result.droppedRows.length, 'integer'],
        ['Neighbour definition', result.weights.description, 'text'],
        ['Weights', result.weights.transform === 'row' ? 'row-standardised (each area’s weights sum to 1)' : result.weights.transform === 'binary' ? 'binary (1 for a neighbour, 0 otherwise)' : 'as given in the edge list', 'text'],
        ['Areas without neighbours', result.weights.withoutNeighbours.length, 'integer'],
        ...(result.rates ?? []).map((q): [string, Cell, 'text'] => [`Rate ${q.name}`,
          `${recipeWords(q)}; ${rateUse(result, q)}; ${formatCount(q.areas.filter((a) => a.flagged).length)} areas flagged for few events${q.withholdFlagged ? ' and withheld' : ''} (sheet "Rates")`, 'text']),
      ],
    },
    { kind: 'paragraph', text: interpretation(result), style: 'interpretation' },
    ...(result.comparison && result.comparison.length > 1
      ? [{ kind: 'paragraph', style: 'interpretation', text: `Other neighbour definitions, on the sheet "Neighbour definitions compared": ${comparisonReading(result.comparison).replace(/^A/, 'a')}` } as Block]
      : []),
    {
      kind: 'table', title: 'How the models compare',
      columns: [
        { header: 'Model', format: 'text', width: 20 },
        { header: 'Log-likelihood', format: 'decimal4', width: 11, group: 'For comparing models' },
        { header: 'AIC', format: 'decimal4', width: 10, group: 'For comparing models' },
        { header: 'BIC', format: 'decimal4', width: 10, group: 'For comparing models' },
        { header: 'Likelihood ratio', format: 'decimal4', width: 10, group: 'Against the plain regression' },
        { header: 'p-value', format: 'pvalue', width: 9, group: 'Against the plain regression' },
        { header: 'Estimate', format: 'decimal4', width: 9, group: 'Spatial parameter' },
        { header: 'Standard error', format: 'decimal4', width: 9, group: 'Spatial parameter' },
        { header: 'p-value', format: 'pvalue', width: 9, group: 'Spatial parameter' },
        { header: 'R² (plain) or pseudo R²', format: 'decimal4', width: 13, group: 'How well it fits' },
      ],
      rows: comparisonRows(result),
      note: `Higher log-likelihood and lower AIC or BIC (Bayesian information criterion) mean a better balance of fit and simplicity. The spatial parameter is ${parameterWords(result)}.${fittedInOrder(result.fits).some(({ entry, fit }) => entry.headline(fit).logLik === undefined) ? ' Models estimated by instruments or moments have no likelihood, so no log-likelihood, AIC or BIC.' : ''}`,
    },
    ...familySummaryBlocks(result),
    lmTable(result, 'Evidence of spatial dependence in the plain regression', false),
    {
      kind: 'keyValues', title: 'Suggested model',
      rows: [
        ['Suggestion', suggestionLabel(rec), 'text'],
        ['Why', 'the Lagrange-multiplier tests in the table above, read by the rule below (the reading at the top of this sheet gives their p-values)', 'text'],
        ['Borderline call', rec.borderline ? 'yes: a p-value it turns on is close to the level, so report every model named' : 'no', 'text'],
        ['Fitted in this run', rec.fitted ? 'yes' : `no: ${rec.notFitted.map((m) => MODEL_LABEL[m].toLowerCase()).join(' and ')} still to fit`, 'text'],
        ['Significance level used', rec.alpha, 'decimal2'],
        ['Close to the level means', `a p-value from ${rec.close.lower} to ${rec.close.upper}`, 'text'],
        ['Rule applied', rec.rule, 'text'],
      ],
    },
    { kind: 'title', text: 'Before drawing conclusions' },
    ...cautions(result).map((text): Block => ({ kind: 'paragraph', text, style: 'caution' })),
  ];
  const warnings = collectWarnings(result);
  if (warnings.length) {
    blocks.push({ kind: 'title', text: 'Warnings from this run' });
    for (const text of warnings) blocks.push({ kind: 'paragraph', text, style: 'note' });
  }
  return blocks;
}
