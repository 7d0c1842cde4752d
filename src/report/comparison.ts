import type { AnalysisResult, ComparedFit, WeightsComparison } from '../pipeline/types.js';
import type { Block, Cell, TableColumn } from './types.js';
import { MODEL_LABEL, num, say, sayList } from './format.js';
import { inSentence, MODELS, type ModelEntry, type ParameterEstimate } from '../models/index.js';
import { capital } from '../core/words.js';

const name = (r: WeightsComparison) => (r.asRun ? `${r.label} (this run)` : r.label);
const DEFINITION: TableColumn = { header: 'Neighbour definition', format: 'text', width: 24 };

/** The suggestion under one definition, in words without brackets (they sit inside sentences and cells). */
function suggestionWords(r: WeightsComparison): string {
  if (!r.suggestion) return '';
  const words = r.suggestion === 'either' ? 'not separated by the tests' : MODEL_LABEL[r.suggestion].toLowerCase();
  return `${words}${r.borderline ? ', borderline' : ''}`;
}

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
  const models = comparedModels(built);
  if (models.length) {
    const fitCells = (m: Compared, f: ComparedFit | undefined): Cell[] => [
      ...m.entry.parameters.flatMap((q): Cell[] => {
        const e = f?.parameters.find((x) => x.key === q.key);
        return [num(e?.estimate), num(e?.se), num(e?.p)];
      }),
      num(f?.aic),
    ];
    const columns: TableColumn[] = [DEFINITION];
    for (const m of models) columns.push(...fitColumns(m.entry));
    const belongs = models.filter((m) => m.entry.parameters.length)
      .map((m, i) => `${sayList(m.entry.parameters.map((q) => q.symbol))}${i === 0 ? ' belongs' : ''} to the ${inSentence(m.entry.label)}`);
    blocks.push({
      kind: 'table', title: 'The spatial models under each definition',
      columns,
      rows: rows.map((r): Cell[] => [name(r), ...models.flatMap((m) => fitCells(m, m.of(r)))]),
      note: `${belongs.length ? `${belongs.join(', ')}. ` : ''}AIC compares definitions only for the same model and the same areas: lower is a better balance of fit and simplicity.`,
    });
  }
  const effect = (group: string, withP: boolean): TableColumn[] => [
    { header: 'Effect', format: 'decimal4', width: 9, group },
    { header: 'Standard error', format: 'decimal4', width: 9, group },
    ...(withP ? [{ header: 'p-value', format: 'pvalue', width: 9, group } satisfies TableColumn] : []),
  ];
  for (const m of models) {
    const withEffects = built.filter((r) => m.of(r)?.impacts?.length);
    if (!withEffects.length) continue;
    blocks.push({
      kind: 'table', title: `Spillover effects of the ${inSentence(m.entry.label)} under each definition`,
      columns: [
        DEFINITION,
        { header: 'Explanatory column', format: 'text', width: 14 },
        ...effect('In the area itself', false), ...effect('In other areas (spillover)', true), ...effect('Total', false),
      ],
      rows: withEffects.flatMap((r) => m.of(r)!.impacts!.map((i): Cell[] => [
        name(r), i.name, num(i.direct), num(i.directSe), num(i.indirect), num(i.indirectSe), num(i.indirectP), num(i.total), num(i.totalSe),
      ])),
      note: 'The part in other areas is the spillover: the effect that a change in one area\'s column has, through the outcome, on all the other areas together, averaged over the areas where the change could start. Standard errors are simulated with the same draws and seed under every definition.',
    });
  }
  blocks.push({ kind: 'paragraph', style: 'interpretation', text: comparisonReading(all) });
  const unsettled = built.filter((r) => models.some((m) => m.of(r)?.converged === false));
  if (unsettled.length) {
    blocks.push({ kind: 'paragraph', style: 'note', text: `Under ${sayList(unsettled.map((r) => r.label))} a model's search stopped early or at an end of the admissible range; read those figures with care.` });
  }
  for (const r of rows.filter((x) => x.failed)) blocks.push({ kind: 'paragraph', style: 'note', text: `${capital(r.label)} could not be built: ${r.failed}` });
  // ties deciding nearest neighbours, for each definition where they did (the run's own is among the warnings too)
  for (const r of all.filter((x) => x.tiesWarning)) blocks.push({ kind: 'paragraph', style: 'note', text: `Under ${r.label}${r.asRun ? ' (this run)' : ''}: ${r.tiesWarning}` });
  blocks.push({ kind: 'keyValues', title: 'The definitions in full', rows: all.map((r): [string, Cell, 'text'] => [name(r), r.description, 'text']) });
  blocks.push({
    kind: 'paragraph', style: 'caution',
    text: 'Choose the neighbour definition for a reason about the places — shared borders, travel, distance that matters for the outcome — and not for the result it gives. ' +
      'Where the answers change with the definition, report that they do.',
  });
  return blocks;
}

/** A model's columns, grouped under its label: each spatial parameter with its standard error and p-value, then its AIC. */
function fitColumns(entry: ModelEntry): TableColumn[] {
  const group = entry.label;
  const symbols = entry.parameters.map((q) => q.symbol);
  // with one parameter the group heading says whose; with several each column names its parameter
  const of = (header: string, symbol: string) => (symbols.length > 1 ? `${symbol}: ${header.toLowerCase()}` : header);
  return [
    ...symbols.flatMap((symbol): TableColumn[] => [
      { header: symbol, format: 'decimal4', width: 9, group },
      { header: of('Standard error', symbol), format: 'decimal4', width: 9, group },
      { header: of('p-value', symbol), format: 'pvalue', width: 9, group },
    ]),
    { header: 'AIC', format: 'decimal4', width: 10, group },
  ];
}

/** One paragraph on how much the answers move across the definitions (each distinct set of neighbours counted once). */
export function comparisonReading(all: WeightsComparison[]): string {
  const built = all.filter((r) => !r.failed && !r.sameAs);
  const sentences: string[] = [];
  const parts: string[] = [];
  const models = comparedModels(built);
  for (const m of models) {
    for (const q of m.entry.parameters) {
      const v = built.map((r) => m.of(r)?.parameters.find((x) => x.key === q.key)).filter((x): x is ParameterEstimate => !!x).map((x) => x.estimate);
      // a symbol shared by several models is named with its model
      const shared = models.filter((o) => o.entry.parameters.some((x) => x.symbol === q.symbol)).length > 1;
      if (v.length > 1) parts.push(`${q.symbol}${shared ? ` (${inSentence(m.entry.label)})` : ''} runs from ${say(Math.min(...v))} to ${say(Math.max(...v))}`);
    }
  }
  const significant = built.filter((r) => r.moran.p < 0.05).length;
  parts.push(`Moran's I of the residuals is significant at the 5% level under ${significant === built.length ? 'every one' : significant === 0 ? 'none of them' : `${significant} of them`}`);
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
