// The seeded generator lives below every stage (src/linalg/random.ts): one generator for the
// permutation tests, the impact simulations and the trace probes.
export { seededRandom, normalSampler } from '../linalg/index.js';
