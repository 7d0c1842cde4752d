import type { AnalysisResult, RateResult } from '../pipeline/index.js';

/** The flags of a rate whose flagged areas the workbook withholds, or undefined when none is withheld. */
function withheldOf(r: RateResult | undefined): boolean[] | undefined {
  if (!r || !r.withholdFlagged || !r.areas.some((a) => a.flagged)) return undefined;
  return r.areas.map((a) => a.flagged);
}

/**
 * Areas whose outcome the workbook leaves blank: the flagged areas, when the outcome is a rate whose
 * flagged areas are withheld. Undefined when nothing is withheld from the outcome.
 */
export function withheldOutcome(result: AnalysisResult): boolean[] | undefined {
  return withheldOf(result.rates?.find((x) => x.name === result.request.y));
}

/**
 * The rate the local statistics were computed from, when they were: the outcome or a model's
 * residuals when the outcome is a rate, `rate:NAME` (its standardised values), or the rate NAME itself.
 */
export function localRate(result: AnalysisResult): RateResult | undefined {
  const of = result.local?.of;
  if (of === undefined) return undefined;
  const name = of === 'outcome' || of.startsWith('residuals') ? result.request.y : of.startsWith('rate:') ? of.slice('rate:'.length).trim() : of;
  return result.rates?.find((x) => x.name === name);
}

/**
 * Areas whose local statistics the workbook leaves blank: each local statistic is computed from the
 * area's own rate (or the residual it leaves), so a withheld rate takes its statistic, z, p-values,
 * decision and group with it; the maps show those areas grey. Undefined when nothing is withheld.
 */
export function withheldLocal(result: AnalysisResult): boolean[] | undefined {
  return withheldOf(localRate(result));
}
