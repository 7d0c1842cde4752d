import type { AnalysisResult } from '../pipeline/index.js';

/**
 * Areas whose outcome the workbook leaves blank: the flagged areas, when the outcome is a rate whose
 * flagged areas are withheld. Undefined when nothing is withheld from the outcome.
 */
export function withheldOutcome(result: AnalysisResult): boolean[] | undefined {
  const r = result.rates?.find((x) => x.name === result.request.y);
  if (!r || !r.withholdFlagged || !r.areas.some((a) => a.flagged)) return undefined;
  return r.areas.map((a) => a.flagged);
}
