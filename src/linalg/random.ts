/**
 * The engine's one seeded generator: xoshiro128** (Blackman & Vigna 2018, "Scrambled linear
 * pseudorandom number generators"), its 128-bit state filled from the seed by splitmix32. Each
 * call returns a 53-bit float built from two 32-bit outputs. Same seed, same sequence, on every
 * platform — results that use it (permutation p-values, impact simulations, trace probes) are
 * reproducible.
 */
export function seededRandom(seed: number): () => number {
  let x = seed >>> 0;
  const splitmix32 = (): number => {
    x = (x + 0x9e3779b9) >>> 0;
    let z = x;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
  let s0 = splitmix32();
  let s1 = splitmix32();
  let s2 = splitmix32();
  let s3 = splitmix32();
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1;
  const next = (): number => {
    const result = Math.imul(rotl(Math.imul(s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (s1 << 9) >>> 0;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = rotl(s3 >>> 0, 11);
    s0 >>>= 0;
    s1 >>>= 0;
    s2 >>>= 0;
    return result;
  };
  return () => ((next() >>> 5) * 67108864 + (next() >>> 6)) / 9007199254740992;
}

function rotl(v: number, k: number): number {
  return ((v << k) | (v >>> (32 - k))) >>> 0;
}

/** Standard normal draws from a uniform generator (Box–Muller, both values used). */
export function normalSampler(uniform: () => number): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const v = spare;
      spare = null;
      return v;
    }
    let u = 0;
    while (u === 0) u = uniform();
    const v = uniform();
    const radius = Math.sqrt(-2 * Math.log(u));
    spare = radius * Math.sin(2 * Math.PI * v);
    return radius * Math.cos(2 * Math.PI * v);
  };
}

/** Fill v with independent ±1 (Rademacher) entries: each draw's top 32 bits give 32 signs. */
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
