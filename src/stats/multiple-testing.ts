import type { MultipleTestingControl } from './local-types.js';

/**
 * Which of m tests are judged significant under a multiple-testing control.
 * - `fdr`: the Benjamini–Hochberg step-up rule (Benjamini & Hochberg 1995): sort the p-values,
 *   find the largest rank k with p₍ₖ₎ ≤ k·q/m, and reject the k smallest. Controls the expected share
 *   of false discoveries at q for independent or positively dependent tests.
 * - `bonferroni`: p ≤ α/m (family-wise error at most α).
 * - `none`: p ≤ α for each test on its own (no control; to be labelled as such).
 * Missing p-values (NaN: an area without neighbours) are not tests: they are left out of m and never
 * significant. Also returns the adjusted p-values (Benjamini–Hochberg's monotone step-up adjustment,
 * or min(1, m·p)).
 */
export function controlMultipleTests(p: ArrayLike<number>, control: MultipleTestingControl): { significant: boolean[]; adjusted: Float64Array; tests: number } {
  const n = p.length;
  const order: number[] = [];
  for (let i = 0; i < n; i++) if (Number.isFinite(p[i])) order.push(i);
  const m = order.length;
  const significant = new Array<boolean>(n).fill(false);
  const adjusted = new Float64Array(n).fill(NaN);
  if (control.method === 'none') {
    for (const i of order) {
      adjusted[i] = p[i];
      significant[i] = p[i] <= control.level;
    }
    return { significant, adjusted, tests: m };
  }
  if (control.method === 'bonferroni') {
    for (const i of order) {
      adjusted[i] = Math.min(1, p[i] * m);
      significant[i] = p[i] <= control.level / m;
    }
    return { significant, adjusted, tests: m };
  }
  order.sort((a, b) => p[a] - p[b] || a - b);
  let running = 1;
  for (let r = m - 1; r >= 0; r--) {
    const i = order[r];
    running = Math.min(running, (p[i] * m) / (r + 1));
    adjusted[i] = running;
  }
  let k = 0;
  for (let r = 0; r < m; r++) if (p[order[r]] <= ((r + 1) * control.level) / m) k = r + 1;
  for (let r = 0; r < k; r++) significant[order[r]] = true;
  return { significant, adjusted, tests: m };
}
