import type { CsrMatrix } from '../linalg/index.js';
import { InputError } from '../errors.js';
import type { SpatialWeights } from './types.js';
import { applyTransform } from './transform.js';
import { formatCount } from '../core/count.js';

/**
 * Weights on the areas `keep` (indices into w, in the new order). Links to dropped areas go;
 * row-standardised weights are standardised again over the remaining links (row scaling commutes
 * with dropping columns, so this equals standardising the subset of the original weights).
 */
export function subsetWeights(w: SpatialWeights, keep: number[]): SpatialWeights {
  const newIndex = new Int32Array(w.n).fill(-1);
  keep.forEach((old, k) => {
    if (!Number.isInteger(old) || old < 0 || old >= w.n) throw new InputError(`Cannot keep area number ${old}: there are ${formatCount(w.n)} areas.`);
    if (newIndex[old] >= 0) throw new InputError(`Area ${w.ids[old]} is listed twice among the areas to keep.`, { feature: w.ids[old] });
    newIndex[old] = k;
  });
  const cut = (m: CsrMatrix): CsrMatrix => {
    const m2 = keep.length;
    const rowPtr = new Int32Array(m2 + 1);
    const cols: number[] = [];
    const vals: number[] = [];
    keep.forEach((old, k) => {
      const row: [number, number][] = [];
      for (let p = m.rowPtr[old], pEnd = m.rowPtr[old + 1]; p < pEnd; p++) {
        const c = newIndex[m.colIdx[p]];
        if (c >= 0) row.push([c, m.values[p]]);
      }
      row.sort((a, b) => a[0] - b[0]);
      for (const [c, v] of row) {
        cols.push(c);
        vals.push(v);
      }
      rowPtr[k + 1] = cols.length;
    });
    return { n: m2, rowPtr, colIdx: Int32Array.from(cols), values: Float64Array.from(vals) };
  };
  const sub = cut(w);
  const values = w.transform === 'row' ? applyTransform(sub, 'row').values : sub.values;
  const dropped = w.n - keep.length;
  return {
    ...w,
    ...sub,
    values,
    ids: keep.map((i) => w.ids[i]),
    description: dropped > 0 ? `${w.description}; ${formatCount(dropped)} area${dropped === 1 ? '' : 's'} left out` : w.description,
    symmetricBase: w.symmetricBase ? cut(w.symmetricBase) : null,
    ...(w.linkedUnneighboured ? { linkedUnneighboured: w.linkedUnneighboured.filter((id) => keep.some((i) => w.ids[i] === id)) } : {}),
  };
}
