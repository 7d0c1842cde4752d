export { runAnalysis } from './run-analysis.js';
export { resultToJson } from './to-json.js';
export type { AnalysisRequest, AnalysisResult, AnalysisRuntime, InputRecord, ModelKey, WeightsComparison, ComparedFit } from './types.js';
export { prepareAreas, readLayerAndTable, neighboursOf, designOf, type PreparedAreas } from './prepare.js';
export { fitUnderWeights, baseFit, type BaseFit, type UnderWeights, type UnderWeightsOptions } from './fit-under-weights.js';
export type { NamedBytesLike } from './named-bytes.js';
export { LOCAL_STATISTICS, LOCAL_CATEGORY_LABEL, LOCAL_STATISTIC_LABEL, describeControl, categoryCounts, CONTROL_LABEL, type LocalPatterns, type LocalRequest, type LocalOutcome } from './local-patterns.js';
export { parseRateRecipe, type RateResult, type RatesRequest, type RateSmoothing } from './rates.js';
export { MAX_SEED, MAX_PERMUTATIONS, MIN_IMPACT_DRAWS, MAX_IMPACT_DRAWS } from './limits.js';
