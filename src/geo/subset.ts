/** Restricting a joined set to some of its areas, and a boundary file's attributes as a table. */
import type { AreaLayer, DataTable, JoinedAreas } from './types.js';
import { toCell } from './ids.js';

/** The areas at `keep` (indices into `joined`, in the order given). */
export function subsetAreas(joined: JoinedAreas, keep: number[]): JoinedAreas {
  const n = joined.ids.length;
  for (const i of keep) {
    if (!Number.isInteger(i) || i < 0 || i >= n) throw new RangeError(`subsetAreas: index ${i} is outside 0..${n - 1}`);
  }
  const pick = <T>(all: readonly T[]): T[] => keep.map((i) => all[i]);
  return {
    ...joined,
    ids: pick(joined.ids),
    geometries: pick(joined.geometries),
    rows: pick(joined.rows),
    column: (name: string) => pick(joined.column(name)),
    columnNames: [...joined.columnNames],
    warnings: [...joined.warnings],
  };
}

/** The boundary file's own properties as a table: one row per feature, row k = feature k. */
export function tableFromLayer(layer: AreaLayer): DataTable {
  const columns = [...layer.propertyNames];
  return {
    sourceName: layer.sourceName,
    columns,
    rows: layer.areas.map((a) => columns.map((c) => toCell(a.properties[c]))),
    firstRow: 1,
    rowNumbers: layer.areas.map((a) => a.feature),
    rowsAreFeatures: true,
  };
}
