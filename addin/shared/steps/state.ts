/** What the sidebar knows and has been told, shared by its steps; and the neighbour rule it makes. */
import type { WeightsSpec, WeightsTransform } from '../../../src/weights/index.js';
import type { CheckRequest, CheckResult, ModelChoice } from '../engine-protocol.js';
import { tickedOf } from '../model-choices.js';
import type { TableSource } from '../host.js';
import type { TableProfile } from '../table-profile.js';
import type { BoundaryFile } from '../types.js';

export type Method = WeightsSpec['method'];

export interface LocalChoice {
  on: boolean; of: string; moran: boolean; gi: boolean; gistar: boolean; permutations: number; seed: number; control: 'fdr' | 'bonferroni' | 'none'; level: number;
}

export interface State {
  source?: TableSource;
  profile?: TableProfile;
  id?: string;
  /** a column of names shown beside the IDs on the per-area sheets (optional) */
  label?: string;
  /** for a boundary file: its ID property when named differently from the table's ID column */
  areas: { kind: 'file'; files: BoundaryFile[]; stored?: boolean; idProperty?: string; suggested?: { property: string } }
    | { kind: 'points'; x?: string; y?: string } | null;
  check?: CheckResult;
  method: Method;
  /** distance band: undefined until the data suggest one or the analyst types one */
  k: number; distance?: number; power: number; order: number;
  /** with order K above 1: every area up to K steps away (else exactly K steps) */
  cumulative: boolean;
  /** the band distance is the one suggested from the data (a new boundary file or coordinates suggest anew) */
  distanceFromData: boolean;
  /** k-nearest: every area tied at the k-th distance becomes a neighbour (else the lower rows fill the places) */
  tiesInclude: boolean;
  transform: WeightsTransform;
  linkUnneighboured: boolean;
  /** the analyst's statement of the coordinates ('' = as the file says, or guessed) */
  coordinates: '' | 'geographic' | 'projected';
  /** match all-digit IDs that differ only by leading zeros: off until the analyst ticks it (recorded in the results) */
  idsIgnoreLeadingZeros: boolean;
  /** refit under the usual alternative neighbour definitions, for a comparison sheet */
  compare: boolean;
  y?: string;
  x: Set<string>;
  /** the engine's models (from its registry), once it has said */
  modelChoices: ModelChoice[] | null;
  /** the models ticked beyond the always-fitted ones; null: the default ones (every model not fitted only on request) */
  models: Set<string> | null;
  robust: boolean; dropMissing: boolean;
  /** where is the pattern? local statistics of one column */
  local: LocalChoice;
  running: boolean;
}

export function initialState(): State {
  return {
    areas: null, method: 'queen', k: 5, distance: undefined, distanceFromData: true, power: 1, order: 1, cumulative: false, tiesInclude: false, transform: 'row', linkUnneighboured: false, idsIgnoreLeadingZeros: false, coordinates: '', compare: false,
    x: new Set(), modelChoices: null, models: null, robust: false, dropMissing: false, running: false,
    local: { on: false, of: 'outcome', moran: true, gi: false, gistar: false, permutations: 999, seed: 20261201, control: 'fdr', level: 0.05 },
  };
}

/** The neighbour rule as chosen. */
export function weightsSpec(s: State): WeightsSpec {
  switch (s.method) {
    case 'queen': case 'rook': return s.order > 1 && s.cumulative ? { method: s.method, order: s.order, cumulative: true } : { method: s.method, order: s.order };
    case 'knn': return s.tiesInclude ? { method: 'knn', k: s.k, ties: 'include' } : { method: 'knn', k: s.k };
    case 'band': return { method: 'band', distance: s.distance ?? NaN };
    case 'idw': return { method: 'idw', power: s.power };
  }
}

/** The neighbour rule; a distance band without a distance yet is left for the check to suggest. */
export function checkSpec(s: State): CheckRequest['weights'] {
  return s.method === 'band' && s.distance === undefined ? { method: 'band' } : weightsSpec(s);
}

/** The boundary file's ID property when it differs from the table's ID column (points carry the table's own IDs). */
export function boundaryId(s: State): string | undefined {
  return s.areas?.kind === 'file' && s.areas.idProperty && s.areas.idProperty !== s.id ? s.areas.idProperty : undefined;
}

/** The ticked models beyond the always-fitted ones (by default every one not fitted only on request). */
export function tickedModels(s: State, choices: ModelChoice[]): Set<string> {
  return tickedOf(s.models, choices);
}
