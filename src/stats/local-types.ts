/** Which local statistic: local Moran's Iᵢ, Getis–Ord Gᵢ (area left out) or Gᵢ* (area included). */
export type LocalStatisticKind = 'moran' | 'gi' | 'gistar';

/** How many local tests are controlled together, and at what level. */
export interface MultipleTestingControl {
  method: 'fdr' | 'bonferroni' | 'none';
  /** the false discovery rate (fdr), the family-wise level (bonferroni) or the per-test level (none) */
  level: number;
}

/**
 * Where an area sits against its neighbours, for local Moran: its own value above or below the mean,
 * and its neighbours' average above or below the mean; `none` when the area has no neighbours.
 */
export type LocalCategory = 'high-high' | 'low-low' | 'high-low' | 'low-high' | 'not-significant' | 'no-neighbours';

/** One local statistic for every area, in the order of the weights' rows. */
export interface LocalStatistic {
  kind: LocalStatisticKind;
  value: Float64Array;
  /** expectation and variance under total randomisation (analytic) */
  expected: Float64Array;
  variance: Float64Array;
  z: Float64Array;
  /** two-sided normal p of z */
  p: Float64Array;
  /** conditional permutation pseudo p-value (Anselin 1995), present when permutations > 0 */
  pPermutation?: Float64Array;
  permutations: number;
  seed: number;
  /** number of neighbours of each area (0: the statistic is undefined there) */
  neighbourCount: Int32Array;
}

/** The rule by which pseudo p-values are counted; written beside every result that carries them. */
export const PERMUTATION_RULE =
  'Conditional permutation (Anselin 1995): each area keeps its own value while the other n − 1 values are ' +
  'reshuffled over its neighbours. Pseudo p = (M + 1)/(R + 1), where R is the number of permutations and M ' +
  'the number of permuted statistics at least as extreme as the observed one in the observed direction ' +
  '(at or above it when the observed value is above its expectation, at or below it otherwise). The draws ' +
  'of one permutation are shared by all areas, which the method allows.';
