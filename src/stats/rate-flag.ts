/**
 * Small-denominator flag. An area's rate is flagged as unreliable when it rests on fewer than 20
 * events. Common practice in public-health reporting (a rule of thumb, not a test): under a Poisson
 * model for the count d the relative standard error of the rate d/n is RSE = √d / d = 1/√d, which is
 * above 1/√20 ≈ 22.4 % below 20 events (and undefined at 0 events, which are flagged too). The often-quoted
 * "RSE above 30 %" is crossed only below 12 events, so the 20-event rule is the stricter one and the
 * only one applied.
 */
export const RATE_FLAG_RULE =
  'An area is flagged when its rate rests on fewer than 20 events (0 events included). ' +
  'Below 20 events the rate’s relative standard error, 1/√events for a Poisson count, is above 22.4 % (1/√20), so the rate can swing widely by chance. ' +
  'This is common practice in public-health reporting, a rule of thumb rather than a statistical test.';

/** Minimum number of events for a rate not to be flagged. */
export const RATE_FLAG_MIN_EVENTS = 20;

export function rateFlags(events: ArrayLike<number>): boolean[] {
  const flags: boolean[] = [];
  for (let i = 0; i < events.length; i++) flags.push(events[i] < RATE_FLAG_MIN_EVENTS);
  return flags;
}
