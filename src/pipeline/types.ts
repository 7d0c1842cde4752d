import type { StartHelperThread } from '../linalg/index.js';
import type { NamedBytesLike } from './named-bytes.js';
import type { WeightsSpec, WeightsTransform, WeightsSummary } from '../weights/types.js';
import type {
  Coefficient, Convergence, Impact, LmTests, MoranTest, OlsFit, Recommendation, TestResult,
} from '../models/types.js';
import type { FittedModels, ModelKey, ParameterEstimate } from '../models/index.js';
import type { AreaGeometry, JoinReport, CoordinateKind } from '../geo/types.js';
import type { LocalPatterns, LocalRequest } from './local-patterns.js';
import type { RateResult, RatesRequest } from './rates.js';

export type { ModelKey };

/** One analysis as the user asked for it. Files come as bytes so the same request runs in Node and the browser. */
/** What the platform offers the engine beyond bytes in (not part of the request: no figure depends on it). */
export interface AnalysisRuntime {
  /** starts a second thread for large sparse factorisations (the command line: a Node worker) */
  helper?: StartHelperThread;
}

export interface AnalysisRequest {
  boundary: NamedBytesLike[];
  /** Which object of a TopoJSON file (default: the first). */
  layer?: string;
  /** Overrides what the coordinates are taken to be (when the file says nothing and the ranges mislead). */
  coordinates?: 'geographic' | 'projected';
  /** Data table (CSV or .xlsx); when absent the boundary file's own attributes are used. */
  data?: NamedBytesLike;
  sheet?: string;
  /** The column identifying each area in the table (and, unless `boundaryId` says otherwise, in the boundary file). */
  id: string;
  /** The boundary file's property holding the same IDs, when it is named differently from the table's column. */
  boundaryId?: string;
  /** Match all-digit IDs that differ only by leading zeros ("005" with "5"); off by default, recorded when on. */
  idsIgnoreLeadingZeros?: boolean;
  /** A column of names (or other labels) shown beside the IDs on the per-area sheets and in the JSON. */
  label?: string;
  y: string;
  x: string[];
  weights: WeightsSpec;
  /**
   * Other neighbour definitions under which to refit the residual tests and spatial models, side by
   * side (at most 6); 'suggested' picks the usual alternatives to the run's own definition.
   */
  compareWeights?: WeightsSpec[] | 'suggested';
  /** An edge list that replaces `weights` when given (origin, neighbour, weight). */
  edgeList?: NamedBytesLike;
  transform: WeightsTransform;
  linkUnneighboured?: boolean;
  /** registry keys of the models to fit (the plain regression is always fitted); empty: every model not marked `onRequest` (the plain, lag and error models) */
  models: ModelKey[];
  /** Drop rows with missing values (and re-build the weights on the remaining areas) instead of refusing. */
  dropMissing?: boolean;
  robust?: boolean;
  seed?: number;
  impactDraws?: number;
  permutations?: number;
  /** Local statistics (where the pattern is): which, of what, with which multiple-testing control. */
  local?: LocalRequest;
  /** Rates built from counts (--rate NAME=EVENTS/POPULATION) and which smoothed rate is modelled. */
  rates?: RatesRequest;
  /** Cap in bytes on each input file and on what a .zip or .xlsx may expand to (default 1 GiB). */
  maxBytes?: number;
  /** 'auto' chooses dense for small n, sparse above. */
  algebra?: 'auto' | 'dense' | 'sparse';
  /** Called with a fraction in [0, 1] and a stage label; lets a sidebar show progress. */
  onProgress?: (fraction: number, stage: string) => void;
}

export interface InputRecord {
  role: 'boundary' | 'data' | 'edge list';
  name: string;
  bytes: number;
  sha256: string;
}

/** Everything one run produced; the report model, the CLI and the add-in read this. */
export interface AnalysisResult {
  engineVersion: string;
  createdAt: string;
  request: {
    id: string; boundaryId?: string; idsIgnoreLeadingZeros?: boolean; label?: string; y: string; x: string[]; sheet?: string;
    weights: WeightsSpec | { method: 'edge-list'; source: string };
    transform: WeightsTransform | 'as given';
    models: ModelKey[]; dropMissing: boolean; robust: boolean;
    seed: number; impactDraws: number; permutations: number;
    compareWeights?: WeightsSpec[];
    local?: Required<LocalRequest>;
    rates?: Required<RatesRequest>;
  };
  inputs: InputRecord[];
  n: number;
  ids: string[];
  /** the label column's text per area (when a label column was asked for), in the same order */
  labels?: string[];
  /** user-visible table rows of the areas, in table order */
  rows: number[];
  droppedRows: { row: number; id: string; columns: string[] }[];
  /** geometry per area, in the same order (for maps) */
  geometries: AreaGeometry[];
  coordinates: CoordinateKind;
  coordinateEvidence: string;
  /** neither the file nor the request said what the coordinates are: the kind was guessed */
  coordinatesGuessed?: boolean;
  /** projected coordinates: their length unit when the boundary file states it (for scale bars) */
  coordinateUnit?: 'metre' | 'foot' | 'us-foot';
  join: JoinReport;
  y: Float64Array;
  xNames: string[];
  weights: {
    method: string;
    description: string;
    transform: WeightsTransform | 'as given';
    links: number;
    withoutNeighbours: string[];
    components: number;
    summary: WeightsSummary;
    /** directed edge list in row order: origin index, neighbour index, weight */
    edges: { from: Int32Array; to: Int32Array; weight: Float64Array };
  };
  algebra: { logDeterminant: string; accuracy: string; traces: string; range: { lower: number; upper: number; method: string } };
  /** the plain regression with the tests on its residuals that every spatial model starts from */
  ols: OlsFit & { moran: MoranTest; lm: LmTests; recommendation: Recommendation };
  /** every model fitted, by registry key (the plain regression too), each with its neighbours' average residual and its effects */
  fits: FittedModels;
  /** Moran's I of y itself (randomisation and permutation) for the scatter plot and overview. */
  moranY: MoranTest & { permutationP?: number; permutations?: number };
  /** the run's neighbour definition and each asked-for alternative, when alternatives were asked for */
  comparison?: WeightsComparison[];
  /** local statistics, when asked for */
  local?: LocalPatterns;
  /** rates built from counts, when defined */
  rates?: RateResult[];
  warnings: string[];
  timings: Record<string, number>;
}

export type { Coefficient, Convergence, TestResult };

/** A model's headline figures under one neighbour definition. */
export interface ComparedFit {
  /** its spatial parameters (ρ, λ) */
  parameters: ParameterEstimate[];
  /** absent for estimators without a likelihood */
  logLik?: number;
  aic?: number;
  /** converged inside the admissible range */
  converged: boolean;
  /** direct, indirect and total effects per explanatory column (simulated SEs, same draws and seed as the run) */
  impacts?: Impact[];
}

/** One neighbour definition in the comparison (NaN where it could not be built; `failed` says why). */
export interface WeightsComparison {
  /** a few words ("rook contiguity", "6 nearest neighbours") for tables */
  label: string;
  /** the definition in full, as the weights describe themselves */
  description: string;
  /** the run's own definition (the first row) */
  asRun: boolean;
  links: number;
  meanNeighbours: number;
  withoutNeighbours: number;
  components: number;
  /** Moran's I of the plain regression's residuals under this definition */
  moran: { I: number; z: number; p: number };
  /** p-values of the Lagrange-multiplier tests */
  lmP: { error: number; lag: number; robustError: number; robustLag: number };
  suggestion?: Recommendation['choice'];
  /** the suggestion turns on p-values close to the level (see Recommendation.borderline) */
  borderline?: boolean;
  /** this definition links exactly the same neighbours as the earlier one named here: its figures are that one's */
  sameAs?: string;
  /** k-nearest neighbours: how many areas had their neighbours decided by the tie rule (more areas at the k-th distance than places left) */
  tiesDecided?: number;
  /** the warning that says so, as the run gives for its own definition */
  tiesWarning?: string;
  /** the spatial models under this definition, by registry key */
  fits: { [K in ModelKey]?: ComparedFit };
  failed?: string;
}
