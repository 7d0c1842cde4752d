/**
 * Static spatial index over axis-aligned boxes, for contiguity's "which boundary segments pass near
 * this vertex" queries: the kept library flatbush (a packed Hilbert R-tree, Kamel & Faloutsos 1994,
 * "Hilbert R-tree: an improved R-tree using fractals"), by the author of kdbush. This adapter keeps
 * one result buffer so that contiguity's loop reads hits without a new array per query.
 */
import Flatbush from 'flatbush';

export class BoxIndex {
  readonly count: number;
  private readonly tree: Flatbush | null;

  constructor(minX: Float64Array, minY: Float64Array, maxX: Float64Array, maxY: Float64Array) {
    const n = minX.length;
    this.count = n;
    if (n === 0) { this.tree = null; return; }
    const tree = new Flatbush(n, 16);
    for (let i = 0; i < n; i++) tree.add(minX[i], minY[i], maxX[i], maxY[i]);
    tree.finish();
    this.tree = tree;
  }

  /** Result buffer of the last search: its first `found` entries are item numbers. */
  results = new Int32Array(64);

  /** Items whose box meets [x0, x1] × [y0, y1]; they go to `results`, and the count is returned. */
  search(x0: number, y0: number, x1: number, y1: number): number {
    if (!this.tree) return 0;
    const hits = this.tree.search(x0, y0, x1, y1);
    if (hits.length > this.results.length) this.results = new Int32Array(Math.max(hits.length, 2 * this.results.length));
    for (let h = 0; h < hits.length; h++) this.results[h] = hits[h];
    return hits.length;
  }
}
