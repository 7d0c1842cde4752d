/** What the areas step lists about matching the table to the boundary file. Pure. */
import type { JoinReport } from '../../src/geo/index.js';
import { some } from './text.js';

/**
 * One line per kind of mismatch. When the join failed, its one error message already names every
 * problem that stops it (blank or repeated IDs, rows without an area, areas without a shape), so
 * the list keeps only what that message leaves out: areas with no row, which do not stop a run.
 */
export function joinProblemLines(j: JoinReport, failed: boolean): string[] {
  const areasWithoutRow = j.unmatchedFeatures.length ? some(j.unmatchedFeatures, (u) => `${u.id} (feature ${u.feature})`) : '';
  if (failed) return areasWithoutRow ? [`Also, areas with no row (not a problem by itself): ${areasWithoutRow}.`] : [];
  const lines: string[] = [];
  if (j.unmatchedRows.length) lines.push(`Rows with no matching area: ${some(j.unmatchedRows, (u) => `row ${u.row} (${u.id})`)}.`);
  if (areasWithoutRow) lines.push(`Areas with no row: ${areasWithoutRow}.`);
  if (j.duplicateRows.length) lines.push(`IDs on more than one row: ${some(j.duplicateRows, (d) => `${d.id} on rows ${d.rows.join(', ')}`)}.`);
  if (j.duplicateFeatures.length) lines.push(`IDs on more than one area: ${some(j.duplicateFeatures, (d) => `${d.id} (features ${d.features.join(', ')})`)}.`);
  if (j.blankRows.length) lines.push(`Rows with no ID: ${some(j.blankRows, (n) => `row ${n}`)}.`);
  if (j.withoutGeometry.length) lines.push(`Matched areas without a shape: ${some(j.withoutGeometry, (g) => `${g.id} (row ${g.row})`)}.`);
  if (j.zeroPaddingSuspects.length) lines.push(`IDs that differ only by leading zeros: ${some(j.zeroPaddingSuspects, (z) => `${z.tableId} / ${z.featureId}`)}. Make them the same in both places.`);
  return lines;
}
