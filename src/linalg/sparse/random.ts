/** Seeded pseudo-random numbers for reproducible stochastic estimates (mulberry32, public domain). */
export function seededUniform(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Fill v with independent ±1 (Rademacher) entries: each draw's 32 bits give 32 signs. */
export function rademacher(v: Float64Array, uniform: () => number): Float64Array {
  let word = 0;
  for (let i = 0; i < v.length; i++) {
    const bit = i & 31;
    if (bit === 0) word = (uniform() * 4294967296) >>> 0;
    v[i] = (word >>> bit) & 1 ? 1 : -1;
  }
  return v;
}

/** Sample mean and standard error of the mean. */
export function meanAndError(samples: ArrayLike<number>): { mean: number; se: number } {
  const p = samples.length;
  let mean = 0;
  for (let i = 0; i < p; i++) mean += samples[i];
  mean /= p;
  let ss = 0;
  for (let i = 0; i < p; i++) ss += (samples[i] - mean) ** 2;
  return { mean, se: p > 1 ? Math.sqrt(ss / (p - 1) / p) : Infinity };
}
