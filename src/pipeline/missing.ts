import { numericColumn, subsetAreas } from '../geo/index.js';
import type { JoinedAreas } from '../geo/types.js';
import { InputError } from '../errors.js';

export interface CleanColumns {
  joined: JoinedAreas;
  values: Map<string, Float64Array>;
  dropped: { row: number; id: string; columns: string[] }[];
}

/**
 * Reads the model's columns as numbers. By default any missing or non-numeric cell stops the run
 * with the rows listed; with `dropMissing` those rows leave the analysis (and so the weights, which
 * are built afterwards on the remaining areas), and are reported.
 */
export function readModelColumns(joined: JoinedAreas, columns: string[], dropMissing: boolean): CleanColumns {
  const raw = new Map<string, Float64Array>();
  for (const c of columns) raw.set(c, numericColumn(joined, c, { allowMissing: dropMissing }));
  if (!dropMissing) return { joined, values: raw, dropped: [] };

  const keep: number[] = [];
  const dropped: CleanColumns['dropped'] = [];
  for (let i = 0; i < joined.ids.length; i++) {
    const bad = columns.filter((c) => !Number.isFinite(raw.get(c)![i]));
    if (bad.length === 0) keep.push(i);
    else dropped.push({ row: joined.rows[i], id: joined.ids[i], columns: bad });
  }
  if (dropped.length === 0) return { joined, values: raw, dropped };
  if (keep.length === 0) {
    throw new InputError(`Every row has a missing value in ${columns.join(', ')}; nothing is left to analyse.`);
  }
  const sub = subsetAreas(joined, keep);
  const values = new Map<string, Float64Array>();
  for (const c of columns) {
    const all = raw.get(c)!;
    values.set(c, Float64Array.from(keep, (i) => all[i]));
  }
  return { joined: sub, values, dropped };
}
