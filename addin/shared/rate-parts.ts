/**
 * The sidebar's reading of the engine's rate-count check (src/pipeline/rate-parts.ts) on the table it
 * holds, so the warning shows as soon as a column is ticked; the run repeats it in its warnings.
 */
import { rateParts as partsOf, type RatePart } from '../../src/pipeline/index.js';
import type { TableSnapshot } from './types.js';

export { builtRateParts, nameWords, ratePartWarning, type RatePart } from '../../src/pipeline/index.js';

/** Explanatory candidates that look like the outcome's numerator or denominator, in candidates' order. */
export function rateParts(t: TableSnapshot, outcome: string, candidates: string[], numericColumns: string[]): RatePart[] {
  const column = (name: string) => { const k = t.headers.indexOf(name); return k < 0 ? undefined : t.rows.map((r) => r[k]); };
  return partsOf(column, outcome, candidates, numericColumns);
}
