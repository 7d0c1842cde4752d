/**
 * Everything that depends on the neighbours, for one definition of them: the weights algebra
 * (log-determinant, range, traces), the tests on the plain regression's residuals, the suggestion
 * they lead to, and each asked-for model from the registry. The run's own definition and every
 * alternative in the comparison go through here; so can a caller holding arrays in memory.
 */
import { chooseAlgebra } from '../linalg/index.js';
import type { StartHelperThread } from '../linalg/index.js';
import { symmetricForm } from '../weights/index.js';
import type { SpatialWeights } from '../weights/types.js';
import { inSentence, addNestedTests, designWithIntercept, entriesOf, fitModel, fitOls, recommendModel, type FitOptions, type Fitted, type FittedModels } from '../models/index.js';
import type { Design, LmTests, MoranTest, OlsFit, Recommendation } from '../models/types.js';
import { lmTests, moranResidualTest } from '../stats/index.js';
import { checkSpatialRange } from './check-values.js';
import type { AnalysisResult } from './types.js';

/** What does not depend on the neighbours: the outcome, the design and the plain regression on them. */
export interface BaseFit {
  y: Float64Array;
  design: Design;
  ols: OlsFit;
}

/**
 * The outcome, a design of an intercept and the given columns, and the plain regression on them, from
 * arrays in memory (a cell function's ranges): what `fitUnderWeights` starts from.
 */
export function baseFit(y: Float64Array, x: { name: string; values: Float64Array }[], opts: { robust?: boolean } = {}): BaseFit {
  const design = designWithIntercept(x.map((c) => c.name), x.map((c) => c.values), y.length);
  return { y, design, ols: fitOls(y, design, opts) };
}

export interface UnderWeightsOptions extends FitOptions {
  /** one point per area: orders large sparse factorisations */
  points?: { x: Float64Array; y: Float64Array };
  /** dense or sparse algebra ('auto': by size) */
  method?: 'auto' | 'dense' | 'sparse';
  helper?: StartHelperThread;
  /** told as each step starts (a fraction of this call's work and a stage in words) */
  onProgress?: (fraction: number, stage: string) => void;
  /** told as each step ends: 'algebra', 'tests', a model's key, or '<key> impacts' */
  onStepDone?: (step: string) => void;
}

export interface UnderWeights {
  algebra: AnalysisResult['algebra'];
  moran: MoranTest;
  lm: LmTests;
  recommendation: Recommendation;
  /** the plain regression and each asked-for model, by key */
  fits: FittedModels;
}

/** The residual tests and the asked-for models under one set of weights `w` (the plain regression is always among the fits). */
export function fitUnderWeights(base: BaseFit, w: SpatialWeights, keys: readonly string[], opts: UnderWeightsOptions): UnderWeights {
  const entries = entriesOf(keys);
  const progress = opts.onProgress ?? (() => {});
  const done = opts.onStepDone ?? (() => {});
  progress(0, 'Preparing the log-determinant');
  const algebra = chooseAlgebra(w, symmetricForm(w), { coordinates: opts.points, method: opts.method ?? 'auto', seed: opts.seed, helper: opts.helper });
  try {
    checkSpatialRange(algebra.range, w.description, entries.filter((m) => m.parameters.length > 0));
    done('algebra');
    progress(0.1, 'Testing the residuals for a spatial pattern');
    const moran = moranResidualTest(base.ols, base.design, algebra);
    const lm = lmTests(base.ols, base.design, algebra);
    const recommendation = recommendModel(lm, { fitted: entries.map((m) => m.key) });
    done('tests');
    const prepared = { y: base.y, design: base.design, w: algebra.w, algebra, ols: base.ols };
    const fits: Record<string, Fitted> = {};
    entries.forEach((entry, i) => {
      const { key } = entry;
      const share = (j: number) => 0.2 + (0.8 * (i + j)) / keys.length;
      progress(share(0), `Fitting the ${inSentence(entry.label)}`);
      fits[key] = fitModel(key, prepared, { robust: opts.robust, seed: opts.seed, impactDraws: opts.impactDraws }, () => {
        done(key);
        progress(share(0.5), 'Simulating the spillover effects');
      });
      done(entry.impacts ? `${key} impacts` : key);
    });
    addNestedTests(fits as FittedModels, prepared);
    return {
      algebra: {
        logDeterminant: algebra.logdet.method,
        accuracy: algebra.logdet.accuracy,
        traces: algebra.traceMethod,
        range: { lower: algebra.range.lower, upper: algebra.range.upper, method: algebra.range.method },
      },
      moran, lm, recommendation, fits: fits as FittedModels,
    };
  } finally {
    algebra.dispose?.();
  }
}
