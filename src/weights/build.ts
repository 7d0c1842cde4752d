import type { CsrMatrix } from '../linalg/index.js';
import { InputError, listSome } from '../errors.js';
import type { SpatialWeights, WeightsSpec, WeightsTransform } from './types.js';
import { contiguityNeighbours } from './contiguity.js';
import { higherOrder } from './higher-order.js';
import { EARTH_RADIUS_KM, nearestNeighbours, nearestOther, pointDistance, pointIndex, type PointSet, type TieRule } from './nearest.js';
import { FULL_INVERSE_DISTANCE_LIMIT, allPairsInverseDistance, inverseDistance, pairsWithin } from './distance.js';
import { applyTransform } from './transform.js';
import { LinkList, csrFromLinks } from './pattern.js';
import { checkIds, checkedPoints, distanceUnit, plain, type WeightsInput } from './input.js';
import { formatCount } from '../core/count.js';

export interface BuildOptions {
  /** default 'row' */
  transform?: WeightsTransform;
  /** link every area without neighbours to its nearest area (both ways) */
  linkUnneighboured?: boolean;
}

interface Built {
  /** weights before the transform */
  base: CsrMatrix;
  symmetric: boolean;
  description: string;
  greatCircle?: boolean;
  allLinkedDistance?: number;
  linkedUnneighboured?: string[];
  tiesDecided?: number;
  notes?: string[];
}

/** Spatial weights for the areas under one neighbour rule, then transformed (row-standardised by default). */
export function buildWeights(input: WeightsInput, spec: WeightsSpec, opts: BuildOptions = {}): SpatialWeights {
  checkIds(input.ids);
  const transform = opts.transform ?? 'row';
  if (transform !== 'row' && transform !== 'binary') {
    throw new InputError(`Unknown weights transform "${String(transform)}"; use "row" or "binary".`);
  }
  let built: Built;
  switch (spec.method) {
    case 'queen':
    case 'rook':
      built = contiguity(input, spec, opts);
      break;
    case 'knn':
      built = kNearest(input, spec.k, spec.ties ?? 'lower-row');
      break;
    case 'band':
      built = distanceBased(input, spec.distance, null, opts);
      break;
    case 'idw':
      built = distanceBased(input, spec.cutoff, spec.power, opts);
      break;
    default:
      throw new InputError(`Unknown neighbour rule "${String((spec as { method: unknown }).method)}".`);
  }
  const w = applyTransform(built.base, transform);
  const result: SpatialWeights = {
    ...w,
    ids: input.ids,
    description: `${built.description}; ${transform === 'row' ? 'rows standardised to sum to 1' : 'every link weighs 1'}`,
    spec,
    transform,
    symmetricBase: built.symmetric ? built.base : null,
  };
  if (built.greatCircle !== undefined) result.greatCircle = built.greatCircle;
  if (built.allLinkedDistance !== undefined) result.allLinkedDistance = built.allLinkedDistance;
  if (built.linkedUnneighboured) result.linkedUnneighboured = built.linkedUnneighboured;
  if (built.tiesDecided !== undefined) result.tiesDecided = built.tiesDecided;
  if (built.notes) result.notes = built.notes;
  return result;
}

function contiguity(input: WeightsInput, spec: Extract<WeightsSpec, { method: 'queen' | 'rook' }>, opts: BuildOptions): Built {
  const n = input.ids.length;
  if (input.geometries.length !== n) {
    throw new InputError(`There are ${formatCount(n)} areas but ${formatCount(input.geometries.length)} geometries; every area needs its boundary.`);
  }
  const rule = spec.method;
  // points have no boundaries to share: the rule cannot apply, whatever their layout
  const pointCount = input.geometries.filter((g) => g?.kind === 'point').length;
  if (pointCount > 0) {
    const pts = checkedPoints(input, 'contiguity');
    let needed = 0;
    for (const d of nearestOther(pts).distance) needed = Math.max(needed, d);
    throw new InputError(
      `${rule === 'queen' ? 'Queen' : 'Rook'} contiguity needs areas with boundaries, but ${pointCount === n ? 'every area is a point' : `${formatCount(pointCount)} of the ${formatCount(n)} areas are points`}: ` +
        `points never share a border. Use k-nearest neighbours (e.g. --weights knn:6) or a distance band ` +
        `(--weights band:${plain(needed)}, the distance in ${distanceUnit(pts)} at which every area has a neighbour).`,
    );
  }
  // a tolerance across the whole map would link every pair: refused before the n² links are made
  const shape = spec.tolerance ? layerShape(input.geometries) : null;
  if (shape && spec.tolerance! >= shape.diagonal && n >= 4) throw everyPairByTolerance(spec.tolerance!, rule, shape.extent);
  let pattern = contiguityNeighbours(input.geometries, rule, spec.tolerance, input.coordinates === 'geographic');
  const notes: string[] = [];
  if (shape) checkTolerance(spec.tolerance!, shape, pattern, rule, notes);
  let description =
    rule === 'queen'
      ? 'queen contiguity (areas sharing at least one boundary point)'
      : 'rook contiguity (areas sharing a stretch of boundary)';
  if (spec.tolerance) description += `, gaps up to ${plain(spec.tolerance)} coordinate units bridged`;
  // points only matter for areas without neighbours
  const points = () => checkedPoints(input, 'contiguity');
  if (pattern.rowPtr[n] === 0) {
    const pts = points();
    const { distance } = nearestOther(pts);
    let needed = 0;
    for (const d of distance) needed = Math.max(needed, d);
    throw new InputError(
      `No area has a neighbour under ${rule} contiguity: no two boundaries ${rule === 'queen' ? 'touch' : 'share a stretch of border'}. ` +
        `If the areas are points or do not touch, try a distance band of at least ${plain(needed)} ${distanceUnit(pts)} ` +
        `(the distance at which every area has a neighbour) or k-nearest neighbours.`,
    );
  }
  let linkedUnneighboured: string[] | undefined;
  if (opts.linkUnneighboured) {
    const linked = linkToNearest(pattern, points, input.ids, () => 1);
    if (linked.ids.length > 0) {
      pattern = linked.pattern;
      linkedUnneighboured = linked.ids;
      description += `; ${unneighbouredNote(linked.ids)}`;
    }
  }
  const order = spec.order ?? 1;
  if (order !== 1) {
    pattern = higherOrder(pattern, order, spec.cumulative ?? false);
    description = spec.cumulative
      ? `neighbours up to ${order} steps away by ${description}`
      : `neighbours exactly ${order} steps away by ${description}`;
  }
  return { base: pattern, symmetric: true, description, linkedUnneighboured, ...(notes.length ? { notes } : {}) };
}

/** The largest distance between any two of the points (an upper bound: the diagonal of their box, or half the Earth's circumference). */
function spread(pts: PointSet): number {
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (let i = 0; i < pts.x.length; i++) {
    minX = Math.min(minX, pts.x[i]);
    maxX = Math.max(maxX, pts.x[i]);
    minY = Math.min(minY, pts.y[i]);
    maxY = Math.max(maxY, pts.y[i]);
  }
  if (!pts.greatCircle) return Math.hypot(maxX - minX, maxY - minY);
  const probe: PointSet = { x: Float64Array.of(minX, maxX), y: Float64Array.of(minY, maxY), greatCircle: true };
  return pointDistance(probe, 0, 1);
}

function everyPairByBand(reach: number, unit: string, pts: PointSet, largest: number): InputError {
  return new InputError(
    `Under a distance band of ${plain(reach)} ${unit}, every area is a neighbour of every other (the areas lie within ${plain(spread(pts))} ${unit} of one another), ` +
      'so the neighbours carry no geography and there is no spatial pattern to test. ' +
      `Use a smaller distance; at ${plain(largest)} ${unit} every area has a neighbour.`,
  );
}

interface LayerShape {
  extent: string;
  diagonal: number;
  /** the median of the areas' smaller box side */
  typicalWidth: number;
}

function layerShape(geometries: WeightsInput['geometries']): LayerShape {
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  const widths: number[] = [];
  for (const g of geometries) {
    if (g.kind !== 'polygon') continue;
    let a = Infinity, b = Infinity, c = -Infinity, d = -Infinity;
    for (const polygon of g.polygons) for (const [x, y] of polygon[0]) {
      if (x < a) a = x;
      if (y < b) b = y;
      if (x > c) c = x;
      if (y > d) d = y;
    }
    widths.push(Math.min(c - a, d - b));
    minX = Math.min(minX, a);
    minY = Math.min(minY, b);
    maxX = Math.max(maxX, c);
    maxY = Math.max(maxY, d);
  }
  widths.sort((p, q) => p - q);
  return {
    extent: `${plain(maxX - minX)} by ${plain(maxY - minY)} coordinate units`,
    diagonal: Math.hypot(maxX - minX, maxY - minY),
    typicalWidth: widths.length ? widths[Math.floor(widths.length / 2)] : 0,
  };
}

function everyPairByTolerance(tolerance: number, rule: string, extent: string): InputError {
  return new InputError(
    `With a snapping tolerance of ${plain(tolerance)}, every area is a ${rule} neighbour of every other (the whole map spans ${extent}), ` +
      'so the neighbours carry no geography. The tolerance is meant to bridge slivers and small gaps: give a small fraction of an area\'s width, in coordinate units.',
  );
}

/**
 * A snapping tolerance bridges slivers and small gaps. One that links every pair of areas is refused;
 * one larger than half the width of a typical area is noted (areas that do not touch get linked).
 */
function checkTolerance(tolerance: number, shape: LayerShape, pattern: CsrMatrix, rule: string, notes: string[]): void {
  const n = pattern.n;
  if (n >= 4 && pattern.rowPtr[n] === n * (n - 1)) throw everyPairByTolerance(tolerance, rule, shape.extent);
  if (shape.typicalWidth > 0 && tolerance > shape.typicalWidth / 2) {
    notes.push(
      `The snapping tolerance ${plain(tolerance)} is more than half the width of a typical area (${plain(shape.typicalWidth)} coordinate units), ` +
        'so areas that do not touch are linked as neighbours; it is meant for slivers and small gaps.',
    );
  }
}

function kNearest(input: WeightsInput, k: number, ties: TieRule): Built {
  const n = input.ids.length;
  if (!Number.isInteger(k) || k < 1) throw new InputError(`The number of nearest neighbours must be a whole number, 1 or more; got ${k}.`);
  if (k >= n) {
    throw new InputError(`${k} nearest neighbours need more than ${formatCount(k)} areas; there are ${formatCount(n)}. Choose k of at most ${formatCount(n - 1)}.`);
  }
  const pts = checkedPoints(input, 'k-nearest neighbours');
  if (ties !== 'lower-row' && ties !== 'include') {
    throw new InputError(`Ties among nearest neighbours are either "lower-row" or "include"; got "${String(ties)}".`);
  }
  const { pattern, tiesDecided } = nearestNeighbours(pts, k, undefined, ties);
  let description = `${k} nearest neighbour${k === 1 ? '' : 's'} by ${pts.greatCircle ? 'great-circle' : 'straight-line'} distance between representative points`;
  description += ties === 'include'
    ? '; every area tied at the k-th distance included'
    : '; ties at the k-th distance go to the lower row';
  return { base: pattern, symmetric: false, greatCircle: pts.greatCircle, description, tiesDecided };
}

/** Distance band (power null: every link 1) or inverse distance d^(−power) within an optional cutoff. */
function distanceBased(input: WeightsInput, reach: number | undefined, power: number | null, opts: BuildOptions): Built {
  const n = input.ids.length;
  const what = power === null ? 'a distance band' : 'inverse distance';
  const pts = checkedPoints(input, what);
  const unit = distanceUnit(pts);
  if (power !== null && !(Number.isFinite(power) && power > 0)) {
    throw new InputError(`The inverse-distance power must be a number above 0 (1 and 2 are usual); got ${power}.`);
  }
  if (reach !== undefined && !(Number.isFinite(reach) && reach > 0)) {
    throw new InputError(`The ${power === null ? 'band distance' : 'cutoff distance'} must be a number above 0 (in ${unit}); got ${reach}.`);
  }
  if (power === null && reach === undefined) throw new InputError('A distance band needs a distance.');
  const index = pointIndex(pts);
  const nearest = nearestOther(pts, index);
  let smallest = Infinity, largest = 0;
  for (let i = 0; i < n; i++) {
    smallest = Math.min(smallest, nearest.distance[i]);
    largest = Math.max(largest, nearest.distance[i]);
  }
  const weight = power === null ? () => 1 : (d: number, i: number, j: number) => inverseDistance(d, power, input.ids, i, j);

  let base: CsrMatrix;
  if (reach === undefined) {
    if (n > FULL_INVERSE_DISTANCE_LIMIT) {
      throw new InputError(
        `Inverse-distance weights between all ${formatCount(n)} areas would link every pair (${formatCount(n)} × ${formatCount(n - 1)} links). ` +
          `Give a cutoff distance; ${plain(largest)} ${unit} is the smallest that gives every area a neighbour.`,
      );
    }
    base = allPairsInverseDistance(pts, power as number, input.ids);
  } else {
    // every pair certainly within the band: refused before the n² links are made
    if (power === null && n >= 4 && (pts.greatCircle ? reach >= Math.PI * EARTH_RADIUS_KM : reach >= spread(pts))) throw everyPairByBand(reach, unit, pts, largest);
    base = pairsWithin(pts, index, reach, weight, (links) => {
      throw new InputError(
        `${power === null ? 'A distance band' : 'An inverse-distance cut-off'} of ${plain(reach)} ${unit} links more than ${(links / 1e6).toFixed(0)} million pairs of areas ` +
          `(more than ${formatCount(Math.floor(links / n))} neighbours per area on average), too many to hold or to mean anything local. ` +
          `Use a smaller distance; at ${plain(largest)} ${unit} every area has a neighbour.`,
      );
    });
    if (power === null && n >= 4 && base.rowPtr[n] === n * (n - 1)) throw everyPairByBand(reach, unit, pts, largest);
    if (base.rowPtr[n] === 0) {
      throw new InputError(
        `No two areas are within ${plain(reach)} ${unit} of each other, so ${what} of that size links nothing. ` +
          `The closest pair is ${plain(smallest)} ${unit} apart; at ${plain(largest)} ${unit} every area has at least one neighbour.`,
      );
    }
  }
  let description =
    power === null
      ? `distance band: areas within ${plain(reach as number)} ${unit}`
      : `inverse distance, weight = distance^(−${plain(power)})${reach === undefined ? ' between all pairs' : `, up to ${plain(reach)} ${unit}`}`;
  description += ` (${pts.greatCircle ? 'great-circle' : 'straight-line'} distance between representative points; every area has a neighbour from ${plain(largest)} ${unit})`;
  let linkedUnneighboured: string[] | undefined;
  if (opts.linkUnneighboured) {
    const linked = linkToNearest(base, () => pts, input.ids, (i, j) => weight(pointDistance(pts, i, j), i, j), nearest.nearest);
    if (linked.ids.length > 0) {
      base = linked.pattern;
      linkedUnneighboured = linked.ids;
      description += `; ${unneighbouredNote(linked.ids)}`;
    }
  }
  return { base, symmetric: true, description, greatCircle: pts.greatCircle, allLinkedDistance: largest, linkedUnneighboured };
}

/** Adds a link both ways between every area without neighbours and its nearest area. */
function linkToNearest(
  pattern: CsrMatrix,
  points: () => PointSet,
  ids: string[],
  weight: (i: number, j: number) => number,
  nearest?: Int32Array,
): { pattern: CsrMatrix; ids: string[] } {
  const n = pattern.n;
  const withoutNeighbours: number[] = [];
  for (let i = 0; i < n; i++) if (pattern.rowPtr[i + 1] === pattern.rowPtr[i]) withoutNeighbours.push(i);
  if (withoutNeighbours.length === 0) return { pattern, ids: [] };
  const near = nearest ?? nearestOther(points()).nearest;
  const links = new LinkList();
  for (let i = 0; i < n; i++) {
    for (let p = pattern.rowPtr[i], pEnd = pattern.rowPtr[i + 1]; p < pEnd; p++) links.push(i, pattern.colIdx[p], pattern.values[p]);
  }
  for (const i of withoutNeighbours) links.pushBoth(i, near[i], weight(i, near[i]));
  return { pattern: csrFromLinks(n, links), ids: withoutNeighbours.map((i) => ids[i]) };
}

function unneighbouredNote(ids: string[]): string {
  return `${formatCount(ids.length)} area${ids.length === 1 ? '' : 's'} without neighbours linked to the nearest area: ${listSome(ids)}`;
}
