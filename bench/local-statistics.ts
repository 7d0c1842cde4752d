/** Bench workload: local Moran and Gi* with 999 conditional permutations on rook grids (invented values). */
import { getisOrd, localMoranTest } from '../src/stats/index.js';
import { csrFromNeighbours, rookNeighbours } from '../test/helpers/grid.js';

export function localStatisticsWorkload(side: number): Record<string, unknown> {
  const n = side * side;
  const w = csrFromNeighbours(rookNeighbours(side, side), 'row');
  // a smooth pattern plus a deterministic wobble, all positive so Gi* applies
  const v = Float64Array.from({ length: n }, (_, i) => 5 + Math.sin((i % side) / 9) + Math.cos(Math.floor(i / side) / 7) + ((i * 7919) % 13) / 10);
  let t = performance.now();
  localMoranTest(v, w, { permutations: 999, seed: 1 });
  const moranSeconds = (performance.now() - t) / 1000;
  t = performance.now();
  getisOrd(v, w, { star: true, permutations: 999, seed: 1 });
  const giStarSeconds = (performance.now() - t) / 1000;
  return { workload: `local statistics, rook grid ${side}x${side}, 999 permutations`, n, moranSeconds: +moranSeconds.toFixed(3), giStarSeconds: +giStarSeconds.toFixed(3) };
}
