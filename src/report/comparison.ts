import type { AnalysisResult, ComparedFit, WeightsComparison } from '../pipeline/types.js';
import type { Block, Cell, TableColumn } from './types.js';
import { CHOICE_LABEL, num, say, sayList } from './format.js';
import { MODELS, type ModelEntry, type ParameterEstimate } from '../models/index.js';

type Compared = { entry: ModelEntry; of: (r: WeightsComparison) => ComparedFit | undefined };

/** The spatial models fitted under at least one of the definitions, in registry order. */
function comparedModels(rows: WeightsComparison[]): Compared[] {
  return MODELS
    .filter((entry) => !entry.baseline)
    .map((entry) => ({ entry, of: (r: WeightsComparison) => (r.fits as Record<string, ComparedFit | undefined>)[entry.key] }))
    .filter((m) => rows.some((r) => !r.failed && m.of(r)));
}

/** The run's question refitted under other neighbour definitions, side by side. */
export function comparisonBlocks(result: AnalysisResult): Block[] {
  const rows = result.comparison;
  if (!rows || rows.length < 2) return [];
  const name = (r: WeightsComparison) => (r.asRun ? `${r.label} (this run)` : r.label);
  const built = rows.filter((r) => !r.failed);
  const blocks: Block[] = [
    { kind: 'title', text: 'The same question under other neighbour definitions' },
    {
      kind: 'paragraph', style: 'note',
      text: 'Each row keeps the data, the explanatory columns and the weights transform of this run and changes only which areas count as neighbours. ' +
        `The plain regression does not depend on the neighbours (its AIC is ${say(result.ols.aic)} under every definition); its residual tests and the spatial models do.`,
    },
    {
      kind: 'table', title: 'Neighbours and the tests on the plain regression\'s residuals',
      columns: [
        { header: 'Neighbour definition', format: 'text', width: 30 },
        { header: 'Links', format: 'integer', width: 11 },
        { header: 'Average neighbours', format: 'decimal2', width: 11 },
        { header: 'Without neighbours', format: 'integer', width: 11 },
        { header: 'Moran\'s I of residuals', format: 'decimal4', width: 11 },
        { header: 'Its z', format: 'decimal2', width: 11 },
        { header: 'Its p-value', format: 'pvalue', width: 11 },
        { header: 'Error test: p', format: 'pvalue', width: 11 },
        { header: 'Lag test: p', format: 'pvalue', width: 11 },
        { header: 'Robust error test: p', format: 'pvalue', width: 11 },
        { header: 'Robust lag test: p', format: 'pvalue', width: 11 },
        { header: 'Suggested model', format: 'text', width: 34 },
      ],
      rows: rows.map((r): Cell[] => [
        name(r), num(r.links), num(r.meanNeighbours), num(r.withoutNeighbours), num(r.moran.I), num(r.moran.z), num(r.moran.p),
        num(r.lmP.error), num(r.lmP.lag), num(r.lmP.robustError), num(r.lmP.robustLag),
        r.failed ? 'could not be built (see below)' : r.suggestion ? CHOICE_LABEL[r.suggestion] : null,
      ]),
      note: 'The four tests are the Lagrange-multiplier tests of the plain regression for a spatial error and a spatial lag, and their forms robust to the other kind.',
    },
  ];
  const models = comparedModels(rows);
  if (models.length) {
    const fitCells = (m: Compared, f: ComparedFit | undefined): Cell[] => [
      ...m.entry.parameters.flatMap((q): Cell[] => {
        const e = f?.parameters.find((x) => x.key === q.key);
        return [num(e?.estimate), num(e?.se), num(e?.p)];
      }),
      num(f?.aic),
    ];
    const columns: TableColumn[] = [{ header: 'Neighbour definition', format: 'text', width: 30 }];
    for (const m of models) columns.push(...fitColumns(m.entry));
    const belongs = models.filter((m) => m.entry.parameters.length)
      .map((m, i) => `${sayList(m.entry.parameters.map((q) => q.symbol))}${i === 0 ? ' belongs' : ''} to the ${m.entry.label.toLowerCase()}`);
    blocks.push({
      kind: 'table', title: 'The spatial models under each definition',
      columns,
      rows: rows.map((r): Cell[] => [name(r), ...models.flatMap((m) => fitCells(m, m.of(r)))]),
      note: `${belongs.length ? `${belongs.join(', ')}. ` : ''}AIC compares definitions only for the same model and the same areas: lower is a better balance of fit and simplicity.`,
    });
  }
  for (const m of models) {
    const withEffects = built.filter((r) => m.of(r)?.impacts?.length);
    if (!withEffects.length) continue;
    blocks.push({
      kind: 'table', title: `Spillover effects of the ${m.entry.label.toLowerCase()} under each definition`,
      columns: [
        { header: 'Neighbour definition', format: 'text', width: 30 },
        { header: 'Explanatory column', format: 'text', width: 11 },
        { header: 'In the area itself', format: 'decimal4', width: 11 },
        { header: 'In other areas', format: 'decimal4', width: 11 },
        { header: 'Standard error', format: 'decimal4', width: 11 },
        { header: 'p-value', format: 'pvalue', width: 11 },
        { header: 'Total', format: 'decimal4', width: 11 },
        { header: 'Standard error', format: 'decimal4', width: 11 },
      ],
      rows: withEffects.flatMap((r) => m.of(r)!.impacts!.map((i): Cell[] => [name(r), i.name, num(i.direct), num(i.indirect), num(i.indirectSe), num(i.indirectP), num(i.total), num(i.totalSe)])),
      note: 'The part in other areas is the spillover: the effect that a change in one area\'s column has, through the outcome, on all the other areas together, averaged over the areas where the change could start. Standard errors are simulated with the same draws and seed under every definition.',
    });
  }
  blocks.push({ kind: 'paragraph', style: 'interpretation', text: comparisonReading(rows) });
  const unsettled = built.filter((r) => models.some((m) => m.of(r)?.converged === false));
  if (unsettled.length) {
    blocks.push({ kind: 'paragraph', style: 'note', text: `Under ${sayList(unsettled.map((r) => r.label))} a model's search stopped early or at an end of the admissible range; read those figures with care.` });
  }
  for (const r of rows.filter((x) => x.failed)) blocks.push({ kind: 'paragraph', style: 'note', text: `${r.label} could not be built: ${r.failed}` });
  blocks.push({ kind: 'table', title: 'The definitions in full', columns: [{ header: 'Neighbour definition', format: 'text', width: 30 }, { header: 'In full', format: 'text', width: 11 }], rows: rows.map((r): Cell[] => [name(r), r.description]) });
  blocks.push({
    kind: 'paragraph', style: 'caution',
    text: 'Choose the neighbour definition for a reason about the places — shared borders, travel, distance that matters for the outcome — and not for the result it gives. ' +
      'Where the answers change with the definition, report that they do.',
  });
  return blocks;
}

function fitColumns(entry: ModelEntry): TableColumn[] {
  const symbols = entry.parameters.map((q) => q.symbol);
  return [
    ...symbols.flatMap((symbol): TableColumn[] => [
      { header: symbol, format: 'decimal4', width: 11 },
      { header: `${symbol}: standard error`, format: 'decimal4', width: 11 },
      { header: `${symbol}: p-value`, format: 'pvalue', width: 11 },
    ]),
    { header: symbols.length ? `AIC with ${sayList(symbols)}` : `AIC: ${entry.label.toLowerCase()}`, format: 'decimal4', width: 11 },
  ];
}

/** One paragraph on how much the answers move across the definitions. */
export function comparisonReading(rows: WeightsComparison[]): string {
  const built = rows.filter((r) => !r.failed);
  const parts: string[] = [];
  const models = comparedModels(rows);
  for (const m of models) {
    for (const q of m.entry.parameters) {
      const v = built.map((r) => m.of(r)?.parameters.find((x) => x.key === q.key)).filter((x): x is ParameterEstimate => !!x).map((x) => x.estimate);
      // a symbol shared by several models is named with its model
      const shared = models.filter((o) => o.entry.parameters.some((x) => x.symbol === q.symbol)).length > 1;
      if (v.length > 1) parts.push(`${q.symbol}${shared ? ` (${m.entry.label.toLowerCase()})` : ''} runs from ${say(Math.min(...v))} to ${say(Math.max(...v))}`);
    }
  }
  const significant = built.filter((r) => r.moran.p < 0.05).length;
  parts.push(`Moran's I of the residuals is significant at the 5% level under ${significant} of them`);
  const suggestions = [...new Set(built.map((r) => r.suggestion).filter((s) => s !== undefined))];
  const suggested = suggestions.length === 1
    ? `The suggested model is the same under every definition: ${CHOICE_LABEL[suggestions[0]!].toLowerCase()}.`
    : `The suggested model changes with the definition (${sayList(suggestions.map((s) => CHOICE_LABEL[s!].toLowerCase()))}), so the choice between the spatial models rests partly on the neighbours chosen.`;
  return `Across the ${built.length} definitions, ${sayList(parts)}. ${suggested}`;
}
