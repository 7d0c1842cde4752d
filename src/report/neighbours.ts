import type { AnalysisResult } from '../pipeline/types.js';
import type { Block, Cell } from './types.js';
import { num, yesNo } from './format.js';
import { listSome } from '../errors.js';

/** Summary of the neighbour links, their count histogram, and the full edge list. */
export function neighboursBlocks(result: AnalysisResult): Block[] {
  const w = result.weights;
  const s = w.summary;
  const e = w.edges;
  const edgeRows: Cell[][] = [];
  for (let k = 0; k < e.from.length; k++) edgeRows.push([result.ids[e.from[k]], result.ids[e.to[k]], num(e.weight[k])]);
  const blocks: Block[] = [
    { kind: 'title', text: `Neighbours: ${w.description}` },
    {
      kind: 'keyValues', title: 'Summary of the links',
      rows: [
        ['Areas', s.n, 'integer'],
        ['Links (each direction counted)', s.links, 'integer'],
        ['Share of all possible pairs that are linked', num(s.density), 'percent'],
        ['Fewest neighbours of an area', s.minNeighbours, 'integer'],
        ['Average number of neighbours', num(s.meanNeighbours), 'decimal2'],
        ['Median number of neighbours', num(s.medianNeighbours), 'decimal2'],
        ['Most neighbours of an area', s.maxNeighbours, 'integer'],
        ['Areas without neighbours', s.withoutNeighbours.length, 'integer'],
        ['Separate groups of linked areas', s.components, 'integer'],
        ['Links run both ways with equal weight', yesNo(s.symmetric), 'text'],
        ['Weights', w.transform === 'row' ? 'row-standardised' : w.transform, 'text'],
      ],
    },
    {
      kind: 'table', title: 'How many neighbours the areas have',
      columns: [{ header: 'Number of neighbours', format: 'integer', width: 14 }, { header: 'Areas', format: 'integer', width: 12 }],
      rows: s.histogram.map(([k, count]): Cell[] => [k, count]),
    },
  ];
  if (s.withoutNeighbours.length) blocks.push({ kind: 'paragraph', style: 'caution', text: `Areas without neighbours: ${listSome(s.withoutNeighbours, 200)}.` });
  blocks.push({
    kind: 'table', title: 'Every link',
    columns: [{ header: 'Area ID', format: 'text', width: 14 }, { header: 'Neighbour ID', format: 'text', width: 14 }, { header: 'Weight', format: 'decimal4', width: 12 }],
    rows: edgeRows,
    note: 'Each row is one directed link: the weight the area gives to that neighbour.',
  });
  return blocks;
}
