/**
 * Small-denominator flag. Common practice (a rule of thumb used by public-health agencies, not a
 * theorem): an area's rate is unreliable when it rests on fewer than 20 events, or when its
 * relative standard error exceeds 30 %. Under a Poisson model for the count d the relative standard
 * error of the rate d/n is RSE = √d / d = 1/√d (undefined, so flagged, when d = 0).
 */
export const RATE_FLAG_RULE =
  'flagged when fewer than 20 events, or the relative standard error 1/sqrt(events) (Poisson) is above 30 % (common practice)';

export function rateFlags(events: ArrayLike<number>): boolean[] {
  const flags: boolean[] = [];
  for (let i = 0; i < events.length; i++) {
    const d = events[i];
    const rse = d > 0 ? 1 / Math.sqrt(d) : Infinity;
    flags.push(d < 20 || rse > 0.3);
  }
  return flags;
}
