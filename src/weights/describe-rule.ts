import type { SpatialWeights } from './types.js';

/** A neighbour rule in a few words, as it was asked for ("rook contiguity", "6 nearest neighbours"). */
export function describeRule(w: SpatialWeights['spec']): string {
  switch (w.method) {
    case 'queen':
    case 'rook': {
      const parts = [`${w.method} contiguity`];
      if (w.order && w.order > 1) parts.push(w.cumulative ? `up to ${w.order} steps away` : `exactly ${w.order} steps away`);
      if (w.tolerance !== undefined) parts.push(`snapping tolerance ${w.tolerance}`);
      return parts.join(', ');
    }
    case 'knn': return `${w.k} nearest neighbours`;
    case 'band': return `all areas within distance ${w.distance}`;
    case 'idw': return `inverse distance to the power ${w.power}${w.cutoff !== undefined ? `, up to distance ${w.cutoff}` : ''}`;
    case 'edge-list': return `edge list from ${w.source}`;
  }
}
