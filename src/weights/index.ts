/**
 * Spatial weights: who neighbours whom, and how much each neighbour counts.
 * Inputs are plain data (IDs, geometries, representative points); output is CSR on typed arrays.
 */
export type { SpatialWeights, WeightsSpec, WeightsSummary, WeightsTransform } from './types.js';
export type { WeightsInput } from './input.js';
export type { BuildOptions } from './build.js';
export type { EdgeListOptions } from './edge-list.js';
export { buildWeights } from './build.js';
export { contiguityNeighbours } from './contiguity.js';
export { higherOrder } from './higher-order.js';
export { summarizeWeights, connectedComponents } from './summary.js';
export { symmetricForm, spatialLag } from './transform.js';
export { readEdgeList, writeEdgeList } from './edge-list.js';
export { subsetWeights } from './subset.js';
export { describeRule, tieWarning } from './describe-rule.js';
export { suggestBandDistance, roundUpTwoFigures, type BandSuggestion } from './band-default.js';
