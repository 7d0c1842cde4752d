/**
 * Model cell functions: SPILL.FIT, SPILL.EFFECTS, SPILL.LMTESTS. They recalculate whenever a cell
 * they read changes, like the workbook's own regression function. The JSDoc is read by
 * custom-functions-metadata; the arithmetic is in model-logic.ts.
 */
/* eslint-disable @typescript-eslint/no-explicit-any */
import { associate, guarded } from './cell-error.js';
import { effectsRows, fitRows, lmTestRows } from './model-logic.js';

/**
 * Fits a regression model with neighbours and spills its table: a header, then per term the estimate, standard error, t or z and p; the spatial parameter; the number of areas, log-likelihood and AIC. Recalculates when any input changes. Example on the Vell Basin districts, with =SPILL.TOUCHING(A1:A151) in K1: =SPILL.FIT(C1:C151, D1:F151, A1:A151, K1#, "lag")
 * @customfunction FIT
 * @param y The outcome, one number per area in a single column (a whole column such as C:C works). A text first cell is read as its name.
 * @param x The explanatory columns, one row per area, side by side. A text first row gives the terms' names.
 * @param ids The area IDs, in the same rows as the outcome.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [model] Spelt as the command line's --models, in any letter case: "lag" (the default: the outcome spills over to neighbours), "error" (unmeasured causes shared with neighbours), "ols" (plain regression), "slx" (neighbours' averages of the explanatory columns added), "durbin" (the lag model with those averages), "durbin-error" (the error model with them), "lag-error" (both the outcome and the errors spill over), "lag-iv" (the lag model by instruments) or "error-gm" (the error model by moments).
 * @param [options] Words separated by commas: "as given" (use the weights as listed; by default each area's weights are rescaled to sum to 1), "robust" (standard errors robust to unequal spread, for "ols", "slx" and "lag-iv"; "error-gm" always has them).
 * @returns The coefficient table, spilled: header row, a row per term and the spatial parameter, then areas, log-likelihood and AIC, and a "standard errors" row saying which ones are shown when "robust" is asked for or the model is robust always.
 */
export function fit(y: any[][], x: any[][], ids: any[][], neighbours: any[][], model?: string, options?: string): any[][] {
  return guarded(() => fitRows(y, x, ids, neighbours, model ?? undefined, options ?? undefined));
}

/**
 * Direct, indirect (spillover) and total effects of each explanatory column in a spatial lag model (or another model with spillover effects), each with its standard error and p. Example on the Vell Basin districts, with =SPILL.TOUCHING(A1:A151) in K1: =SPILL.EFFECTS(C1:C151, D1:F151, A1:A151, K1#)
 * @customfunction EFFECTS
 * @param y The outcome, one number per area in a single column (a whole column works). A text first cell is read as its name.
 * @param x The explanatory columns, one row per area, side by side. A text first row gives their names.
 * @param ids The area IDs, in the same rows as the outcome.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [model] "lag" (the default), "slx", "durbin", "durbin-error", "lag-error" or "lag-iv", spelt as for SPILL.FIT; "ols", "error" and "error-gm" have no separate spillover effects (their coefficients are the effects) and are refused with the reason.
 * @param [options] Words separated by commas: "draws=1000" (simulation draws for the standard errors, where they are simulated), "seed=1" (fixes the draws so the result repeats), "as given" (weights as listed instead of rescaled to sum to 1 per area), "robust" (for "slx" and "lag-iv": the effects' standard errors from the covariance robust to unequal spread).
 * @returns A header row, then per explanatory column: direct, its SE and p; indirect, its SE and p; total, its SE and p; and a last row saying how the standard errors were found.
 */
export function effects(y: any[][], x: any[][], ids: any[][], neighbours: any[][], model?: string, options?: string): any[][] {
  return guarded(() => effectsRows(y, x, ids, neighbours, model ?? undefined, options ?? undefined));
}

/**
 * Tests the plain regression's residuals for spatial dependence: Moran's I and the five Lagrange-multiplier tests (statistic, degrees of freedom, p), then which model the tests suggest. Example on the Vell Basin districts, with =SPILL.TOUCHING(A1:A151) in K1: =SPILL.LMTESTS(C1:C151, D1:F151, A1:A151, K1#)
 * @customfunction LMTESTS
 * @param y The outcome, one number per area in a single column (a whole column works). A text first cell is read as its name.
 * @param x The explanatory columns, one row per area, side by side. A text first row gives their names.
 * @param ids The area IDs, in the same rows as the outcome.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [options] "as given" to use the weights as listed; by default each area's weights are rescaled to sum to 1.
 * @returns A header row, a row per test (statistic, degrees of freedom, p), and the suggestion in words.
 */
export function lmTestsCells(y: any[][], x: any[][], ids: any[][], neighbours: any[][], options?: string): any[][] {
  return guarded(() => lmTestRows(y, x, ids, neighbours, options ?? undefined));
}

export function registerModelFunctions(): void {
  associate('FIT', fit);
  associate('EFFECTS', effects);
  associate('LMTESTS', lmTestsCells);
}
