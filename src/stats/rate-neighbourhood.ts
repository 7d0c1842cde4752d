import type { CsrMatrix } from '../linalg/index.js';
import { neighbourhoodOf } from './eb-local.js';

/**
 * Neighbourhood rate smoother (spatial rate smoother): for each area the pooled rate
 * Σ_{j∈Nᵢ} d_j / Σ_{j∈Nᵢ} n_j over Nᵢ, the area and its neighbours under the run's weights.
 */
export function neighbourhoodRate(events: ArrayLike<number>, population: ArrayLike<number>, w: CsrMatrix): Float64Array {
  const out = new Float64Array(events.length);
  for (let i = 0; i < events.length; i++) {
    let sd = 0;
    let sn = 0;
    for (const j of neighbourhoodOf(w, i)) {
      sd += events[j];
      sn += population[j];
    }
    out[i] = sd / sn;
  }
  return out;
}
