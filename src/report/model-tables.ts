import type { AnalysisResult } from '../pipeline/types.js';
import type { Coefficient, SpatialFit } from '../models/types.js';
import type { Fitted, ModelEntry } from '../models/index.js';
import type { Block, Cell, NumberFormat } from './types.js';
import { MARK_NOTE, MODEL_LABEL, evidenceMark, num, yesNo } from './format.js';
import { testRow } from './test-rows.js';

function coefficientTable(title: string, statName: string, coefs: Coefficient[], extra: Cell[][] = []): Block {
  return {
    kind: 'table', title,
    columns: [
      { header: 'Term', format: 'text', width: 30 },
      { header: 'Estimate', format: 'decimal4', width: 13 },
      { header: 'Standard error', format: 'decimal4', width: 13 },
      { header: statName, format: 'decimal4', width: 10 },
      { header: 'p-value', format: 'pvalue', width: 11 },
      { header: 'Evidence', format: 'text', width: 10 },
    ],
    rows: [
      ...coefs.map((c): Cell[] => [c.name, num(c.estimate), num(c.se), num(c.stat), num(c.p), evidenceMark(c.p)]),
      ...extra,
    ],
    note: MARK_NOTE,
  };
}

export function olsBlocks(result: AnalysisResult): Block[] {
  const o = result.ols;
  const blocks: Block[] = [
    { kind: 'title', text: `${MODEL_LABEL.ols}: ${result.request.y} by least squares` },
    coefficientTable('Coefficients', 't-value', o.coefficients),
  ];
  if (o.robustCoefficients) {
    blocks.push(coefficientTable('Coefficients with standard errors robust to unequal variance', 't-value', o.robustCoefficients));
  }
  const rows: [string, Cell, NumberFormat?][] = [
    ['Areas', o.n, 'integer'],
    ['Terms (with the constant)', o.k, 'integer'],
    ['R²', num(o.r2), 'decimal4'],
    ['Adjusted R²', num(o.adjR2), 'decimal4'],
    ['F statistic', num(o.f.stat), 'decimal4'],
    ['F degrees of freedom', `${o.f.df} and ${o.f.df2}`, 'text'],
    ['p-value of F', num(o.f.p), 'pvalue'],
    ['Residual variance (divided by n − k)', num(o.sigma2), 'decimal4'],
    ['Residual variance (divided by n)', num(o.sigma2ML), 'decimal4'],
    ['Log-likelihood', num(o.logLik), 'decimal4'],
    ['AIC', num(o.aic), 'decimal4'],
    ['Bayesian information criterion (BIC)', num(o.bic), 'decimal4'],
  ];
  blocks.push({ kind: 'keyValues', title: 'Fit', rows });
  return blocks;
}

export function spatialBlocks(result: AnalysisResult, fit: SpatialFit): Block[] {
  const lag = fit.model === 'lag';
  const paramName = lag ? `ρ: neighbours' average ${result.request.y}` : 'λ: spatial error';
  const paramRow: Cell[] = [paramName, num(fit.parameter), num(fit.parameterSe), num(fit.parameterZ), num(fit.parameterP), evidenceMark(fit.parameterP)];
  const c = fit.convergence;
  const rows: [string, Cell, NumberFormat?][] = [
    ['Areas', result.n, 'integer'],
    ['Pseudo R² (squared correlation of observed and fitted)', num(fit.pseudoR2), 'decimal4'],
    ['Residual variance', num(fit.sigma2), 'decimal4'],
    ['Log-likelihood', num(fit.logLik), 'decimal4'],
    ['AIC', num(fit.aic), 'decimal4'],
    ['Bayesian information criterion (BIC)', num(fit.bic), 'decimal4'],
    ['Likelihood ratio against the plain regression', num(fit.lr.stat), 'decimal4'],
    ['Its degrees of freedom', fit.lr.df, 'integer'],
    ['Its p-value', num(fit.lr.p), 'pvalue'],
    ['Lowest admissible spatial parameter', num(fit.range.lower), 'decimal4'],
    ['Highest admissible spatial parameter', num(fit.range.upper), 'decimal4'],
    ['Log-determinant method', fit.logDeterminantMethod, 'text'],
    ['Search converged', yesNo(c.converged), 'text'],
    ['Iterations', c.iterations, 'integer'],
    ['Final interval width', num(c.tolerance), 'scientific'],
    ['Search note', c.atBound ? `${c.message} (ended at the ${c.atBound} bound)` : c.message, 'text'],
  ];
  return [
    { kind: 'title', text: `${MODEL_LABEL[fit.model]}: ${result.request.y} by maximum likelihood` },
    coefficientTable('Coefficients', 'z-value', fit.coefficients, [paramRow]),
    { kind: 'keyValues', title: 'Fit', rows },
  ];
}

/** The lag and error models' rows on the checks sheet. */
export function spatialChecks(fit: SpatialFit): Cell[][] {
  const rows: Cell[][] = [
    testRow('Breusch–Pagan test of constant variance', fit.breuschPagan, 'Does the spread of the residuals change with the explanatory columns?'),
  ];
  if (fit.lmRemainingError) rows.push(testRow('Lagrange multiplier: remaining error dependence', fit.lmRemainingError, 'Is error dependence left over after the spatial lag is modelled?'));
  if (fit.lmRemainingLag) rows.push(testRow('Lagrange multiplier: remaining lag dependence', fit.lmRemainingLag, 'Is lag dependence left over after the spatial error is modelled?'));
  return rows;
}

/** Any model's sheet from its registry headline: coefficients, spatial parameters and fit figures. */
export function headlineBlocks(result: AnalysisResult, fit: Fitted, entry: ModelEntry): Block[] {
  const h = entry.headline(fit);
  const paramRows = h.parameters.map((q): Cell[] => [q.symbol, num(q.estimate), num(q.se), num(q.z), num(q.p), evidenceMark(q.p)]);
  const rows: [string, Cell, NumberFormat?][] = [
    ['Areas', result.n, 'integer'],
    ['R² or squared correlation of observed and fitted', num(h.r2), 'decimal4'],
    ['Residual variance', num(h.sigma2), 'decimal4'],
  ];
  if (h.logLik !== undefined) rows.push(['Log-likelihood', num(h.logLik), 'decimal4'], ['AIC', num(h.aic), 'decimal4'], ['Bayesian information criterion (BIC)', num(h.bic), 'decimal4']);
  if (h.lr) rows.push(['Likelihood ratio against the plain regression', num(h.lr.stat), 'decimal4'], ['Its degrees of freedom', h.lr.df, 'integer'], ['Its p-value', num(h.lr.p), 'pvalue']);
  if (h.convergence) rows.push(['Search converged', yesNo(h.convergence.converged), 'text'], ['Search note', h.convergence.message, 'text']);
  return [
    { kind: 'title', text: `${entry.label}: ${result.request.y} by ${entry.method}` },
    coefficientTable('Coefficients', 'z-value', fit.coefficients, paramRows),
    { kind: 'keyValues', title: 'Fit', rows },
  ];
}
