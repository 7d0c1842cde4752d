export { runAnalysis } from './run-analysis.js';
export { resultToJson } from './to-json.js';
export type { AnalysisRequest, AnalysisResult, AnalysisRuntime, InputRecord, ModelName } from './types.js';
export type { NamedBytesLike } from './named-bytes.js';
