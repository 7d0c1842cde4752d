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

export interface Recommendation {
  /** 'lag' | 'error' | 'ols' | 'either' (both robust tests significant) */
  choice: 'lag' | 'error' | 'ols' | 'either';
  /** One line of guidance naming the rule applied and why. */
  text: string;
  /** The published decision rule applied. */
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
