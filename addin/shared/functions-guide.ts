/**
 * The SPILL cell functions in a line each, and a worked example on the demo sheet
 * (sample-workbooks/vell-basin.xlsx, sheet Districts): what the sidebar's guide shows. No DOM here,
 * so tests can check the list against the functions' metadata and run the example.
 */

/** Every cell function: how it is called and what it gives back. */
export const CELL_FUNCTION_GUIDE: readonly { name: string; call: string; gives: string }[] = [
  { name: 'FIT', call: 'SPILL.FIT(y, x, ids, neighbours, [model], [options])', gives: 'a model’s coefficient table: estimate, standard error, z (or t), p per term; the spatial parameter; areas, log-likelihood, AIC. Models as --models spells them: "lag" (default), "error", "ols", and the wider family "slx", "durbin", "durbin-error", "lag-error", "lag-iv", "error-gm".' },
  { name: 'EFFECTS', call: 'SPILL.EFFECTS(y, x, ids, neighbours, [model], [options])', gives: 'direct, indirect (spillover) and total effects of each explanatory column, with their standard errors, for "lag" (default), "slx", "durbin", "durbin-error", "lag-error" or "lag-iv".' },
  { name: 'LMTESTS', call: 'SPILL.LMTESTS(y, x, ids, neighbours, [options])', gives: 'Moran’s I of the residuals and the Lagrange-multiplier tests, then the model they suggest.' },
  { name: 'NEIGHBOURS', call: 'SPILL.NEIGHBOURS(ids, x, y, [rule], [size], [options])', gives: 'neighbours from coordinates ("nearest", "within" a distance, "inverse" distance) as origin, neighbour, weight rows.' },
  { name: 'TOUCHING', call: 'SPILL.TOUCHING(ids, [rule], [options], [idProperty])', gives: 'neighbours by shared borders ("queen" or "rook") from the boundary file kept in this workbook.' },
  { name: 'MORAN', call: 'SPILL.MORAN(values, ids, neighbours, [detail])', gives: 'Moran’s I; with detail also its expected value, z and p.' },
  { name: 'MORANPERM', call: 'SPILL.MORANPERM(values, ids, neighbours, [permutations], [seed])', gives: 'the permutation p-value of Moran’s I.' },
  { name: 'GEARY', call: 'SPILL.GEARY(values, ids, neighbours, [detail])', gives: 'Geary’s C.' },
  { name: 'LAG', call: 'SPILL.LAG(values, ids, neighbours)', gives: 'each area’s neighbours’ weighted value.' },
  { name: 'MORANBYAREA', call: 'SPILL.MORANBYAREA(values, ids, neighbours)', gives: 'each area’s local Moran value.' },
  { name: 'LOCALMORAN', call: 'SPILL.LOCALMORAN(values, ids, neighbours, …)', gives: 'local Moran per area with its p and group after multiple-testing control.' },
  { name: 'GISTAR', call: 'SPILL.GISTAR(values, ids, neighbours, …)', gives: 'Getis–Ord Gi* per area: clusters of high or low values.' },
  { name: 'RATEGLOBAL', call: 'SPILL.RATEGLOBAL(events, population, [per], [detail])', gives: 'rates from counts, each pulled towards the overall rate by how reliable its count makes it (empirical Bayes).' },
  { name: 'RATELOCAL', call: 'SPILL.RATELOCAL(events, population, ids, neighbours, [per], [detail])', gives: 'rates pulled towards the rate of the area’s neighbourhood instead.' },
  { name: 'RATEMORAN', call: 'SPILL.RATEMORAN(events, population, ids, neighbours, [detail], …)', gives: 'Moran’s I for rates, fair when populations differ.' },
];

/** The worked example on the demo sheet, cell by cell. */
export const WORKED_EXAMPLE: readonly { cell: string; formula: string; what: string }[] = [
  { cell: 'K1', formula: '=SPILL.TOUCHING(A1:A151)', what: 'the districts’ neighbours by shared borders (after one run from this sidebar has kept the boundary file); or point at the link rows of the Neighbours sheet instead' },
  { cell: 'P1', formula: '=SPILL.LMTESTS(C1:C151, D1:F151, A1:A151, K1#)', what: 'the tests on the plain regression of long_commute_pct on broadband_pct, rail_km and rent_index, and the model they suggest' },
  { cell: 'P11', formula: '=SPILL.FIT(C1:C151, D1:F151, A1:A151, K1#, "lag")', what: 'the spatial lag model’s table' },
  { cell: 'P22', formula: '=SPILL.EFFECTS(C1:C151, D1:F151, A1:A151, K1#)', what: 'how much of each column’s effect spills over to neighbours' },
];
