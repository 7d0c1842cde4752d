import type { AnalysisResult } from '../pipeline/types.js';
import type { Block, Cell } from './types.js';
import { CHOICE_LABEL, num, question } from './format.js';
import { fittedInOrder } from '../models/index.js';
import { cautions, collectWarnings } from './cautions.js';
import { interpretation } from './interpretation.js';
import { lmTable } from './diagnostics.js';
import { comparisonReading } from './comparison.js';
import { rateUse, recipeWords } from './rates.js';

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
          `${recipeWords(q)}; ${rateUse(result, q)}; ${q.areas.filter((a) => a.flagged).length} areas flagged for few events${q.withholdFlagged ? ' and withheld' : ''} (sheet "Rates")`, 'text']),
      ],
    },
    { kind: 'paragraph', text: interpretation(result), style: 'interpretation' },
    ...(result.comparison && result.comparison.length > 1
      ? [{ kind: 'paragraph', style: 'interpretation', text: `Under other neighbour definitions (sheet "Neighbour definitions compared"): ${comparisonReading(result.comparison)}` } as Block]
      : []),
    {
      kind: 'table', title: 'How the models compare',
      columns: [
        { header: 'Model', format: 'text', width: 26 },
        { header: 'Log-likelihood', format: 'decimal4', width: 14 },
        { header: 'AIC', format: 'decimal4', width: 12 },
        { header: 'Bayesian information criterion (BIC)', format: 'decimal4', width: 12 },
        { header: 'Likelihood ratio against plain regression', format: 'decimal4', width: 14 },
        { header: 'p-value of the ratio', format: 'pvalue', width: 11 },
        { header: 'Spatial parameter', format: 'decimal4', width: 12 },
        { header: 'Its standard error', format: 'decimal4', width: 12 },
        { header: 'Its p-value', format: 'pvalue', width: 11 },
        { header: 'R² (plain) or pseudo R²', format: 'decimal4', width: 12 },
      ],
      rows: comparisonRows(result),
      note: 'Higher log-likelihood and lower AIC or BIC values mean a better balance of fit and simplicity. The spatial parameter is ρ for the lag model and λ for the error model.',
    },
    lmTable(result, 'Evidence of spatial dependence in the plain regression'),
    {
      kind: 'keyValues', title: 'Suggested model',
      rows: [
        ['Suggestion', CHOICE_LABEL[result.ols.recommendation.choice], 'text'],
        ['Why', result.ols.recommendation.text, 'text'],
        ['Rule applied', result.ols.recommendation.rule, 'text'],
        ['Significance level used', result.ols.recommendation.alpha, 'decimal2'],
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
