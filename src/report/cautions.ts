import type { AnalysisResult } from '../pipeline/types.js';
import { say } from './format.js';
import { describeRule } from '../weights/index.js';
import { listSome } from '../errors.js';
import { inSentence, fittedInOrder } from '../models/index.js';
import { rateCautions } from './rates.js';
import { formatCount } from '../core/count.js';

/** Plain-language cautions that belong beside every result. */
export function cautions(result: AnalysisResult): string[] {
  const list = [
    'These figures describe association, not cause: a coefficient says how the outcome and an explanatory column move together across areas, not what would happen if one were changed.',
    'Results are about areas, not people. A pattern across areas need not hold for the individuals living in them (the ecological fallacy).',
    `The spatial results depend on how neighbours were defined (here: ${describeRule(result.request.weights)}, described in full on the Neighbours sheet). Another reasonable definition can give different numbers; it is worth trying one.`,
    'Rates for areas with few people or few events swing widely by chance; treat extreme values in small areas with care.',
    ...rateCautions(result),
    'People who know these places may know reasons for a pattern that the data do not show. Their judgement should weigh alongside these numbers.',
  ];
  if (result.n < 30) list.push(`With only ${formatCount(result.n)} areas the tests have little power and the large-sample p-values are rough.`);
  return list;
}

/** One-paragraph reminder carried at the foot of every results sheet besides the summary, which has the full list. */
export function shortCaution(result: AnalysisResult): string {
  return `Read with care: association, not cause; areas, not people; other neighbour definitions than the one used here (${describeRule(result.request.weights)}) can change the answers; ` +
    'rates for small areas are unstable. Check these figures with people who know the places.';
}

/** Warnings from every stage, plus our own readings of the numbers, without repeats. */
export function collectWarnings(result: AnalysisResult): string[] {
  const out: string[] = [...result.warnings];
  for (const { entry, fit } of fittedInOrder(result.fits)) {
    out.push(...fit.warnings);
    const label = inSentence(entry.label);
    const { convergence, range } = entry.headline(fit);
    if (!convergence) continue;
    if (!convergence.converged) out.push(`The ${label} did not converge: ${convergence.message}. Its estimates are not reliable.`);
    if (convergence.atBound && range) {
      out.push(`The ${label}'s spatial parameter ended at the ${convergence.atBound} end of its admissible range (${say(range.lower)} to ${say(range.upper)}); the model may not suit these data or this neighbour definition.`);
    }
  }
  // A condition number above 30 signals troublesome collinearity: common practice.
  // (said once: the plain regression's own warning says it when it was given)
  if (result.ols.conditionNumber > 30 && !out.some((w) => /condition number/i.test(w))) {
    out.push(`The explanatory columns are strongly related to each other (condition number ${say(result.ols.conditionNumber)}, above the usual threshold of 30): individual coefficients may be unstable.`);
  }
  if (result.weights.withoutNeighbours.length) {
    out.push(`${formatCount(result.weights.withoutNeighbours.length)} area(s) have no neighbours under this definition: ${listSome(result.weights.withoutNeighbours, 10)}.`);
  }
  if (result.weights.components > 1) out.push(`The neighbour links split the areas into ${result.weights.components} separate groups.`);
  if (result.droppedRows.length) out.push(`${formatCount(result.droppedRows.length)} row(s) with missing values were left out; the list is on the run record sheet.`);
  return [...new Set(out)];
}
