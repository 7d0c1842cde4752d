import type { AnalysisResult } from '../pipeline/types.js';
import type { Block, Cell, TableColumn } from './types.js';
import { num } from './format.js';
import { fittedInOrder, inSentence, type ModelEntry } from '../models/index.js';
import { withheldOutcome } from './withheld.js';

/** The leading columns of every per-area table: the ID, the label column when one was chosen, the table row. */
export function areaKeyColumns(result: AnalysisResult): TableColumn[] {
  return [
    { header: 'Area ID', format: 'text', width: 10 },
    ...(result.labels ? [{ header: result.request.label ?? 'Name', format: 'text', width: 14 } satisfies TableColumn] : []),
    { header: 'Table row', format: 'integer', width: 7 },
  ];
}

/** The cells of those columns for area i. */
export function areaKeyCells(result: AnalysisResult, i: number): Cell[] {
  return [result.ids[i], ...(result.labels ? [result.labels[i]] : []), result.rows[i]];
}

/** One row per area, keyed by ID (and label), in the table's row order; each model's figures under its name. */
export function areasBlocks(result: AnalysisResult): Block[] {
  const y = result.request.y;
  const fitted = fittedInOrder(result.fits);
  const fits = fitted.map(({ entry, fit }) => ({ label: entry.label, fitted: fit.fitted, residuals: fit.residuals, lag: fit.residualLag }));
  const columns: TableColumn[] = [...areaKeyColumns(result), { header: `Observed ${y}`, format: 'decimal4', width: 11 }];
  for (const f of fits) {
    columns.push(
      { header: 'Fitted', format: 'decimal4', width: 10, group: f.label },
      { header: 'Residual', format: 'decimal4', width: 10, group: f.label },
      { header: "Neighbours' average residual", format: 'decimal4', width: 11, group: f.label },
    );
  }
  // a withheld outcome (a rate of few events, blanked for privacy) takes its residuals with it: fitted + residual would give it back
  const withheld = withheldOutcome(result);
  const rows: Cell[][] = result.ids.map((_, i) => {
    const hide = withheld?.[i] ?? false;
    const row: Cell[] = [...areaKeyCells(result, i), hide ? null : num(result.y[i])];
    for (const f of fits) row.push(num(f.fitted[i]), hide ? null : num(f.residuals[i]), num(f.lag[i]));
    return row;
  });
  return [{
    kind: 'table', title: `Each area: observed ${y}, fitted values and residuals`, columns, rows,
    note: "The neighbours' average residual is the spatial lag of the residual: the weighted sum of the neighbours' residuals under the weights used." +
      fittedNote(fitted.map(({ entry }) => entry)) +
      (withheld ? ' The observed value and residuals of areas flagged for few events are withheld for privacy (blank).' : ''),
  }];
}

/**
 * Which fitted value a model with a spillover of the outcome (ρWy) shows. Its fitted value is the
 * reduced-form prediction ŷ = (I − ρW)⁻¹Xβ — the trend with the spillover it sets off — while its
 * residual is y − ρWy − Xβ, what is left after the neighbours' observed outcomes (Anselin 1988's
 * convention, as the estimators compute it); so for these models fitted + residual is not the
 * observed value. For the others (no ρ) fitted = Xβ and residual = y − Xβ add up.
 */
export function fittedNote(entries: readonly ModelEntry[]): string {
  const withRho = entries.filter((e) => e.parameters.some((q) => q.key === 'rho'));
  if (!withRho.length) return '';
  const names = withRho.map((e) => `the ${inSentence(e.label)}`);
  const list = names.length === 1 ? names[0] : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
  return ` For ${list}, the fitted value is the prediction from the explanatory columns with the spillover it sets off through the neighbours, (I − ρW)⁻¹Xβ, ` +
    "while the residual is what is left after the neighbours' observed values, y − ρWy − Xβ; so for " +
    `${withRho.length === 1 ? 'this model' : 'these models'} fitted plus residual is not the observed value. For the other models it is.`;
}
