import type { AnalysisResult } from '../pipeline/types.js';
import type { Block, Cell, TableColumn } from './types.js';
import { num } from './format.js';
import { fittedInOrder } from '../models/index.js';
import { withheldOutcome } from './withheld.js';

/** One row per area, keyed by ID, in the table's row order. */
export function areasBlocks(result: AnalysisResult): Block[] {
  const y = result.request.y;
  const fits = fittedInOrder(result.fits).map(({ entry, fit }) => ({ label: entry.label, fitted: fit.fitted, residuals: fit.residuals, lag: fit.residualLag }));
  const columns: TableColumn[] = [
    { header: 'Area ID', format: 'text', width: 14 },
    { header: 'Table row', format: 'integer', width: 9 },
    { header: `Observed ${y}`, format: 'decimal4', width: 14 },
  ];
  for (const f of fits) {
    columns.push(
      { header: `${f.label}: fitted`, format: 'decimal4', width: 14 },
      { header: `${f.label}: residual`, format: 'decimal4', width: 14 },
      { header: `${f.label}: neighbours' average residual`, format: 'decimal4', width: 16 },
    );
  }
  // a withheld outcome (a rate of few events, blanked for privacy) takes its residuals with it: fitted + residual would give it back
  const withheld = withheldOutcome(result);
  const rows: Cell[][] = result.ids.map((id, i) => {
    const hide = withheld?.[i] ?? false;
    const row: Cell[] = [id, result.rows[i], hide ? null : num(result.y[i])];
    for (const f of fits) row.push(num(f.fitted[i]), hide ? null : num(f.residuals[i]), num(f.lag[i]));
    return row;
  });
  return [{
    kind: 'table', title: `Each area: observed ${y}, fitted values and residuals`, columns, rows,
    note: "The neighbours' average residual is the spatial lag of the residual: the weighted sum of the neighbours' residuals under the weights used." +
      (withheld ? ' The observed value and residuals of areas flagged for few events are withheld for privacy (blank).' : ''),
  }];
}
