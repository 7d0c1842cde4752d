import type { AnalysisResult } from '../pipeline/types.js';
import type { Coefficient, OlsFit, SpatialFit } from '../models/types.js';
import type { Fitted, ModelEntry, ParameterEstimate } from '../models/index.js';
import type { Block, Cell, NumberFormat } from './types.js';
import { MARK_NOTE, evidenceMark, num, say, yesNo } from './format.js';
import { testRow } from './test-rows.js';

/**
 * A model's coefficient table: term, estimate, standard error, t or z, p-value and the evidence mark,
 * then any rows of spatial parameters (`extra`). `termWidth` and `note` for the wider family's sheets.
 */
export function coefficientTable(title: string, statName: string, coefs: Coefficient[], extra: Cell[][] = [], opts: { termWidth?: number; note?: string } = {}): Block {
  return {
    kind: 'table', title,
    columns: [
      { header: 'Term', format: 'text', width: opts.termWidth ?? 30 },
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
    note: opts.note ?? MARK_NOTE,
  };
}

/** A spatial parameter's row under the coefficients: "ρ: spillover of the outcome", estimate, se, z, p, mark. */
export function parameterRow(q: ParameterEstimate): Cell[] {
  return [`${q.symbol}: ${q.name}`, num(q.estimate), num(q.se), num(q.z), num(q.p), evidenceMark(q.p)];
}

/** The plain regression's sheet. */
export function olsBlocks(result: AnalysisResult, _fit: Fitted<OlsFit>, entry: ModelEntry): Block[] {
  const o = result.ols; // the plain regression with its residual tests, as the run keeps it
  const blocks: Block[] = [
    { kind: 'title', text: `${entry.label}: ${result.request.y} by ${entry.method}` },
    coefficientTable('Coefficients', 't-value', o.coefficients),
  ];
  if (o.robustCoefficients) {
    blocks.push(coefficientTable('Coefficients with standard errors robust to unequal variance', 't-value', o.robustCoefficients));
  }
  blocks.push(
    {
      kind: 'keyValues', title: 'How well it fits',
      rows: [
        ['Areas', o.n, 'integer'],
        ['Terms (with the constant)', o.k, 'integer'],
        ['R²: share of the variation explained', num(o.r2), 'decimal4'],
        ['R² adjusted for the number of terms', num(o.adjR2), 'decimal4'],
        ['Residual variance (divided by n − k)', num(o.sigma2), 'decimal4'],
        ['F statistic: do the columns explain anything together?', num(o.f.stat), 'decimal4'],
        ['Its degrees of freedom', `${o.f.df} and ${o.f.df2}`, 'text'],
        ['Its p-value', num(o.f.p), 'pvalue'],
      ],
    },
    {
      kind: 'keyValues', title: 'For comparing models',
      rows: [
        ['Log-likelihood', num(o.logLik), 'decimal4'],
        ['AIC', num(o.aic), 'decimal4'],
        ['Bayesian information criterion (BIC)', num(o.bic), 'decimal4'],
      ],
    },
    {
      kind: 'paragraph', style: 'note',
      text: `The residual variance above divides the sum of squared residuals by n − k = ${o.n - o.k}, which leaves it unbiased. ` +
        `The maximum-likelihood estimate divides by n = ${o.n} instead: ${say(o.sigma2ML)}. That is the one inside the log-likelihood, AIC and BIC, ` +
        'and the one to set beside the spatial models\' residual variance.',
    },
  );
  return blocks;
}

/** The sheet of a model fitted by maximum likelihood with one spatial parameter (the lag and error models). */
export function spatialBlocks(result: AnalysisResult, fit: Fitted<SpatialFit>, entry: ModelEntry): Block[] {
  const lag = fit.model === 'lag';
  const paramName = lag ? `ρ: neighbours' average ${result.request.y}` : 'λ: spatial error';
  const paramRow: Cell[] = [paramName, num(fit.parameter), num(fit.parameterSe), num(fit.parameterZ), num(fit.parameterP), evidenceMark(fit.parameterP)];
  const c = fit.convergence;
  const fits: [string, Cell, NumberFormat?][] = [
    ['Areas', result.n, 'integer'],
    ['Pseudo R²: squared correlation of observed and fitted', num(fit.pseudoR2), 'decimal4'],
    ['Residual variance (maximum likelihood, divided by n)', num(fit.sigma2), 'decimal4'],
  ];
  const comparing: [string, Cell, NumberFormat?][] = [
    ['Log-likelihood', num(fit.logLik), 'decimal4'],
    ['AIC', num(fit.aic), 'decimal4'],
    ['Bayesian information criterion (BIC)', num(fit.bic), 'decimal4'],
    ['Likelihood ratio against the plain regression', num(fit.lr.stat), 'decimal4'],
    ['Its degrees of freedom', fit.lr.df, 'integer'],
    ['Its p-value', num(fit.lr.p), 'pvalue'],
  ];
  const search: [string, Cell, NumberFormat?][] = [
    ['Lowest admissible spatial parameter', num(fit.range.lower), 'decimal4'],
    ['Highest admissible spatial parameter', num(fit.range.upper), 'decimal4'],
    ['Log-determinant method', fit.logDeterminantMethod, 'text'],
    ['Search converged', yesNo(c.converged), 'text'],
    ['Iterations', c.iterations, 'integer'],
    ['Final interval width', num(c.tolerance), 'scientific'],
    ['Search note', c.atBound ? `${c.message} (ended at the ${c.atBound} bound)` : c.message, 'text'],
  ];
  return [
    { kind: 'title', text: `${entry.label}: ${result.request.y} by ${entry.method}` },
    coefficientTable('Coefficients', 'z-value', fit.coefficients, [paramRow]),
    { kind: 'keyValues', title: 'How well it fits', rows: fits },
    { kind: 'keyValues', title: 'For comparing models', rows: comparing },
    { kind: 'keyValues', title: 'How the estimate was found', rows: search },
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
