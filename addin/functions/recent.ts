/**
 * What the cell functions keep between recalculations: the last few results by key, most recent
 * first, so that an edit to the values refits without reading the neighbours or rebuilding their
 * algebra again; and the key itself, two independent 32-bit hashes (FNV-1a and a multiply-rotate
 * one, 64 bits together) so that a changed range is not taken for a kept one.
 */

export class Recent<T> {
  private readonly kept: { key: string; value: T }[] = [];

  /** `size` results at most; `letGo` is told of each one dropped (e.g. to stop a helper thread). */
  constructor(private readonly size: number, private readonly letGo?: (value: T) => void) {}

  /** The result kept under `key`, moved to the front; else `make()`'s, kept (nothing is kept when it throws). */
  get(key: string, make: () => T): T {
    const at = this.kept.findIndex((k) => k.key === key);
    if (at >= 0) {
      const [hit] = this.kept.splice(at, 1);
      this.kept.unshift(hit);
      return hit.value;
    }
    const value = make();
    this.kept.unshift({ key, value });
    while (this.kept.length > this.size) {
      const dropped = this.kept.pop()!;
      this.letGo?.(dropped.value);
    }
    return value;
  }
}

/** Two 32-bit hashes fed the same numbers; `digest` gives both in hex. */
export function twoHashes(): { mix(x: number): void; digest(): string } {
  let h = 0x811c9dc5;
  let g = 0x9747b28c;
  return {
    mix(x: number) {
      h = Math.imul(h ^ x, 0x01000193);
      g = Math.imul((g ^ x) << 13 | (g ^ x) >>> 19, 0x5bd1e995) + 0x6b43a9b5;
    },
    digest: () => `${(h >>> 0).toString(16)}${(g >>> 0).toString(16)}`,
  };
}
