/**
 * What a model registry entry is: the inputs every model is fitted on, the entry's fields, the
 * headline figures every model reports in one shape, and the JSON pieces the entries share. The
 * entries themselves are in `registry.ts`.
 */
import type { CsrMatrix, WeightsAlgebra } from '../linalg/index.js';
import type { Coefficient, Convergence, Design, ImpactsResult, OlsFit, SpatialFit, TestResult } from './types.js';

/** What every model is fitted on: arrays and the neighbours, no files. */
export interface PreparedInputs {
  y: Float64Array;
  design: Design;
  /** W, the weights of the neighbours (the matrix of `algebra`) */
  w: CsrMatrix;
  /** log-determinant, admissible range and traces of W */
  algebra: WeightsAlgebra;
  /** the plain regression on the same y and design: each spatial search starts from it, and LR tests are against it */
  ols: OlsFit;
}

export interface FitOptions {
  /** standard errors robust to unequal variance, where the estimator offers them */
  robust?: boolean;
  /** seed of the simulated draws (spillover effects) */
  seed: number;
  /** simulated draws for the spillover effects' standard errors */
  impactDraws: number;
}

/** A spatial parameter as tables and the JSON name it. */
export interface ParameterName {
  /** JSON field: `rho`, `rhoSe`, `rhoZ`, `rhoP` */
  key: string;
  /** Greek letter in tables */
  symbol: string;
  /** what it measures, in a few words */
  name: string;
}

export interface ParameterEstimate extends ParameterName {
  estimate: number;
  se: number;
  z: number;
  p: number;
}

/** What every model's fit carries, whatever else it has. */
export interface ModelFitBase {
  coefficients: Coefficient[];
  residuals: Float64Array;
  fitted: Float64Array;
  warnings: string[];
}

/** One fit's headline figures, the same shape for every model (absent where the estimator has none, e.g. no likelihood for IV/GMM). */
export interface Headline {
  parameters: ParameterEstimate[];
  logLik?: number;
  aic?: number;
  bic?: number;
  /** likelihood-ratio test against the plain regression */
  lr?: TestResult;
  /** R² for least squares; the squared correlation of observed and fitted otherwise */
  r2: number;
  /** residual variance */
  sigma2: number;
  /** how the search for the spatial parameters went */
  convergence?: Convergence;
  /** the admissible range searched */
  range?: { lower: number; upper: number };
}

export interface ModelEntry<K extends string = string, F extends ModelFitBase = ModelFitBase> {
  /** the model's key, also its key in the JSON report */
  key: K;
  /** how `--models` spells it */
  cli: string;
  /** plain label, as sheets and messages name the model */
  label: string;
  /** what the model says, in a few plain words (the sidebar's choice, the command line's heading) */
  about: string;
  /** how it is estimated, for titles ("by maximum likelihood"); display text only, never compared */
  method: string;
  /**
   * Estimated by ordinary least squares: its coefficients carry t statistics, its R² is the usual one
   * and its residual variance is divided by n − k (the others: z statistics, a pseudo R², σ² over n).
   */
  leastSquares?: true;
  /** the plain regression: fitted on every run, since every test and spatial model starts from it */
  baseline?: true;
  /**
   * Fitted only when asked for by name (or with all): a run that names no models fits the others.
   * The wider family (lagged columns, both spillovers, instruments and moments) is asked for; the
   * plain, lag and error models that the Lagrange-multiplier rule chooses between are not.
   */
  onRequest?: true;
  /** its design adds the neighbours' average of each explanatory column (the WX terms): more coefficients to estimate */
  lagsColumns?: true;
  /** its spatial parameters, in order (none for the plain regression) */
  parameters: readonly ParameterName[];
  fit(p: PreparedInputs, o: FitOptions): F;
  headline(fit: F): Headline;
  /** direct, indirect and total effects, for models that have them */
  impacts?(fit: F, p: PreparedInputs, o: FitOptions): ImpactsResult;
  /**
   * Models this one nests (it reduces to each under a restriction): when both are fitted by maximum
   * likelihood the run adds a likelihood-ratio test of the restriction to this model's fit. The test
   * against the plain regression is the fit's own `lr`.
   */
  nests?: readonly NestedModel[];
  /**
   * The lag model's effects sit at the top of the JSON report (`impacts`, `impactsMethod`) and at the
   * top of each comparison row, where they were first published; every other model's go inside its own object.
   */
  impactsAtTop?: true;
  /** the model's object in the JSON report (the fit as the run keeps it: with its nested tests, if any) */
  json(fit: Fitted<F>): Record<string, unknown>;
}

/** A model that another nests, and the restriction that turns the general model into it. */
export interface NestedModel {
  /** the nested model's key */
  key: string;
  /** the restriction in symbols, e.g. "θ = 0" */
  restriction: string;
  /** the number of restrictions (the test's degrees of freedom) on these inputs */
  df(p: PreparedInputs): number;
}

/** A likelihood-ratio test of a nested model against the general one: 2(ℓ_general − ℓ_nested) on df restrictions. */
export interface NestedTest extends TestResult {
  /** the nested model's key */
  against: string;
  restriction: string;
}

/** A fitted model as a run keeps it: the fit, its residuals' spatial lag, and its effects when it has them. */
export type Fitted<F extends ModelFitBase = ModelFitBase> = F & {
  /** neighbours' average residual (W e) */
  residualLag: Float64Array;
  impacts?: ImpactsResult;
  /** likelihood-ratio tests against the models it nests that were fitted too */
  nestedTests?: NestedTest[];
};

/** Keeps an entry's key and fit types for the registry's types. */
export function defineModel<K extends string, F extends ModelFitBase>(entry: ModelEntry<K, F>): ModelEntry<K, F> {
  return entry;
}

/** Headline figures of the lag and error models' fits. */
export function spatialHeadline(f: SpatialFit, name: ParameterName): Headline {
  return {
    parameters: [{ ...name, estimate: f.parameter, se: f.parameterSe, z: f.parameterZ, p: f.parameterP }],
    logLik: f.logLik, aic: f.aic, bic: f.bic, lr: f.lr, r2: f.pseudoR2, sigma2: f.sigma2, convergence: f.convergence, range: f.range,
  };
}

/** A coefficient in the JSON report; a neighbours' average of a column (WX term) carries `lagged: true`. */
export function coefficientJson(c: Coefficient) {
  return { name: c.name, estimate: c.estimate, se: c.se, stat: c.stat, p: c.p, ...(c.lagged ? { lagged: true } : {}) };
}

export function testJson(t: TestResult) {
  return { stat: t.stat, df: t.df, p: t.p };
}

/** The JSON object of the lag and error models (`key` names the spatial parameter: rho, lambda). */
export function spatialJson(f: SpatialFit, key: string): Record<string, unknown> {
  return {
    [key]: f.parameter,
    [`${key}Se`]: f.parameterSe,
    [`${key}Z`]: f.parameterZ,
    [`${key}P`]: f.parameterP,
    coefficients: f.coefficients.map(coefficientJson),
    sigma2: f.sigma2,
    logLik: f.logLik,
    aic: f.aic,
    bic: f.bic,
    lr: testJson(f.lr),
    pseudoR2: f.pseudoR2,
    ...(f.lmRemainingError ? { lmRemainingError: testJson(f.lmRemainingError) } : {}),
    ...(f.lmRemainingLag ? { lmRemainingLag: testJson(f.lmRemainingLag) } : {}),
    breuschPagan: testJson(f.breuschPagan),
    range: f.range,
    logDeterminant: f.logDeterminantMethod,
    convergence: f.convergence,
    warnings: f.warnings,
  };
}
