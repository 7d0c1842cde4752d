// The seeded generator and tail probabilities: reproducibility by definition of a seeded stream,
// first two moments by the law of large numbers, and standard normal / chi-square / t tables.
import { describe, expect, it } from 'vitest';
import { normalSampler, seededRandom } from '../src/stats/random.js';
import { chiSquareUpper, normalTwoSided, studentTwoSided } from '../src/stats/distributions.js';

describe('seeded generator', () => {
  it('same seed, same stream; different seed, different stream; values in [0, 1)', () => {
    // definition of a seeded stream: the seed alone fixes every draw
    const a = seededRandom(123);
    const b = seededRandom(123);
    const c = seededRandom(124);
    const xs = Array.from({ length: 1000 }, () => a());
    expect(Array.from({ length: 1000 }, () => b())).toEqual(xs);
    expect(c()).not.toBe(xs[0]);
    expect(Math.min(...xs)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...xs)).toBeLessThan(1);
  });

  it('uniform and normal draws have the right first two moments (law of large numbers, 4 SE)', () => {
    // U(0,1): mean 1/2, variance 1/12; N(0,1): mean 0, E[z²] = 1, Var(z²) = 2. A 4-standard-error band
    // keeps a correct generator from failing by chance (common practice).
    const u = seededRandom(9);
    const m = 100_000;
    let s = 0;
    for (let i = 0; i < m; i++) s += u();
    expect(Math.abs(s / m - 0.5)).toBeLessThan(4 * Math.sqrt(1 / 12 / m));
    const z = normalSampler(seededRandom(10));
    let s1 = 0;
    let s2 = 0;
    for (let i = 0; i < m; i++) {
      const v = z();
      s1 += v;
      s2 += v * v;
    }
    expect(Math.abs(s1 / m)).toBeLessThan(4 / Math.sqrt(m));
    expect(Math.abs(s2 / m - 1)).toBeLessThan(4 * Math.sqrt(2 / m));
  });
});

describe('tail probabilities', () => {
  it('match standard table values', () => {
    // standard normal and chi-square tables (any statistics textbook)
    expect(normalTwoSided(1.959963984540054)).toBeCloseTo(0.05, 12);
    expect(chiSquareUpper(3.841458820694124, 1)).toBeCloseTo(0.05, 12);
    expect(chiSquareUpper(5.991464547107979, 2)).toBeCloseTo(0.05, 12);
    // t(0.975; 50 df) = 2.008559 (recalled from memory, printed tables give 2.009)
    expect(studentTwoSided(2.008559, 50)).toBeCloseTo(0.05, 6);
    // far tail: P(|Z| > 10) = erfc(10/√2) = 1.5239706e-23 (identity with the complementary error function)
    expect(normalTwoSided(10) / 1.523970604832105e-23).toBeCloseTo(1, 9);
  });
});
