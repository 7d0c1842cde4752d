import type { CsrMatrix } from '../linalg/index.js';

export type WeightsSpec =
  | { method: 'queen'; tolerance?: number; order?: number; cumulative?: boolean }
  | { method: 'rook'; tolerance?: number; order?: number; cumulative?: boolean }
  /** ties: areas tied at the k-th distance — 'lower-row' (default) keeps k, the lowest rows first; 'include' keeps them all */
  | { method: 'knn'; k: number; ties?: 'lower-row' | 'include' }
  | { method: 'band'; distance: number }
  | { method: 'idw'; power: number; cutoff?: number };

export type WeightsTransform = 'row' | 'binary';

/**
 * Spatial weights on n areas in CSR form. Row i lists the neighbours of area i.
 * No self-links. An area without neighbours is a row with no entries.
 */
export interface SpatialWeights extends CsrMatrix {
  ids: string[];
  /** Plain description of how neighbours were defined, e.g. "queen contiguity (shared point)". */
  description: string;
  spec: WeightsSpec | { method: 'edge-list'; source: string };
  transform: WeightsTransform | 'as given';
  /** Distances were great-circle on lon/lat (true) or planar (false); undefined for contiguity. */
  greatCircle?: boolean;
  /**
   * The weights before the transform when they are symmetric (contiguity, band, symmetric idw);
   * used to form the symmetric matrix similar to a row-standardised W. Null when not symmetric.
   */
  symmetricBase: CsrMatrix | null;
  /**
   * Distance methods (band, inverse distance): the largest nearest-neighbour distance, i.e. the
   * smallest band or cutoff that gives every area at least one neighbour (km on lon/lat).
   */
  allLinkedDistance?: number;
  /** k-nearest: how many areas had their neighbours decided by a tie at the k-th distance */
  tiesDecided?: number;
  /** IDs of areas that had no neighbour and were linked to their nearest area on request. */
  linkedUnneighboured?: string[];
  /** What the analyst should know about how the rule worked out (a tolerance wider than the areas). */
  notes?: string[];
}

export interface WeightsSummary {
  n: number;
  /** directed nonzero entries */
  links: number;
  /** links / n² */
  density: number;
  minNeighbours: number;
  meanNeighbours: number;
  medianNeighbours: number;
  maxNeighbours: number;
  /** [neighbour count, number of areas] ascending */
  histogram: [number, number][];
  withoutNeighbours: string[];
  components: number;
  symmetric: boolean;
}
