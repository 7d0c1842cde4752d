import type { Pt } from './geometry.js';

/** mulberry32: a 32-bit-state generator (Tommy Ettinger, public domain); uniform on [0, 1). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Box–Muller: one standard normal from two uniforms (the sine partner is discarded for simplicity). */
export function normal(rand: () => number): number {
  const u1 = 1 - rand();
  const u2 = rand();
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

/** A smooth random surface: three plane waves of 35–70 km wavelength, unit variance. */
export function smoothField(rand: () => number): (p: Pt) => number {
  const waves = [0, 1, 2].map(() => ({ a: 2 * Math.PI * rand(), k: (2 * Math.PI) / (35000 + 35000 * rand()), ph: 2 * Math.PI * rand() }));
  return (p) => Math.sqrt(2 / 3) * waves.reduce((s, w) => s + Math.sin(w.k * (Math.cos(w.a) * p[0] + Math.sin(w.a) * p[1]) + w.ph), 0);
}

/** Invented names: root + ending, shuffled; the lists were chosen to avoid well-known real places. */
export function inventNames(rand: () => number, roots: string[], endings: string[], count: number): string[] {
  const all = roots.flatMap((r) => endings.map((e) => r + e));
  for (let i = all.length - 1; i > 0; i--) {
    const j = Math.floor(rand() * (i + 1));
    [all[i], all[j]] = [all[j], all[i]];
  }
  if (all.length < count) throw new Error('not enough invented names');
  return all.slice(0, count);
}

export const stats = (v: number[]): { mean: number; sd: number } => {
  const mean = v.reduce((s, x) => s + x, 0) / v.length;
  return { mean, sd: Math.sqrt(v.reduce((s, x) => s + (x - mean) ** 2, 0) / (v.length - 1)) };
};
