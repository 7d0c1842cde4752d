/** Messages between the sidebar and the engine worker. Everything here is structured-cloneable. */
import type { AnalysisRequest, NamedBytesLike } from '../../src/pipeline/index.js';
import type { InputLocation } from '../../src/errors.js';
import type { JoinReport, CoordinateKind } from '../../src/geo/index.js';
import type { Report } from '../../src/report/index.js';
import type { BandSuggestion, WeightsSpec, WeightsSummary, WeightsTransform } from '../../src/weights/index.js';
import type { RunOutput, TableSnapshot } from './types.js';

export interface CheckRequest {
  boundary: NamedBytesLike[];
  layer?: string;
  data: NamedBytesLike;
  sheet?: string;
  id: string;
  /** the boundary file's ID property, when it is named differently from the table's column */
  boundaryId?: string;
  /** match all-digit IDs that differ only by leading zeros ("01001" with "1001"), as the analyst asked */
  idsIgnoreLeadingZeros?: boolean;
  /** a distance band without a distance takes the one suggested from the data */
  weights: WeightsSpec | { method: 'band'; distance?: undefined };
  transform: WeightsTransform;
  linkUnneighboured?: boolean;
  /** the analyst's statement of the coordinates, overriding the file and the guess */
  coordinates?: CoordinateKind;
}

export interface CheckResult {
  features: number;
  propertyNames: string[];
  coordinates: CoordinateKind;
  coordinateEvidence: string;
  coordinatesGuessed?: boolean;
  matched: number;
  join: JoinReport;
  /** when the join failed, why (the report above says where) */
  joinError?: string;
  /** when the boundary file has no property named like the ID: its properties holding the table's IDs, best first */
  idCandidates?: { property: string; matches: number; rows: number }[];
  neighbours?: WeightsSummary & { description: string; tiesWarning?: string };
  /** a distance band to start from, derived from where the areas are (absent when no positive distance separates them) */
  bandSuggestion?: BandSuggestion;
  neighboursError?: EngineError;
  warnings: string[];
}

/** One model of the engine's registry, as the sidebar offers it. */
export interface ModelChoice {
  key: string;
  label: string;
  /** what the model says, in a few plain words */
  about: string;
  /** fitted on every run (the plain regression) */
  baseline: boolean;
  /** not ticked until asked for (the wider family of models) */
  onRequest: boolean;
}

export type EngineJob =
  | { op: 'models' }
  | { op: 'sheets'; file: NamedBytesLike }
  | { op: 'table'; file: NamedBytesLike; sheet?: string }
  | { op: 'check'; check: CheckRequest }
  | { op: 'run'; request: Omit<AnalysisRequest, 'onProgress'> }
  | { op: 'workbook'; report: Report; base?: Uint8Array; baseName?: string }
  /** the areas of the last run with their results, as GeoJSON */
  | { op: 'geojson' };

export type EngineAnswer =
  | { op: 'models'; models: ModelChoice[] }
  | { op: 'sheets'; sheets: string[]; /** the hidden ones among them */ hidden?: string[] }
  | { op: 'table'; table: TableSnapshot }
  | { op: 'check'; result: CheckResult }
  | { op: 'run'; output: RunOutput }
  | { op: 'workbook'; bytes: Uint8Array; /** why the results went to a new workbook rather than a copy of the user's */ note?: string }
  | { op: 'geojson'; text: string; areas: number; note: string | null };

export interface EngineError {
  message: string;
  /** true for bad input (InputError): the message is for the analyst */
  input: boolean;
  where?: InputLocation;
  join?: JoinReport;
}

export type WorkerMessage =
  | { id: number; kind: 'progress'; fraction: number; stage: string }
  | { id: number; kind: 'done'; answer: EngineAnswer }
  | { id: number; kind: 'failed'; error: EngineError };
