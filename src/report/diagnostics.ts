import type { AnalysisResult } from '../pipeline/types.js';
import type { Block, Cell } from './types.js';
import { num } from './format.js';
import { inSentence, baselineModel, fittedInOrder } from '../models/index.js';
import { blocksOf } from './model-blocks.js';
import { TEST_COLUMNS, testRow } from './test-rows.js';

/** The five Lagrange-multiplier tests on the plain regression's residuals, one plain sentence each. */
export function lmTestRows(result: AnalysisResult): Cell[][] {
  const lm = result.ols.lm;
  return [
    testRow('Lagrange multiplier: error dependence', lm.error, 'Are the unexplained parts of neighbouring areas alike (spatial error)?'),
    testRow('Lagrange multiplier: lag dependence', lm.lag, "Does an area's outcome move with its neighbours' outcomes (spatial lag)?"),
    testRow('Robust Lagrange multiplier: error dependence', lm.robustError, 'Is there error dependence once a possible lag dependence is allowed for?'),
    testRow('Robust Lagrange multiplier: lag dependence', lm.robustLag, 'Is there lag dependence once a possible error dependence is allowed for?'),
    testRow('Lagrange multiplier: lag and error together', lm.joint, 'Is there spatial dependence of either kind?'),
  ];
}

/** The tests as a table; without the questions (the Summary) it stays as narrow as the tables around it. */
export function lmTable(result: AnalysisResult, title: string, withQuestions = true): Block {
  if (withQuestions) return { kind: 'table', title, columns: TEST_COLUMNS, rows: lmTestRows(result), note: 'Small p-values are evidence of the dependence the test asks about.' };
  return {
    kind: 'table', title, columns: TEST_COLUMNS.slice(0, 4).map((c, i) => (i === 0 ? { ...c, width: 40 } : c)), rows: lmTestRows(result).map((r) => r.slice(0, 4)),
    note: 'Small p-values are evidence of the dependence the test asks about; the sheet "Checks on residuals" says what each test asks.',
  };
}

export function diagnosticsBlocks(result: AnalysisResult): Block[] {
  const o = result.ols;
  const m = o.moran;
  const blocks: Block[] = [
    { kind: 'title', text: 'Checks on the residuals of the plain regression' },
    {
      kind: 'table', title: 'Shape, spread and overlap', columns: TEST_COLUMNS,
      rows: [
        testRow('Jarque–Bera test of normality', o.jarqueBera, 'Do the residuals look normally distributed? A small p says no.'),
        testRow('Breusch–Pagan test of constant variance', o.breuschPagan, 'Does the spread of the residuals change with the explanatory columns? A small p says yes.'),
        testRow('Studentised Breusch–Pagan test (Koenker 1981)', o.breuschPaganStudentised, 'The same question as Breusch–Pagan, robust to non-normal residuals.'),
        ['Condition number of the explanatory columns', num(o.conditionNumber), null, null,
          'How strongly the explanatory columns overlap; above 30 individual coefficients become unstable (common practice).'],
      ],
    },
    {
      // in the columns of the tests above, so that every number sits under its own heading
      kind: 'table', title: "Moran's I of the residuals", columns: TEST_COLUMNS,
      rows: [
        [`Moran's I of the ${baselineModel().label.toLowerCase()}'s residuals`, num(m.I), null, num(m.p),
          'Are residuals of neighbouring areas more alike (positive I) or less alike (negative I) than chance would give? The p-value is two-sided, from the normal approximation.'],
        ['Expected if there is no pattern', num(m.expected), null, null, 'What Moran\'s I averages when neighbours\' residuals are unrelated; slightly below zero.'],
        ['Variance if there is no pattern', num(m.variance), null, null, 'How widely Moran\'s I varies when there is no pattern.'],
        ['z-value', num(m.z), null, null, 'Moran\'s I less its expected value, in standard deviations.'],
      ],
    },
    lmTable(result, 'Lagrange-multiplier tests for spatial dependence'),
  ];
  for (const { entry, fit } of fittedInOrder(result.fits)) {
    const rows = blocksOf(entry.key).checks?.(fit);
    if (rows?.length) blocks.push({ kind: 'table', title: `Checks on the ${inSentence(entry.label)}`, columns: TEST_COLUMNS, rows });
  }
  return blocks;
}
