import type { AnalysisResult } from '../pipeline/types.js';
import type { Fitted, SpatialFit } from '../models/index.js';
import type { Block, Cell, TableColumn } from './types.js';
import { num, say, sayP } from './format.js';

/** One effect's columns under its group heading: the effect, its standard error, its p-value. */
/** Said once under the per-column readings: what the spillover figures are, and are not. */
export const CAUSE_NOTE = 'These figures describe how the columns move together in the model, not what a change would cause.';

export function effectColumns(group: string): TableColumn[] {
  return [
    { header: 'Effect', format: 'decimal4', width: 10, group },
    { header: 'Standard error', format: 'decimal4', width: 10, group },
    { header: 'p-value', format: 'pvalue', width: 9, group },
  ];
}

/** Direct, indirect and total impacts of the lag model, with one careful sentence per regressor. */
export function impactsBlocks(result: AnalysisResult, fit: Fitted<SpatialFit>): Block[] {
  const im = fit.impacts;
  if (!im) return [];
  const y = result.request.y;
  const blocks: Block[] = [
    { kind: 'title', text: 'Spillover effects in the spatial lag model' },
    {
      kind: 'paragraph', style: 'note',
      text: `In the lag model a change in one area reaches the other areas through the neighbour links. The figures split each column's association with ${y} into the part in the area itself (direct), the part spread over all other areas (indirect) and their sum (total), averaged over the areas.`,
    },
    {
      kind: 'table', title: 'Direct, indirect and total effects',
      columns: [
        { header: 'Explanatory column', format: 'text', width: 16 },
        ...effectColumns('In the area itself (direct)'), ...effectColumns('Spread over other areas (indirect)'), ...effectColumns('Total'),
      ],
      rows: im.impacts.map((m): Cell[] => [m.name, num(m.direct), num(m.directSe), num(m.directP), num(m.indirect), num(m.indirectSe), num(m.indirectP),
        num(m.total), num(m.totalSe), num(m.totalP)]),
      // the method names its draws and seed itself (lagImpacts)
      note: `How the standard errors and p-values were found: ${im.method}.`,
    },
  ];
  for (const m of im.impacts) {
    blocks.push({
      kind: 'paragraph', style: 'interpretation',
      text: `A one-unit rise in ${m.name} in one area goes with a change of ${say(m.direct)} in that area's ${y} (${sayP(m.directP)}) and ${say(m.indirect)} spread over the other areas (${sayP(m.indirectP)}), a total of ${say(m.total)} (${sayP(m.totalP)}).`,
    });
  }
  if (im.impacts.length) blocks.push({ kind: 'paragraph', style: 'interpretation', text: CAUSE_NOTE });
  return blocks;
}
