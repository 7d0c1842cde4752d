export type * from './types.js';
export { fitOls } from './ols.js';
export { fitSpatialLag } from './ml-lag.js';
export { fitSpatialError } from './ml-error.js';
export { lagImpacts } from './impacts.js';
export { recommendModel } from './recommend.js';
export { denseAlgebra } from '../linalg/index.js';
