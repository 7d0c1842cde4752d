/**
 * Method-of-moments prior for rates (Marshall 1991, "Mapping disease and mortality rates using
 * empirical Bayes estimators", Applied Statistics 40: 283–294, eqs. for b and a):
 *   b = Σd / Σn,  s² = Σ nᵢ (rᵢ − b)² / Σn,  a = s² − b / n̄ with n̄ = Σn / m,
 * over the m areas of `members` (all areas when omitted). A negative a (between-area variance
 * estimated below zero) is set to 0, and `clipped` says so.
 */
export function ebMoments(
  events: ArrayLike<number>,
  population: ArrayLike<number>,
  members?: ArrayLike<number>,
): { b: number; a: number; clipped: boolean } {
  const m = members ? members.length : events.length;
  const at = (k: number) => (members ? members[k] : k);
  let sd = 0;
  let sn = 0;
  for (let k = 0; k < m; k++) {
    sd += events[at(k)];
    sn += population[at(k)];
  }
  const b = sd / sn;
  let ss = 0;
  for (let k = 0; k < m; k++) {
    const j = at(k);
    const r = events[j] / population[j] - b;
    ss += population[j] * r * r;
  }
  const a = ss / sn - b / (sn / m);
  return a < 0 ? { b, a: 0, clipped: true } : { b, a, clipped: false };
}
