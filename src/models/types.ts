import type { Coefficient, RegressionResiduals, TestResult } from '../core/types.js';

export type { Coefficient, Design, LmTests, MoranTest, RegressionResiduals, TestResult } from '../core/types.js';

export interface OlsFit extends RegressionResiduals {
  coefficients: Coefficient[];
  /** heteroskedasticity-robust (White, HC0) coefficients when asked for */
  robustCoefficients?: Coefficient[];
  r2: number;
  adjR2: number;
  f: TestResult & { df2: number };
  /** e'e / (n − k) */
  sigma2: number;
  /** e'e / n, the ML estimate */
  sigma2ML: number;
  logLik: number;
  aic: number;
  bic: number;
  conditionNumber: number;
  jarqueBera: TestResult;
  breuschPagan: TestResult;
  breuschPaganStudentised: TestResult;
  warnings: string[];
}

/**
 * A spatial model the Lagrange-multiplier decision rule can point to: the registry keys of the two
 * models its tests speak for (the tests are for a spatial lag and for a spatial error).
 */
export type SpatialModelName = 'lag' | 'error';

export interface Recommendation {
  /**
   * 'lag' | 'error': the rule points to that model; 'ols': neither test is significant; 'either': both
   * plain tests are significant but neither robust form is, so the tests do not separate the two models.
   */
  choice: 'lag' | 'error' | 'ols' | 'either';
  /** The models the reading asks to be reported: the suggestion, both spatial models when the tests do not separate them, or every model a borderline call could go to. */
  models: ('ols' | SpatialModelName)[];
  /** The call would change had the significance level been halved or doubled (see `close`). */
  borderline: boolean;
  /** The band of levels that defines "close to the level": a p-value in [lower, upper) can flip the call. */
  close: { lower: number; upper: number };
  /** Which of the four Lagrange-multiplier tests are significant at `alpha`. */
  significant: { error: boolean; lag: boolean; robustError: boolean; robustLag: boolean };
  /** Both robust forms are significant: a model with both a lag and an error term is worth considering. */
  bothKinds: boolean;
  /** Every spatial model among `models` was fitted in this run. */
  fitted: boolean;
  /** The spatial models among `models` that this run did not fit (empty when `fitted`). */
  notFitted: SpatialModelName[];
  /** Guidance in a few sentences: the branch of the rule, the p-values it turned on, what was not fitted. */
  text: string;
  /** The published decision rule applied, and this tool's rule for "close". */
  rule: string;
  alpha: number;
}

/** How a 1-D maximisation went; reported, never silent. */
export interface Convergence {
  converged: boolean;
  iterations: number;
  /** final bracket width on the parameter */
  tolerance: number;
  /** set when the maximum lies on (or within tolerance of) a bound of the admissible range */
  atBound?: 'lower' | 'upper';
  message: string;
}

export interface SpatialFit {
  model: 'lag' | 'error';
  /** ρ for lag, λ for error */
  parameter: number;
  parameterSe: number;
  parameterZ: number;
  parameterP: number;
  coefficients: Coefficient[];
  sigma2: number;
  logLik: number;
  aic: number;
  bic: number;
  /** LR test against OLS, df 1 */
  lr: TestResult;
  /** squared correlation of observed and fitted */
  pseudoR2: number;
  residuals: Float64Array;
  fitted: Float64Array;
  /** lag model: LM test for remaining spatial error autocorrelation; error model: absent */
  lmRemainingError?: TestResult;
  /** lag model: LM test for remaining lag dependence; error model */
  lmRemainingLag?: TestResult;
  breuschPagan: TestResult;
  /** full asymptotic variance of (β, parameter, σ²) in that order */
  covariance: Float64Array;
  range: { lower: number; upper: number };
  logDeterminantMethod: string;
  convergence: Convergence;
  warnings: string[];
}

export interface Impact {
  name: string;
  direct: number;
  indirect: number;
  total: number;
  directSe: number;
  indirectSe: number;
  totalSe: number;
  directP: number;
  indirectP: number;
  totalP: number;
}

export interface ImpactsResult {
  impacts: Impact[];
  draws: number;
  seed: number;
  method: string;
  /** what the user must know about these figures (e.g. no standard errors, and why) */
  warnings?: string[];
}
