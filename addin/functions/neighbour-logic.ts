/**
 * Neighbour ranges built in cells: from coordinate columns (k nearest, a distance band, inverse
 * distance), or by shared borders from the boundary file the sidebar kept in the workbook. Both
 * spill a header row and one row per directed link — origin ID, neighbour ID, weight — the same
 * layout as the neighbour sheet, so the result can feed any function that takes neighbours.
 * The rules are the engine's (src/weights); this file reads ranges and lays out the answer.
 */
import { InputError } from '../../src/errors.js';
import { readBoundary, type AreaGeometry, type NamedBytes } from '../../src/geo/index.js';
import { buildWeights, type SpatialWeights, type WeightsSpec } from '../../src/weights/index.js';
import { parseOptions, type OptionsArgument } from './options.js';
import { flatten, hasHeader, idText, readIds, readNumbers, trimTogether, type Grid } from './ranges.js';
import { formatCount } from '../../src/core/index.js';

export const LINK_HEADER = ['origin', 'neighbour', 'weight'] as const;

/** Rows of origin, neighbour, weight under a header, in the order of the areas. */
export function linkRows(w: SpatialWeights): (string | number)[][] {
  const out: (string | number)[][] = [[...LINK_HEADER]];
  for (let i = 0; i < w.n; i++) {
    for (let p = w.rowPtr[i]; p < w.rowPtr[i + 1]; p++) out.push([w.ids[i], w.ids[w.colIdx[p]], w.values[p]]);
  }
  return out;
}

const RULE_WORDS: Record<string, 'knn' | 'band' | 'idw'> = {
  nearest: 'knn', knn: 'knn', 'k nearest': 'knn', 'k-nearest': 'knn',
  within: 'band', band: 'band', distance: 'band', 'distance band': 'band',
  inverse: 'idw', 'inverse distance': 'idw', idw: 'idw',
};

/**
 * Links from coordinate columns. `rule` is "nearest" (size = how many, default 6), "within"
 * (size = the distance, required) or "inverse" (size = the power, default 1; "cutoff=D" limits the
 * reach). Options: "degrees" (longitude/latitude: great-circle km), "binary" (every link weighs 1;
 * by default each area's weights sum to 1), "ties" (k nearest: keep every area tied at the k-th
 * distance), "link unneighboured" (link an area with no neighbour to its nearest area).
 */
export function neighbourRowsFromPoints(
  ids: Grid, x: Grid, y: Grid, rule?: string, size?: number, options?: OptionsArgument,
): (string | number)[][] {
  const [ir, xr, yr] = trimTogether([ids, x, y], ['The ID range', 'The x range', 'The y range']);
  let idCells = flatten(ir, 'The ID range');
  let xs = flatten(xr, 'The x range');
  let ys = flatten(yr, 'The y range');
  if (idCells.length !== xs.length || idCells.length !== ys.length) {
    throw new InputError(`The ID, x and y ranges have ${formatCount(idCells.length)}, ${formatCount(xs.length)} and ${formatCount(ys.length)} cells; select the same rows for all three.`);
  }
  let offset = 1;
  if (hasHeader(xs) || hasHeader(ys)) {
    idCells = idCells.slice(1); xs = xs.slice(1); ys = ys.slice(1);
    offset = 2;
  }
  const o = parseOptions(options, { flags: ['degrees', 'planar', 'binary', 'standardise', 'ties', 'link unneighboured'], numbers: ['cutoff'] });
  if (o.flags.has('degrees') && o.flags.has('planar')) throw new InputError('The options say both "degrees" and "planar"; choose one.');
  const kind = RULE_WORDS[String(rule ?? 'nearest').trim().toLowerCase()];
  if (!kind) throw new InputError(`The rule "${rule}" is not known; use "nearest" (k nearest areas), "within" (a distance band) or "inverse" (inverse distance).`);
  if (o.numbers.has('cutoff') && kind !== 'idw') throw new InputError('A cutoff applies to inverse distance only; for a distance band give the distance as the size.');
  let spec: WeightsSpec;
  if (kind === 'knn') spec = { method: 'knn', k: size ?? 6, ...(o.flags.has('ties') ? { ties: 'include' as const } : {}) };
  else if (kind === 'band') {
    if (size === undefined || size === null) throw new InputError('A distance band needs its distance as the size argument (in the units of the coordinates, or km with "degrees").');
    spec = { method: 'band', distance: size };
  } else spec = { method: 'idw', power: size ?? 1, ...(o.numbers.has('cutoff') ? { cutoff: o.numbers.get('cutoff') } : {}) };
  if (kind === 'idw' && o.flags.has('binary')) throw new InputError('Inverse-distance weights with every link set to 1 are a distance band; use the rule "within" instead.');
  const areaIds = readIds(idCells, offset);
  const points = { x: readNumbers(xs, offset, 'the x range'), y: readNumbers(ys, offset, 'the y range') };
  const geometries: AreaGeometry[] = areaIds.map((_, i) => ({ kind: 'point', point: [points.x[i], points.y[i]] }));
  const w = buildWeights(
    { ids: areaIds, geometries, coordinates: o.flags.has('degrees') ? 'geographic' : 'projected', points },
    spec,
    { transform: o.flags.has('binary') ? 'binary' : 'row', linkUnneighboured: o.flags.has('link unneighboured') },
  );
  return linkRows(w);
}

/** A parsed boundary layer kept between recalculations, keyed by a fingerprint of its bytes. */
let kept: { key: string; layer: Awaited<ReturnType<typeof readBoundary>> } | null = null;

function fingerprint(files: readonly NamedBytes[]): string {
  let h = 0x811c9dc5;
  for (const f of files) {
    for (let i = 0; i < f.bytes.length; i++) h = Math.imul(h ^ f.bytes[i], 0x01000193);
    h = Math.imul(h ^ f.bytes.length, 0x01000193);
  }
  return `${files.map((f) => `${f.name}:${f.bytes.length}`).join('|')}#${(h >>> 0).toString(16)}`;
}

/**
 * Contiguity links among the areas of the ID range from the boundary files kept in the workbook.
 * The boundary property holding the IDs is `idProperty`, else the one the sidebar's last run used
 * (`remembered`), else the one that holds the most of them (refused when several tie).
 * Options: "binary" (every link weighs 1), "link unneighboured"; `rule` is "queen" (shared border or
 * corner, the default) or "rook" (shared border only); "order=K" links the areas exactly K steps
 * away (order=2: neighbours of neighbours that are not neighbours themselves), and with "cumulative"
 * every area up to K steps away.
 */
export async function contiguityRows(
  files: readonly NamedBytes[] | null, ids: Grid, rule?: string, idProperty?: string, options?: OptionsArgument, remembered?: string,
): Promise<(string | number)[][]> {
  if (!files || files.length === 0) {
    throw new InputError('This workbook keeps no boundary file yet: run Spillway once from the sidebar with a boundary file (it is then kept in the workbook), or build neighbours from coordinates with SPILL.NEIGHBOURS.');
  }
  const [ir] = trimTogether([ids], ['The ID range']);
  let cells = flatten(ir, 'The ID range');
  let offset = 1;
  const key = fingerprint(files);
  if (kept?.key !== key) kept = { key, layer: await readBoundary([...files]) };
  const layer = kept.layer;
  const o = parseOptions(options, { flags: ['binary', 'standardise', 'cumulative', 'link unneighboured'], numbers: ['order'] });
  const words: Record<string, 'queen' | 'rook'> = { queen: 'queen', corner: 'queen', corners: 'queen', rook: 'rook', border: 'rook', borders: 'rook', edge: 'rook' };
  const method = words[String(rule ?? 'queen').trim().toLowerCase()];
  if (!method) throw new InputError(`The rule "${rule}" is not known; use "queen" (a shared border or corner) or "rook" (a shared stretch of border).`);
  const asked = idProperty !== undefined && idProperty !== null && String(idProperty).trim() !== '' ? idProperty
    : remembered && layer.propertyNames.includes(remembered) ? remembered : undefined;
  const property = chooseProperty(layer, cells.map(idText), asked);
  const byId = new Map<string, number>();
  layer.areas.forEach((a, k) => {
    const v = a.properties[property];
    if (v !== null && v !== undefined && String(v).trim() !== '') byId.set(idText(v as string | number), k);
  });
  // a header row: a first cell that is no area's ID
  if (cells.length > 1 && !byId.has(idText(cells[0])) && byId.has(idText(cells[1]))) { cells = cells.slice(1); offset = 2; }
  const areaIds = readIds(cells, offset);
  const geometries: AreaGeometry[] = areaIds.map((id, i) => {
    const k = byId.get(id);
    if (k === undefined) throw new InputError(`Cell ${i + offset} of the ID range holds ${id}, which no area of the kept boundary file ${layer.sourceName} has as its ${property}.`, { row: i + offset, feature: id });
    const g = layer.areas[k].geometry;
    if (!g) throw new InputError(`The area ${id} (feature ${layer.areas[k].feature} of ${layer.sourceName}) has no shape, so it cannot have neighbours by shared borders.`, { feature: id });
    return g;
  });
  const order = o.numbers.get('order') ?? 1;
  if (!Number.isInteger(order) || order < 1 || order > 10) throw new InputError(`The order must be a whole number from 1 to 10; got ${order}.`);
  if (o.flags.has('cumulative') && !o.numbers.has('order')) throw new InputError('"cumulative" goes with "order=K" (every area up to K steps away), e.g. "order=2, cumulative".');
  const w = buildWeights(
    { ids: areaIds, geometries, coordinates: layer.coordinates },
    { method, order, cumulative: o.flags.has('cumulative') },
    { transform: o.flags.has('binary') ? 'binary' : 'row', linkUnneighboured: o.flags.has('link unneighboured') },
  );
  return linkRows(w);
}

function chooseProperty(layer: { propertyNames: string[]; areas: { properties: Record<string, unknown> }[]; sourceName: string }, ids: string[], asked?: string): string {
  if (asked !== undefined && asked !== null && String(asked).trim() !== '') {
    const name = String(asked).trim();
    if (!layer.propertyNames.includes(name)) throw new InputError(`The kept boundary file ${layer.sourceName} has no property "${name}"; it has ${layer.propertyNames.join(', ')}.`);
    return name;
  }
  const wanted = new Set(ids.filter((s) => s !== ''));
  let best: string[] = [];
  let bestCount = 0;
  for (const name of layer.propertyNames) {
    // distinct IDs matched, so that a yes/no column holding "1" everywhere does not win
    const matched = new Set<string>();
    for (const a of layer.areas) {
      const v = a.properties[name];
      if (v !== null && v !== undefined && wanted.has(idText(v as string | number))) matched.add(idText(v as string | number));
    }
    const count = matched.size;
    if (count > bestCount) { best = [name]; bestCount = count; }
    else if (count === bestCount && count > 0) best.push(name);
  }
  if (best.length > 1) {
    throw new InputError(`Several properties of the kept boundary file ${layer.sourceName} hold these IDs (${best.join(', ')}); name the one that identifies the areas as the last argument, e.g. "${best[0]}".`);
  }
  if (!best.length) throw new InputError(`No property of the kept boundary file ${layer.sourceName} holds the IDs of the ID range (it has ${layer.propertyNames.join(', ')}); check the IDs or name the property.`);
  return best[0];
}
