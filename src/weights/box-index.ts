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
    // at least one level above the leaves, so that the root is never a leaf
    while (levelSizes.length === 1 || levelSizes[levelSizes.length - 1] > 1) levelSizes.push(Math.ceil(levelSizes[levelSizes.length - 1] / NODE_SIZE));
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

  /** Result buffer of the last search: its first `found` entries are item numbers. */
  results = new Int32Array(64);

  /** Items whose box meets [x0, x1] × [y0, y1]; they go to `results`, and the count is returned. */
  search(x0: number, y0: number, x1: number, y1: number): number {
    if (this.count === 0) return 0;
    const { minX, minY, maxX, maxY, child, levelStart } = this;
    let results = this.results;
    let stackNode = this.stackNode;
    let stackLevel = this.stackLevel;
    let found = 0;
    const top = levelStart.length - 2;
    const root = levelStart[top];
    if (maxX[root] < x0 || maxY[root] < y0 || minX[root] > x1 || minY[root] > y1) return 0;
    let sp = 0;
    stackNode[sp] = root;
    stackLevel[sp] = top;
    sp++;
    while (sp > 0) {
      sp--;
      const node = stackNode[sp];
      const level = stackLevel[sp];
      const first = child[node];
      const end = Math.min(first + NODE_SIZE, levelStart[level]);
      if (level === 1) {
        // children are leaves: report those that meet the query box
        for (let c = first; c < end; c++) {
          if (maxX[c] < x0 || maxY[c] < y0 || minX[c] > x1 || minY[c] > y1) continue;
          if (found === results.length) {
            const bigger = new Int32Array(results.length * 2);
            bigger.set(results);
            results = bigger;
            this.results = bigger;
          }
          results[found++] = child[c];
        }
        continue;
      }
      if (sp + NODE_SIZE > stackNode.length) {
        this.growStack();
        stackNode = this.stackNode;
        stackLevel = this.stackLevel;
      }
      for (let c = first; c < end; c++) {
        if (maxX[c] < x0 || maxY[c] < y0 || minX[c] > x1 || minY[c] > y1) continue;
        stackNode[sp] = c;
        stackLevel[sp] = level - 1;
        sp++;
      }
    }
    return found;
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

/** Item numbers sorted by the Hilbert index of their box centres (ties by item number; radix sort). */
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
  const h = new Uint32Array(n);
  for (let i = 0; i < n; i++) {
    const hx = Math.floor(((minX[i] + maxX[i]) / 2 - x0) * sx);
    const hy = Math.floor(((minY[i] + maxY[i]) / 2 - y0) * sy);
    h[i] = hilbertIndex(hx, hy);
  }
  // two stable counting-sort passes on 13-bit digits (Hilbert values have 26 bits)
  const order = new Int32Array(n);
  const tmp = new Int32Array(n);
  for (let i = 0; i < n; i++) tmp[i] = i;
  const digits = 1 << HILBERT_BITS;
  const count = new Int32Array(digits + 1);
  for (let pass = 0; pass < 2; pass++) {
    const from = pass === 0 ? tmp : order;
    const to = pass === 0 ? order : tmp;
    const shift = pass * HILBERT_BITS;
    count.fill(0);
    for (let k = 0; k < n; k++) count[((h[from[k]] >>> shift) & (digits - 1)) + 1]++;
    for (let d = 0; d < digits; d++) count[d + 1] += count[d];
    for (let k = 0; k < n; k++) to[count[(h[from[k]] >>> shift) & (digits - 1)]++] = from[k];
  }
  return tmp;
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
