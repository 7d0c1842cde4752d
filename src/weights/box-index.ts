/**
 * Static packed R-tree over axis-aligned boxes (Hilbert-sorted leaves, 16 children per node).
 *
 * Written here because the kept spatial index (kdbush) holds points only, and contiguity needs
 * "which boundary segments pass near this vertex" — a box query. The packing follows the
 * Hilbert-sorted R-tree of Kamel & Faloutsos (1994), "Hilbert R-tree: an improved R-tree using
 * fractals".
 */
const NODE_SIZE = 16;
const HILBERT_BITS = 13;

export class BoxIndex {
  readonly count: number;
  private readonly minX: Float64Array;
  private readonly minY: Float64Array;
  private readonly maxX: Float64Array;
  private readonly maxY: Float64Array;
  /** leaves: item number; internal nodes: position of the first child */
  private readonly child: Int32Array;
  /** levelStart[l] .. levelStart[l + 1] are the nodes of level l (0 = leaves) */
  private readonly levelStart: number[];
  private stackNode = new Int32Array(256);
  private stackLevel = new Int32Array(256);

  constructor(minX: Float64Array, minY: Float64Array, maxX: Float64Array, maxY: Float64Array) {
    const n = minX.length;
    this.count = n;
    const levelSizes = [n];
    while (levelSizes[levelSizes.length - 1] > 1) levelSizes.push(Math.ceil(levelSizes[levelSizes.length - 1] / NODE_SIZE));
    this.levelStart = [0];
    for (const s of levelSizes) this.levelStart.push(this.levelStart[this.levelStart.length - 1] + s);
    const total = this.levelStart[this.levelStart.length - 1];
    this.minX = new Float64Array(total);
    this.minY = new Float64Array(total);
    this.maxX = new Float64Array(total);
    this.maxY = new Float64Array(total);
    this.child = new Int32Array(total);
    if (n === 0) return;

    const order = hilbertOrder(minX, minY, maxX, maxY);
    for (let k = 0; k < n; k++) {
      const item = order[k];
      this.minX[k] = minX[item];
      this.minY[k] = minY[item];
      this.maxX[k] = maxX[item];
      this.maxY[k] = maxY[item];
      this.child[k] = item;
    }
    for (let l = 0; l + 1 < levelSizes.length; l++) {
      const from = this.levelStart[l];
      const to = this.levelStart[l + 1];
      let pos = to;
      for (let c = from; c < to; c += NODE_SIZE) {
        const end = Math.min(c + NODE_SIZE, to);
        let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
        for (let k = c; k < end; k++) {
          if (this.minX[k] < x0) x0 = this.minX[k];
          if (this.minY[k] < y0) y0 = this.minY[k];
          if (this.maxX[k] > x1) x1 = this.maxX[k];
          if (this.maxY[k] > y1) y1 = this.maxY[k];
        }
        this.minX[pos] = x0;
        this.minY[pos] = y0;
        this.maxX[pos] = x1;
        this.maxY[pos] = y1;
        this.child[pos] = c;
        pos++;
      }
    }
  }

  /**
   * Items whose box meets [x0, x1] × [y0, y1], written to `out` (grown when needed).
   * Returns the result buffer and the number of items found.
   */
  search(x0: number, y0: number, x1: number, y1: number, out: Int32Array): { items: Int32Array; found: number } {
    let items = out;
    let found = 0;
    if (this.count === 0) return { items, found };
    const top = this.levelStart.length - 2;
    let sp = 0;
    this.stackNode[sp] = this.levelStart[top];
    this.stackLevel[sp] = top;
    sp++;
    while (sp > 0) {
      sp--;
      const node = this.stackNode[sp];
      const level = this.stackLevel[sp];
      if (this.maxX[node] < x0 || this.maxY[node] < y0 || this.minX[node] > x1 || this.minY[node] > y1) continue;
      if (level === 0) {
        if (found === items.length) {
          const bigger = new Int32Array(items.length * 2 + 16);
          bigger.set(items);
          items = bigger;
        }
        items[found++] = this.child[node];
        continue;
      }
      const first = this.child[node];
      const end = Math.min(first + NODE_SIZE, this.levelStart[level]);
      if (sp + NODE_SIZE > this.stackNode.length) this.growStack();
      for (let c = first; c < end; c++) {
        this.stackNode[sp] = c;
        this.stackLevel[sp] = level - 1;
        sp++;
      }
    }
    return { items, found };
  }

  private growStack(): void {
    const size = this.stackNode.length * 2;
    const node = new Int32Array(size);
    node.set(this.stackNode);
    const level = new Int32Array(size);
    level.set(this.stackLevel);
    this.stackNode = node;
    this.stackLevel = level;
  }
}

/** Item numbers sorted by the Hilbert index of their box centres (ties by item number). */
function hilbertOrder(minX: Float64Array, minY: Float64Array, maxX: Float64Array, maxY: Float64Array): Int32Array {
  const n = minX.length;
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i < n; i++) {
    if (minX[i] < x0) x0 = minX[i];
    if (minY[i] < y0) y0 = minY[i];
    if (maxX[i] > x1) x1 = maxX[i];
    if (maxY[i] > y1) y1 = maxY[i];
  }
  const side = (1 << HILBERT_BITS) - 1;
  const sx = x1 > x0 ? side / (x1 - x0) : 0;
  const sy = y1 > y0 ? side / (y1 - y0) : 0;
  // key = hilbert value · 2^27 + item: exact in a double for up to 2^27 items
  const keys = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const hx = Math.floor(((minX[i] + maxX[i]) / 2 - x0) * sx);
    const hy = Math.floor(((minY[i] + maxY[i]) / 2 - y0) * sy);
    keys[i] = hilbertIndex(hx, hy) * 134217728 + i;
  }
  keys.sort();
  const order = new Int32Array(n);
  for (let k = 0; k < n; k++) order[k] = keys[k] % 134217728;
  return order;
}

/** Position of cell (x, y) along the Hilbert curve filling a 2^HILBERT_BITS square grid. */
function hilbertIndex(x: number, y: number): number {
  const n = 1 << HILBERT_BITS;
  let d = 0;
  for (let s = n >> 1; s > 0; s >>= 1) {
    const rx = (x & s) > 0 ? 1 : 0;
    const ry = (y & s) > 0 ? 1 : 0;
    d += s * s * ((3 * rx) ^ ry);
    if (ry === 0) {
      if (rx === 1) {
        x = n - 1 - x;
        y = n - 1 - y;
      }
      const t = x;
      x = y;
      y = t;
    }
  }
  return d;
}
