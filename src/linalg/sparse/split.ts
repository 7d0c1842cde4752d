/**
 * Splits a multifrontal factorisation between two threads (subtree-to-thread mapping, as in
 * Geist & Ng 1989, "Task scheduling for parallel sparse Cholesky factorization"): the assembly
 * tree is cut below its top supernodes so that the subtrees hanging under the cut fall into two
 * groups of about equal work (k³/3 + k²r + kr² multiply-adds per supernode of k columns and r rows
 * below). Each group runs on its own thread; the top supernodes (the first separators of the nested
 * dissection) run afterwards on one. Nested dissection makes such a cut cheap: its first separator
 * splits the areas into two halves of about equal work.
 */
import type { SymbolicFactor } from './symbolic.js';
import type { FactorSplit } from './frontal.js';

/** Work below which a split is not worth the hand-over (a few milliseconds of multiply-adds). */
export const SPLIT_MIN_WORK = 2e7;

export function planSplit(sym: SymbolicFactor): FactorSplit | null {
  const { superCount, superFirst, rowPtr, superParent } = sym;
  const work = new Float64Array(superCount);
  const subtree = new Float64Array(superCount);
  const firstBelow = new Int32Array(superCount);
  for (let s = 0; s < superCount; s++) firstBelow[s] = s;
  const childCount = new Int32Array(superCount + 1);
  for (let s = 0; s < superCount; s++) {
    const k = superFirst[s + 1] - superFirst[s];
    const r = rowPtr[s + 1] - rowPtr[s] - k;
    work[s] = (k * k * k) / 3 + k * k * r + k * r * r;
    subtree[s] += work[s];
    const p = superParent[s];
    if (p >= 0) {
      subtree[p] += subtree[s];
      if (firstBelow[s] < firstBelow[p]) firstBelow[p] = firstBelow[s];
      childCount[p + 1]++;
    }
  }
  let total = 0;
  for (let s = 0; s < superCount; s++) if (superParent[s] < 0) total += subtree[s];
  if (total < SPLIT_MIN_WORK) return null;
  // each subtree must be a contiguous range ending at its root (postorder), or the groups overlap
  const size = new Int32Array(superCount).fill(1);
  for (let s = 0; s < superCount; s++) if (superParent[s] >= 0) size[superParent[s]] += size[s];
  for (let s = 0; s < superCount; s++) if (s - firstBelow[s] + 1 !== size[s]) return null;

  for (let s = 0; s < superCount; s++) childCount[s + 1] += childCount[s];
  const childPtr = childCount;
  const childList = new Int32Array(Math.max(1, childPtr[superCount]));
  const fill = childPtr.slice(0, superCount);
  for (let s = 0; s < superCount; s++) if (superParent[s] >= 0) childList[fill[superParent[s]]++] = s;

  // move the heaviest hanging subtree's root to the top until the two groups balance
  let hanging: number[] = [];
  for (let s = 0; s < superCount; s++) if (superParent[s] < 0) hanging.push(s);
  const top: number[] = [];
  let topWork = 0;
  let best: { hanging: number[]; top: number[]; groupOf: Int8Array; cost: number } | null = null;
  for (let step = 0; step < 64 && hanging.length <= 256; step++) {
    const { groupOf, heavier } = balance(hanging, subtree);
    const cost = heavier + topWork;
    if (!best || cost < best.cost) best = { hanging: hanging.slice(), top: top.slice(), groupOf, cost };
    if (heavier <= 0.52 * (total - topWork)) break;
    let heaviest = -1;
    for (const s of hanging) if (childPtr[s + 1] > childPtr[s] && (heaviest < 0 || subtree[s] > subtree[heaviest])) heaviest = s;
    if (heaviest < 0) break;
    hanging = hanging.filter((s) => s !== heaviest);
    for (let c = childPtr[heaviest]; c < childPtr[heaviest + 1]; c++) hanging.push(childList[c]);
    top.push(heaviest);
    topWork += work[heaviest];
  }
  // worth it only when the longer group plus the top is clearly less than the whole
  if (!best || best.cost > 0.8 * total) return null;

  const exportAt = new Float64Array(superCount).fill(-1);
  let storeSize = 0;
  const give = (s: number) => {
    const k = superFirst[s + 1] - superFirst[s];
    const r = rowPtr[s + 1] - rowPtr[s] - k;
    if (r > 0) { exportAt[s] = storeSize; storeSize += r * r; }
  };
  const groups: [number[], number[]] = [[], []];
  best.hanging.forEach((s, i) => {
    groups[best!.groupOf[i]].push(firstBelow[s], s + 1);
    give(s);
  });
  const topSorted = Int32Array.from(best.top).sort();
  for (const s of topSorted) give(s);
  return {
    groups: [Int32Array.from(groups[0]), Int32Array.from(groups[1])],
    top: topSorted,
    exportAt,
    storeSize: Math.max(1, storeSize),
    childPtr,
    childList,
  };
}

/** Largest-first greedy partition of the hanging subtrees into two groups; the heavier group's work. */
function balance(hanging: number[], subtree: Float64Array): { groupOf: Int8Array; heavier: number } {
  const order = hanging.map((_, i) => i).sort((a, b) => subtree[hanging[b]] - subtree[hanging[a]]);
  const groupOf = new Int8Array(hanging.length);
  const load = [0, 0];
  for (const i of order) {
    const g = load[0] <= load[1] ? 0 : 1;
    groupOf[i] = g;
    load[g] += subtree[hanging[i]];
  }
  return { groupOf, heavier: Math.max(load[0], load[1]) };
}
