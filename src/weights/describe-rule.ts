import type { SpatialWeights } from './types.js';
import { formatCount } from '../core/count.js';

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
    case 'knn': return `${w.k} nearest neighbours${w.ties === 'include' ? ', every area tied at the last place included' : ''}`;
    case 'band': return `all areas within distance ${w.distance}`;
    case 'idw': return `inverse distance to the power ${w.power}${w.cutoff !== undefined ? `, up to distance ${w.cutoff}` : ''}`;
    case 'edge-list': return `edge list from ${w.source}`;
  }
}

/** Which of several equally near areas became neighbours was decided by the tie rule, for this many areas. */
export function tieWarning(count: number, spec: SpatialWeights['spec']): string {
  const include = spec.method === 'knn' && spec.ties === 'include';
  return `${formatCount(count)} area(s) had more areas tied at the k-th nearest distance (within 1 part in 10 million) than places left; ` +
    (include
      ? 'every tied area was made a neighbour, so these areas have more than k neighbours.'
      : 'the tied areas of lowest row were taken. Results can change with the row order; including every tied area (--ties include on the command line, "Include every area tied at the last place" in the sidebar) avoids that.');
}
