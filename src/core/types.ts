/**
 * Types that the statistics and the models share, below both stages: the regressors, a coefficient,
 * a test result, Moran's I and the Lagrange-multiplier tests. Plain data; this folder imports nothing
 * (count.ts: how a count reads in a message, for every stage).
 */

/** Regressors: column vectors with their names, and which one (if any) is the intercept. */
export interface Design {
  names: string[];
  columns: Float64Array[];
  /**
   * Index of the intercept column (all ones), or null for a design without one. Decisions about the
   * intercept read this, never the column's name: a user's own column may be called "constant".
   */
  intercept: number | null;
}

export interface Coefficient {
  name: string;
  estimate: number;
  se: number;
  /** t for least squares, z for ML models */
  stat: number;
  p: number;
  /** set on the intercept's coefficient */
  intercept?: true;
  /** set on a neighbours' average of an explanatory column (a WX term) */
  lagged?: true;
}

export interface TestResult {
  stat: number;
  df: number;
  p: number;
}

export interface MoranTest {
  I: number;
  expected: number;
  variance: number;
  z: number;
  /** two-sided normal p */
  p: number;
}

export interface LmTests {
  error: TestResult;
  lag: TestResult;
  robustError: TestResult;
  robustLag: TestResult;
  joint: TestResult;
}

/** What the residual tests need from a least-squares fit. */
export interface RegressionResiduals {
  /** areas */
  n: number;
  /** coefficients */
  k: number;
  residuals: Float64Array;
  fitted: Float64Array;
}
