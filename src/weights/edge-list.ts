import Papa from 'papaparse';
import type { CsrMatrix } from '../linalg/index.js';
import { InputError } from '../errors.js';
import { lookAlikeKey } from '../geo/index.js';
import type { SpatialWeights, WeightsTransform } from './types.js';
import { LinkList, csrFromLinks, isSymmetric, symmetricBehind } from './pattern.js';
import { applyTransform } from './transform.js';

export interface EdgeListOptions {
  /** default 'row'; 'as given' keeps the weights from the file */
  transform?: WeightsTransform | 'as given';
  /** file name for messages */
  source?: string;
}

const HEADER = ['origin', 'neighbour', 'weight'];

/**
 * Weights from a CSV edge list: one directed link per line, "origin,neighbour[,weight]" (weight 1
 * when the column is missing). A first line whose weight cell is not a number, or whose origin is
 * not a known ID, is a header. Lines are counted as the user sees them (first line = 1). Areas
 * that never appear as an origin have no neighbours. A weight of 0 is not a link and is skipped.
 */
export function readEdgeList(text: string, ids: string[], opts: EdgeListOptions = {}): SpatialWeights {
  const source = opts.source ?? 'the edge list';
  const transform = opts.transform ?? 'row';
  const n = ids.length;
  const position = new Map<string, number>();
  ids.forEach((id, i) => position.set(id, i));
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { skipEmptyLines: false });
  const fatal = parsed.errors.find((e) => e.type === 'Quotes');
  if (fatal) {
    throw new InputError(`${source}, line ${(fatal.row ?? 0) + 1}: ${fatal.message}. Check the quotes on that line.`, { file: source, row: (fatal.row ?? 0) + 1 });
  }
  const rows = parsed.data;
  const links = new LinkList();
  const seen = new Map<number, number>();
  let first = true;
  // IDs a spreadsheet wrote as decimals (1001.0 for the area 1001): matched, and said so
  const decimalIds = new Set<string>();
  const find = (cell: string): number | undefined => {
    const exact = position.get(cell);
    if (exact !== undefined) return exact;
    const whole = /^(\d+)\.0+$/.exec(cell);
    const hit = whole ? position.get(whole[1]) : undefined;
    if (hit !== undefined) decimalIds.add(cell);
    return hit;
  };
  // an unknown ID that differs from an area's only in spaces, letter case, O/0 or l/I/1 is pointed out (never matched)
  let byKey: Map<string, string> | null = null;
  const alikeHint = (cell: string): string => {
    if (!byKey) {
      byKey = new Map();
      for (const id of ids) if (!byKey.has(lookAlikeKey(id))) byKey.set(lookAlikeKey(id), id);
    }
    const near = byKey.get(lookAlikeKey(cell));
    return near !== undefined ? ` It looks like the area ${near} (apart from spaces, letter case, O for 0 or l/I for 1), which is not matched automatically.` : '';
  };
  for (let r = 0; r < rows.length; r++) {
    const line = r + 1;
    const cells = rows[r].map((c) => c.trim());
    if (cells.every((c) => c === '')) continue;
    const where = { file: source, row: line };
    if (first) {
      first = false;
      const weightCell = cells[2];
      const isHeader = weightCell !== undefined && weightCell !== '' ? !isNumber(weightCell) : find(cells[0]) === undefined;
      if (isHeader) continue;
    }
    if (cells.length < 2 || cells[1] === '') {
      throw new InputError(`${source}, line ${line}: expected an origin ID and a neighbour ID separated by a comma.`, where);
    }
    const i = find(cells[0]);
    if (i === undefined) throw new InputError(`${source}, line ${line}: the origin ID ${cells[0]} is not one of the areas.${alikeHint(cells[0])} Check the ID or remove the line.`, { ...where, feature: cells[0] });
    const j = find(cells[1]);
    if (j === undefined) throw new InputError(`${source}, line ${line}: the neighbour ID ${cells[1]} is not one of the areas.${alikeHint(cells[1])} Check the ID or remove the line.`, { ...where, feature: cells[1] });
    if (i === j) throw new InputError(`${source}, line ${line}: area ${cells[0]} is listed as its own neighbour. Remove the line; an area is never its own neighbour.`, where);
    let weight = 1;
    if (cells.length > 2 && cells[2] !== '') {
      weight = isNumber(cells[2]) ? Number(cells[2]) : NaN;
      if (!Number.isFinite(weight) || weight < 0) {
        throw new InputError(`${source}, line ${line}: the weight "${cells[2]}" is not a number of 0 or more.`, { ...where, column: 'weight' });
      }
    }
    const key = i * n + j;
    const before = seen.get(key);
    if (before !== undefined) {
      throw new InputError(`${source}, lines ${before} and ${line} both link ${cells[0]} to ${cells[1]}. Keep one of them.`, where);
    }
    seen.set(key, line);
    if (weight > 0) links.push(i, j, weight);
  }
  if (links.length === 0) throw new InputError(`${source} has no links between the areas. Check that its IDs match the data.`, { file: source });
  const base = csrFromLinks(n, links);
  const w: CsrMatrix = transform === 'as given' ? base : applyTransform(base, transform);
  const note = transform === 'as given' ? 'weights as given' : transform === 'row' ? 'rows standardised to sum to 1' : 'every link weighs 1';
  return {
    ...w,
    ids,
    description: `neighbours read from ${source}; ${note}`,
    spec: { method: 'edge-list', source },
    transform,
    ...(decimalIds.size > 0 ? { notes: [`${source} writes ${decimalIds.size} ID(s) with a decimal point (such as 1001.0, as a spreadsheet saves whole numbers); they were matched to the areas of the same whole number.`] } : {}),
    // a list written row-standardised from symmetric links keeps its symmetric form (exact algebra)
    symmetricBase: isSymmetric(base) ? base : transform === 'row' ? symmetricBehind(base) : null,
  };
}

/** CSV with the header origin,neighbour,weight and one directed link per line; IDs quoted when needed. */
export function writeEdgeList(w: SpatialWeights): string {
  const data: string[][] = [];
  for (let i = 0; i < w.n; i++) {
    for (let p = w.rowPtr[i], pEnd = w.rowPtr[i + 1]; p < pEnd; p++) data.push([w.ids[i], w.ids[w.colIdx[p]], String(w.values[p])]);
  }
  return Papa.unparse({ fields: HEADER, data }, { newline: '\n' }) + '\n';
}

function isNumber(cell: string): boolean {
  return /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(cell);
}
