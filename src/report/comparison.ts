import type { AnalysisResult, ComparedFit, WeightsComparison } from '../pipeline/types.js';
import type { Block, Cell, TableColumn } from './types.js';
import { MODEL_LABEL, num, say, sayList } from './format.js';

const name = (r: WeightsComparison) => (r.asRun ? `${r.label} (this run)` : r.label);
const DEFINITION: TableColumn = { header: 'Neighbour definition', format: 'text', width: 24 };

/** The suggestion under one definition, in words without brackets (they sit inside sentences and cells). */
function suggestionWords(r: WeightsComparison): string {
  const words = { lag: 'spatial lag model', error: 'spatial error model', ols: 'plain regression', either: 'not separated by the tests' } as const;
  return r.suggestion ? `${words[r.suggestion]}${r.borderline ? ', borderline' : ''}` : '';
}

/** The run's question refitted under other neighbour definitions, side by side. */
export function comparisonBlocks(result: AnalysisResult): Block[] {
  const all = result.comparison;
  if (!all || all.length < 2) return [];
  // a definition that links the same neighbours as an earlier one is said once, not repeated as identical rows
  const rows = all.filter((r) => !r.sameAs);
  const twins = all.filter((r) => r.sameAs);
  const built = rows.filter((r) => !r.failed);
  const blocks: Block[] = [
    { kind: 'title', text: 'The same question under other neighbour definitions' },
    {
      kind: 'paragraph', style: 'note',
      text: 'Each row keeps the data, the explanatory columns and the weights transform of this run and changes only which areas count as neighbours. ' +
        `The plain regression does not depend on the neighbours (its AIC is ${say(result.ols.aic)} under every definition); its residual tests and the spatial models do.`,
    },
  ];
  for (const t of twins) {
    blocks.push({ kind: 'paragraph', style: 'note', text: `The definition "${t.label}" links exactly the same neighbours as "${t.sameAs}" on these areas, so it gives the same figures; its rows are not repeated below.` });
  }
  const lmGroup = 'Lagrange-multiplier tests: p-value';
  blocks.push({
    kind: 'table', title: 'Neighbours and the tests on the plain regression\'s residuals',
    columns: [
      DEFINITION,
      { header: 'Links', format: 'integer', width: 7 },
      { header: 'Average neighbours', format: 'decimal2', width: 10 },
      { header: 'Without neighbours', format: 'integer', width: 10 },
      { header: 'I', format: 'decimal4', width: 9, group: "Moran's I of the residuals" },
      { header: 'z', format: 'decimal2', width: 7, group: "Moran's I of the residuals" },
      { header: 'p-value', format: 'pvalue', width: 9, group: "Moran's I of the residuals" },
      { header: 'Error', format: 'pvalue', width: 9, group: lmGroup },
      { header: 'Lag', format: 'pvalue', width: 9, group: lmGroup },
      { header: 'Robust error', format: 'pvalue', width: 9, group: lmGroup },
      { header: 'Robust lag', format: 'pvalue', width: 9, group: lmGroup },
      { header: 'Suggested model', format: 'text', width: 22 },
    ],
    rows: rows.map((r): Cell[] => [
      name(r), num(r.links), num(r.meanNeighbours), num(r.withoutNeighbours), num(r.moran.I), num(r.moran.z), num(r.moran.p),
      num(r.lmP.error), num(r.lmP.lag), num(r.lmP.robustError), num(r.lmP.robustLag),
      r.failed ? 'could not be built (see below)' : suggestionWords(r) || null,
    ]),
    note: 'The four tests are the Lagrange-multiplier tests of the plain regression for a spatial error and a spatial lag, and their forms robust to the other kind. ' +
      '"Borderline" marks a suggestion that turns on a p-value close to the 5% level (between 2.5% and 10%): report both models there.',
  });
  const hasLag = built.some((r) => r.lag), hasError = built.some((r) => r.error);
  if (hasLag || hasError) {
    const fitCells = (f: ComparedFit | undefined): Cell[] => (f ? [num(f.parameter), num(f.se), num(f.p), num(f.aic)] : [null, null, null, null]);
    const columns: TableColumn[] = [DEFINITION];
    if (hasLag) columns.push(...fitColumns(MODEL_LABEL.lag, 'ρ'));
    if (hasError) columns.push(...fitColumns(MODEL_LABEL.error, 'λ'));
    blocks.push({
      kind: 'table', title: 'The spatial models under each definition',
      columns,
      rows: rows.map((r): Cell[] => [name(r), ...(hasLag ? fitCells(r.lag) : []), ...(hasError ? fitCells(r.error) : [])]),
      note: `ρ belongs to the ${MODEL_LABEL.lag.toLowerCase()}, λ to the ${MODEL_LABEL.error.toLowerCase()}. AIC compares definitions only for the same model and the same areas: lower is a better balance of fit and simplicity.`,
    });
  }
  const withEffects = built.filter((r) => r.impacts?.length);
  if (withEffects.length) {
    const effect = (group: string, withP: boolean): TableColumn[] => [
      { header: 'Effect', format: 'decimal4', width: 9, group },
      { header: 'Standard error', format: 'decimal4', width: 9, group },
      ...(withP ? [{ header: 'p-value', format: 'pvalue', width: 9, group } satisfies TableColumn] : []),
    ];
    blocks.push({
      kind: 'table', title: `Spillover effects of the ${MODEL_LABEL.lag.toLowerCase()} under each definition`,
      columns: [
        DEFINITION,
        { header: 'Explanatory column', format: 'text', width: 14 },
        ...effect('In the area itself', false), ...effect('In other areas (spillover)', true), ...effect('Total', false),
      ],
      rows: withEffects.flatMap((r) => r.impacts!.map((i): Cell[] => [
        name(r), i.name, num(i.direct), num(i.directSe), num(i.indirect), num(i.indirectSe), num(i.indirectP), num(i.total), num(i.totalSe),
      ])),
      note: 'The part in other areas is the spillover: the effect that a change in one area\'s column has, through the outcome, on all the other areas together, averaged over the areas where the change could start. Standard errors are simulated with the same draws and seed under every definition.',
    });
  }
  blocks.push({ kind: 'paragraph', style: 'interpretation', text: comparisonReading(all) });
  const unsettled = built.filter((r) => [r.lag, r.error].some((f) => f && !f.converged));
  if (unsettled.length) {
    blocks.push({ kind: 'paragraph', style: 'note', text: `Under ${sayList(unsettled.map((r) => r.label))} a model's search stopped early or at an end of the admissible range; read those figures with care.` });
  }
  for (const r of rows.filter((x) => x.failed)) blocks.push({ kind: 'paragraph', style: 'note', text: `${capital(r.label)} could not be built: ${r.failed}` });
  blocks.push({ kind: 'keyValues', title: 'The definitions in full', rows: all.map((r): [string, Cell, 'text'] => [name(r), r.description, 'text']) });
  blocks.push({
    kind: 'paragraph', style: 'caution',
    text: 'Choose the neighbour definition for a reason about the places — shared borders, travel, distance that matters for the outcome — and not for the result it gives. ' +
      'Where the answers change with the definition, report that they do.',
  });
  return blocks;
}

function fitColumns(model: string, symbol: string): TableColumn[] {
  return [
    { header: symbol, format: 'decimal4', width: 9, group: model },
    { header: 'Standard error', format: 'decimal4', width: 9, group: model },
    { header: 'p-value', format: 'pvalue', width: 9, group: model },
    { header: 'AIC', format: 'decimal4', width: 10, group: model },
  ];
}

function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/** One paragraph on how much the answers move across the definitions (each distinct set of neighbours counted once). */
export function comparisonReading(all: WeightsComparison[]): string {
  const built = all.filter((r) => !r.failed && !r.sameAs);
  const sentences: string[] = [];
  const parts: string[] = [];
  const spread = (pick: (r: WeightsComparison) => ComparedFit | undefined, symbol: string) => {
    const v = built.map(pick).filter((f): f is ComparedFit => !!f).map((f) => f.parameter);
    if (v.length > 1) parts.push(`${symbol} runs from ${say(Math.min(...v))} to ${say(Math.max(...v))}`);
  };
  spread((r) => r.lag, 'ρ');
  spread((r) => r.error, 'λ');
  const significant = built.filter((r) => r.moran.p < 0.05).length;
  parts.push(`Moran's I of the residuals is significant at the 5% level under ${significant === built.length ? 'every one' : `${significant} of them`}`);
  const twins = all.filter((r) => r.sameAs).length;
  sentences.push(`Across the ${built.length} distinct definitions${twins ? ` (${twins} more linked the same neighbours as one of these)` : ''}, ${sayList(parts)}.`);
  const bySuggestion = new Map<string, string[]>();
  for (const r of built) {
    const words = suggestionWords(r);
    if (words) bySuggestion.set(words, [...(bySuggestion.get(words) ?? []), r.label]);
  }
  if (bySuggestion.size === 1) {
    sentences.push(`The suggested model is the same under every definition: ${[...bySuggestion.keys()][0]}.`);
  } else if (bySuggestion.size > 1) {
    const under = [...bySuggestion].map(([words, labels]) => `${words} under ${sayList(labels)}`);
    sentences.push(`The suggestion changes with the definition — ${under.join('; ')} — so the choice between the spatial models rests partly on the neighbours chosen.`);
  }
  return sentences.join(' ');
}
