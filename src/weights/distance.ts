import type KDBush from 'kdbush';
import type { CsrMatrix } from '../linalg/index.js';
import { InputError } from '../errors.js';
import { LinkList, csrFromLinks } from './pattern.js';
import { EARTH_RADIUS_KM, pointDistance, type PointSet } from './nearest.js';
import { TreeSearch } from './tree-search.js';

/** Largest number of areas for inverse-distance weights over all pairs (n² links) without a cutoff. */
export const FULL_INVERSE_DISTANCE_LIMIT = 5000;

/**
 * Every pair within `reach` (inclusive), value = weight(distance). Each pair is measured once
 * (from the lower index) and stored both ways, so the result is exactly symmetric.
 */
/** Most links a distance rule may make (directed): about 400 MB of neighbour table, far past any useful band. */
export const MAX_DISTANCE_LINKS = 25_000_000;

export function pairsWithin(pts: PointSet, index: KDBush, reach: number, weight: (d: number, i: number, j: number) => number, onTooMany?: (links: number) => never): CsrMatrix {
  const n = pts.x.length;
  const links = new LinkList();
  const search = new TreeSearch(index, pts.greatCircle);
  const maxKey = search.radiusKey(reach, EARTH_RADIUS_KM);
  let count = 0;
  for (let i = 0; i < n; i++) {
    for (const j of search.within(pts.x[i], pts.y[i], i, maxKey)) {
      if (j > i) {
        links.pushBoth(i, j, weight(pointDistance(pts, i, j), i, j));
        count += 2;
      }
    }
    if (count > MAX_DISTANCE_LINKS && onTooMany) onTooMany(count);
  }
  return csrFromLinks(n, links);
}

/** Inverse-distance weights d^(−power) between all pairs: a full matrix without the diagonal. */
export function allPairsInverseDistance(pts: PointSet, power: number, ids: string[]): CsrMatrix {
  const n = pts.x.length;
  const rowPtr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) rowPtr[i + 1] = rowPtr[i] + n - 1;
  const colIdx = new Int32Array(n * (n - 1));
  const values = new Float64Array(n * (n - 1));
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const v = inverseDistance(pointDistance(pts, i, j), power, ids, i, j);
      // row i skips column i; row j skips column j
      const pij = rowPtr[i] + j - 1;
      const pji = rowPtr[j] + i;
      colIdx[pij] = j;
      values[pij] = v;
      colIdx[pji] = i;
      values[pji] = v;
    }
  }
  return { n, rowPtr, colIdx, values };
}

export function inverseDistance(d: number, power: number, ids: string[], i: number, j: number): number {
  if (d === 0) {
    throw new InputError(
      `Areas ${ids[i]} and ${ids[j]} have the same location, so their inverse distance is infinite. ` +
        `Merge or remove one of them, or use contiguity or k-nearest neighbours instead.`,
      { feature: ids[j] },
    );
  }
  return Math.pow(d, -power);
}
