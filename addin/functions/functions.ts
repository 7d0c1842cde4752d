/**
 * Cell functions (namespace SPILL, set in the manifest). Thin wrappers: the JSDoc below is read by
 * custom-functions-metadata to make functions.json (with the other *-functions.ts files here); the
 * arithmetic lives in logic.ts. Every function takes the neighbours as a range of links (origin ID,
 * neighbour ID, weight), as on the neighbour sheet the sidebar writes, or as an n × n weights matrix
 * (neighbour-range.ts), plus the ID column that puts the values in order.
 */
/* eslint-disable @typescript-eslint/no-explicit-any */
import { associate, guarded } from './cell-error.js';
import {
  gearyOfRange, lagOfRange, localMoranOfRange, moranOfRange, moranPermutationP,
} from './logic.js';
import { giStarRows, localMoranRows } from './local-logic.js';
import { registerModelFunctions } from './model-functions.js';
import { registerNeighbourFunctions } from './neighbour-functions.js';
import { globalRateRows, localRateRows, rateMoranRow } from './rate-logic.js';

/**
 * Moran's I of a column of values: how much neighbouring areas resemble each other. Example on the Vell Basin districts, with =SPILL.TOUCHING(A1:A151) in K1: =SPILL.MORAN(C1:C151, A1:A151, K1#, TRUE)
 * @customfunction MORAN
 * @param values One number per area, in a single column (a whole column such as B:B works: blank rows at the end are left out). A text first cell is read as a header.
 * @param ids The area IDs, in the same rows as the values.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [detail] TRUE to spill four cells across: the statistic, its expected value, z and the two-sided p-value.
 * @param [rowStandardise] TRUE to rescale each area's weights to sum to 1; by default the weights are used as listed.
 * @returns Moran's I, or a row of four numbers with detail.
 */
export function moran(values: any[][], ids: any[][], neighbours: any[][], detail?: boolean, rowStandardise?: boolean): number[][] {
  return guarded(() => moranOfRange(values, ids, neighbours, detail === true, { rowStandardise: rowStandardise === true }));
}

/**
 * Permutation p-value of Moran's I: the share of random reshufflings of the values at least as extreme as the observed pattern. Example: =SPILL.MORANPERM(C1:C151, A1:A151, K1#, 999, 7)
 * @customfunction MORANPERM
 * @param values One number per area, in a single column (a whole column such as B:B works: blank rows at the end are left out). A text first cell is read as a header.
 * @param ids The area IDs, in the same rows as the values.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [permutations] How many reshufflings to draw (default 999).
 * @param [seed] Whole number that fixes the random draws so the result can be repeated (default 1).
 * @param [rowStandardise] TRUE to rescale each area's weights to sum to 1.
 * @returns The two-sided permutation p-value.
 */
export function moranPerm(
  values: any[][], ids: any[][], neighbours: any[][], permutations?: number, seed?: number, rowStandardise?: boolean,
): number {
  return guarded(() => moranPermutationP(values, ids, neighbours, permutations ?? 999, seed ?? 1, { rowStandardise: rowStandardise === true }));
}

/**
 * Spatial lag: for each area, the weighted sum of its neighbours' values (their average when each area's weights sum to 1). Example: =SPILL.LAG(C1:C151, A1:A151, K1#)
 * @customfunction LAG
 * @param values One number per area, in a single column (a whole column such as B:B works: blank rows at the end are left out). A text first cell is read as a header.
 * @param ids The area IDs, in the same rows as the values.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [rowStandardise] TRUE to rescale each area's weights to sum to 1.
 * @returns One value per area, spilled down in the order of the IDs.
 */
export function lag(values: any[][], ids: any[][], neighbours: any[][], rowStandardise?: boolean): number[][] {
  return guarded(() => lagOfRange(values, ids, neighbours, { rowStandardise: rowStandardise === true }));
}

/**
 * Local Moran values: each area's share in the overall resemblance of neighbours. Example: =SPILL.MORANBYAREA(C1:C151, A1:A151, K1#)
 * @customfunction MORANBYAREA
 * @param values One number per area, in a single column (a whole column such as B:B works: blank rows at the end are left out). A text first cell is read as a header.
 * @param ids The area IDs, in the same rows as the values.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [rowStandardise] TRUE to rescale each area's weights to sum to 1.
 * @returns One value per area, spilled down in the order of the IDs.
 */
export function localMoran(values: any[][], ids: any[][], neighbours: any[][], rowStandardise?: boolean): number[][] {
  return guarded(() => localMoranOfRange(values, ids, neighbours, { rowStandardise: rowStandardise === true }));
}

/**
 * Geary's C: below 1 when neighbouring areas have similar values, above 1 when they differ. Example: =SPILL.GEARY(C1:C151, A1:A151, K1#, TRUE)
 * @customfunction GEARY
 * @param values One number per area, in a single column (a whole column such as B:B works: blank rows at the end are left out). A text first cell is read as a header.
 * @param ids The area IDs, in the same rows as the values.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [detail] TRUE to spill four cells across: the statistic, its expected value (1), z and the two-sided p-value.
 * @param [rowStandardise] TRUE to rescale each area's weights to sum to 1.
 * @returns Geary's C, or a row of four numbers with detail.
 */
export function geary(values: any[][], ids: any[][], neighbours: any[][], detail?: boolean, rowStandardise?: boolean): number[][] {
  return guarded(() => gearyOfRange(values, ids, neighbours, detail === true, { rowStandardise: rowStandardise === true }));
}

/**
 * Local Moran's I per area with conditional permutation inference and multiple-testing control: where the values cluster. Example on the Vell Basin districts, with =SPILL.TOUCHING(A1:A151) in K1: =SPILL.LOCALMORAN(H1:H151, A1:A151, K1#)
 * @customfunction LOCALMORAN
 * @param values One number per area, in a single column (a whole column such as B:B works: blank rows at the end are left out). A text first cell is read as a header.
 * @param ids The area IDs, in the same rows as the values.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [permutations] Reshufflings per area for the p-value (default 999; 0 for the normal approximation).
 * @param [seed] Whole number that fixes the random draws so the result can be repeated (default 1).
 * @param [level] Level of the multiple-testing control (default 0.05).
 * @param [control] "fdr" (default: false discovery rate, Benjamini–Hochberg), "bonferroni" or "none".
 * @param [rowStandardise] TRUE to rescale each area's weights to sum to 1.
 * @returns Four columns spilled per area, in the order of the IDs: the statistic, z, p, and the group (high among high, low among low, high among low, low among high, not significant).
 */
export function localMoranCells(
  values: any[][], ids: any[][], neighbours: any[][], permutations?: number, seed?: number, level?: number, control?: string, rowStandardise?: boolean,
): any[][] {
  return guarded(() => localMoranRows(values, ids, neighbours, { permutations, seed, level, control, rowStandardise: rowStandardise === true }));
}

/**
 * Getis–Ord Gi* per area (binary weights, the area itself included): clusters of high or of low values. Example: =SPILL.GISTAR(H1:H151, A1:A151, K1#, 999, 1, 0.05, "fdr")
 * @customfunction GISTAR
 * @param values One number of zero or more per area, in a single column (a whole column such as B:B works). A text first cell is read as a header.
 * @param ids The area IDs, in the same rows as the values.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape; every link counts as 1 here. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [permutations] Reshufflings per area for the p-value (default 999; 0 for the normal approximation).
 * @param [seed] Whole number that fixes the random draws so the result can be repeated (default 1).
 * @param [level] Level of the multiple-testing control (default 0.05).
 * @param [control] "fdr" (default: false discovery rate, Benjamini–Hochberg), "bonferroni" or "none".
 * @returns Three columns spilled per area, in the order of the IDs: z, p, and the finding (cluster of high values, cluster of low values, not significant).
 */
export function giStarCells(
  values: any[][], ids: any[][], neighbours: any[][], permutations?: number, seed?: number, level?: number, control?: string,
): any[][] {
  return guarded(() => giStarRows(values, ids, neighbours, { permutations, seed, level, control }));
}

/**
 * Global empirical-Bayes rates: each area's rate pulled towards the overall rate by how reliable its count makes it (Marshall 1991). Example with event counts in B and populations in C: =SPILL.RATEGLOBAL(B1:B101, C1:C101, 100000)
 * @customfunction RATEGLOBAL
 * @param events Whole numbers of events (cases, deaths, offences) per area, in a single column. A text first cell is read as a header.
 * @param population The population or exposure of each area, in the same rows.
 * @param [per] Show rates per 1, 100, 1000 (default) or 100000 people.
 * @param [detail] TRUE to spill four columns per area: the raw rate, the smoothed rate, the shrinkage weight (1 keeps the raw rate, 0 replaces it) and "few events" where fewer than 20 events.
 * @returns One smoothed rate per area, spilled down in the order of the rows.
 */
export function rateGlobal(events: any[][], population: any[][], per?: number, detail?: boolean): any[][] {
  return guarded(() => globalRateRows(events, population, { per, detail: detail === true }));
}

/**
 * Local empirical-Bayes rates: each area's rate pulled towards the rate of its neighbourhood (the area and its neighbours). Example with IDs in A, event counts in B, populations in C and =SPILL.TOUCHING(A1:A101) in K1: =SPILL.RATELOCAL(B1:B101, C1:C101, A1:A101, K1#, 100000)
 * @customfunction RATELOCAL
 * @param events Whole numbers of events per area, in a single column. A text first cell is read as a header.
 * @param population The population or exposure of each area, in the same rows.
 * @param ids The area IDs, in the same rows.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [per] Show rates per 1, 100, 1000 (default) or 100000 people.
 * @param [detail] TRUE to spill four columns per area: the raw rate, the smoothed rate, the shrinkage weight and "few events" where fewer than 20 events.
 * @returns One smoothed rate per area, spilled down in the order of the IDs.
 */
export function rateLocal(events: any[][], population: any[][], ids: any[][], neighbours: any[][], per?: number, detail?: boolean): any[][] {
  return guarded(() => localRateRows(events, population, ids, neighbours, { per, detail: detail === true }));
}

/**
 * Rate-adjusted Moran's I (Assunção & Reis 1999): clustering of rates tested fairly when populations differ, by first standardising each rate by its empirical-Bayes variance. Example: =SPILL.RATEMORAN(B1:B101, C1:C101, A1:A101, K1#, TRUE)
 * @customfunction RATEMORAN
 * @param events Whole numbers of events per area, in a single column. A text first cell is read as a header.
 * @param population The population or exposure of each area, in the same rows.
 * @param ids The area IDs, in the same rows.
 * @param neighbours The neighbours: a list of links (origin ID, neighbour ID, weight on each row, as on the Neighbours sheet) or an n × n weights matrix (rows and columns in the order of the IDs, or headed by the IDs), told apart by shape. One call carries at most about 5 MB: some 100,000 links, or a matrix of about 1,000 areas.
 * @param [detail] TRUE to spill four cells across: the statistic, z, the two-sided normal p-value and the permutation p-value.
 * @param [permutations] With detail, how many reshufflings to draw for the permutation p-value (default 999; 0 for none).
 * @param [seed] Whole number that fixes the random draws so the result can be repeated (default 1).
 * @param [rowStandardise] TRUE to rescale each area's weights to sum to 1; by default the weights are used as listed.
 * @returns The rate-adjusted Moran's I, or a row of four numbers with detail.
 */
export function rateMoran(
  events: any[][], population: any[][], ids: any[][], neighbours: any[][], detail?: boolean, permutations?: number, seed?: number, rowStandardise?: boolean,
): any[][] {
  return guarded(() => rateMoranRow(events, population, ids, neighbours, detail === true, permutations ?? 999, seed ?? 1, { rowStandardise: rowStandardise === true }));
}

/** Ties each metadata id to its function; Office.js provides CustomFunctions in the shared runtime. */
export function registerCellFunctions(): void {
  associate('MORAN', moran);
  associate('MORANPERM', moranPerm);
  associate('LAG', lag);
  associate('MORANBYAREA', localMoran);
  associate('GEARY', geary);
  associate('LOCALMORAN', localMoranCells);
  associate('GISTAR', giStarCells);
  associate('RATEGLOBAL', rateGlobal);
  associate('RATELOCAL', rateLocal);
  associate('RATEMORAN', rateMoran);
  registerNeighbourFunctions();
  registerModelFunctions();
}
