/**
 * The core's public door, for code outside the engine (the add-in): counts and words in messages,
 * and the types the statistics and the models share. Inside `src/` the stages may import the core's
 * files directly; it imports nothing.
 */
export { formatCount } from './count.js';
export { sayP, sayList, capital, formatBytes } from './words.js';
export type { Design, Coefficient, TestResult, MoranTest, LmTests, RegressionResiduals } from './types.js';
