import type { AnalysisResult, ComparedFit, WeightsComparison } from '../pipeline/types.js';
import type { Block, Cell, TableColumn } from './types.js';
import { CHOICE_LABEL, MODEL_LABEL, num, say, sayList } from './format.js';

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
  const hasLag = built.some((r) => r.lag), hasError = built.some((r) => r.error);
  if (hasLag || hasError) {
    const fitCells = (f: ComparedFit | undefined): Cell[] => (f ? [num(f.parameter), num(f.se), num(f.p), num(f.aic)] : [null, null, null, null]);
    const columns: TableColumn[] = [{ header: 'Neighbour definition', format: 'text', width: 30 }];
    if (hasLag) columns.push(...fitColumns('ρ'));
    if (hasError) columns.push(...fitColumns('λ'));
    blocks.push({
      kind: 'table', title: 'The spatial models under each definition',
      columns,
      rows: rows.map((r): Cell[] => [name(r), ...(hasLag ? fitCells(r.lag) : []), ...(hasError ? fitCells(r.error) : [])]),
      note: `ρ belongs to the ${MODEL_LABEL.lag.toLowerCase()}, λ to the ${MODEL_LABEL.error.toLowerCase()}. AIC compares definitions only for the same model and the same areas: lower is a better balance of fit and simplicity.`,
    });
  }
  const withEffects = built.filter((r) => r.impacts?.length);
  if (withEffects.length) {
    blocks.push({
      kind: 'table', title: `Spillover effects of the ${MODEL_LABEL.lag.toLowerCase()} under each definition`,
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
      rows: withEffects.flatMap((r) => r.impacts!.map((i): Cell[] => [name(r), i.name, num(i.direct), num(i.indirect), num(i.indirectSe), num(i.indirectP), num(i.total), num(i.totalSe)])),
      note: 'The part in other areas is the spillover: the effect that a change in one area\'s column has, through the outcome, on all the other areas together, averaged over the areas where the change could start. Standard errors are simulated with the same draws and seed under every definition.',
    });
  }
  blocks.push({ kind: 'paragraph', style: 'interpretation', text: comparisonReading(rows) });
  const unsettled = built.filter((r) => [r.lag, r.error].some((f) => f && !f.converged));
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

function fitColumns(symbol: string): TableColumn[] {
  return [
    { header: symbol, format: 'decimal4', width: 11 },
    { header: `${symbol}: standard error`, format: 'decimal4', width: 11 },
    { header: `${symbol}: p-value`, format: 'pvalue', width: 11 },
    { header: `AIC with ${symbol}`, format: 'decimal4', width: 11 },
  ];
}

/** One paragraph on how much the answers move across the definitions. */
export function comparisonReading(rows: WeightsComparison[]): string {
  const built = rows.filter((r) => !r.failed);
  const parts: string[] = [];
  const spread = (pick: (r: WeightsComparison) => ComparedFit | undefined, symbol: string) => {
    const v = built.map(pick).filter((f): f is ComparedFit => !!f).map((f) => f.parameter);
    if (v.length > 1) parts.push(`${symbol} runs from ${say(Math.min(...v))} to ${say(Math.max(...v))}`);
  };
  spread((r) => r.lag, 'ρ');
  spread((r) => r.error, 'λ');
  const significant = built.filter((r) => r.moran.p < 0.05).length;
  parts.push(`Moran's I of the residuals is significant at the 5% level under ${significant} of them`);
  const suggestions = [...new Set(built.map((r) => r.suggestion).filter((s) => s !== undefined))];
  const suggested = suggestions.length === 1
    ? `The suggested model is the same under every definition: ${CHOICE_LABEL[suggestions[0]!].toLowerCase()}.`
    : `The suggested model changes with the definition (${sayList(suggestions.map((s) => CHOICE_LABEL[s!].toLowerCase()))}), so the choice between the spatial models rests partly on the neighbours chosen.`;
  return `Across the ${built.length} definitions, ${sayList(parts)}. ${suggested}`;
}
