/**
 * The one place the model cell functions meet the engine's models, through the model registry
 * (src/models/registry.ts): which models there are (the registry's keys and command-line spellings),
 * fitting one by its entry, its spillover effects when the entry has them, and the tests on the plain
 * regression's residuals. Everything else in the cell functions speaks only of `CellFit`. The weights
 * algebra (log-determinant, admissible range, traces) depends only on the neighbours, so it is kept
 * between recalculations: changing a value in the outcome or an explanatory column refits without
 * rebuilding it.
 */
import { chooseAlgebra, type WeightsAlgebra } from '../../src/linalg/index.js';
import { Recent, twoHashes } from './recent.js';
import {
  areasNeeded as registryAreasNeeded, designWithIntercept, entriesOf, fitOls, MODELS, recommendModel,
  type Coefficient, type Convergence, type Design, type ImpactsResult, type LmTests, type ModelEntry, type ModelFitBase, type MoranTest,
  type ParameterEstimate, type PreparedInputs, type Recommendation,
} from '../../src/models/index.js';
import { lmTests, moranResidualTest } from '../../src/stats/index.js';
import { symmetricForm, type SpatialWeights } from '../../src/weights/index.js';
import { InputError } from '../../src/errors.js';
import { formatCount } from '../../src/core/index.js';

/** The design every model takes (a constant first). */
export { designWithIntercept, type Design };

/** The models as a cell names them: the command line's spellings ("durbin-error"), in the registry's order. */
export const MODEL_SPELLINGS: readonly string[] = MODELS.map((m) => m.cli);

/**
 * The registry key a cell names: the key or the command line's spelling, in any letter case
 * ("lag", "LAG", "error"); null when it names no model.
 */
export function modelKeyOf(text: string): string | null {
  const t = text.trim().toLowerCase();
  return MODELS.find((m) => m.key.toLowerCase() === t || m.cli.toLowerCase() === t)?.key ?? null;
}

/** What one model's fit shows in cells, whatever the model. */
export interface CellFit {
  key: string;
  label: string;
  /** t for least squares, z for the maximum-likelihood models */
  statName: 't' | 'z';
  coefficients: Coefficient[];
  parameters: ParameterEstimate[];
  n: number;
  /** absent for an estimator without a likelihood */
  logLik?: number;
  aic?: number;
  convergence?: Convergence;
  /** which standard errors the coefficients carry: "classical", or how they are robust to unequal variance */
  standardErrors: string;
  warnings: string[];
  /** the entry's own fit, for its effects */
  engineFit: ModelFitBase;
}

/** The inputs every model is fitted on (the registry's prepared inputs). */
export type CellInputs = PreparedInputs;

function entryOf(key: string): ModelEntry {
  return entriesOf([key])[0];
}

/** How many areas a model needs at least: the coefficients, the residual variance and each spatial parameter, plus one. */
export function areasNeeded(key: string, coefficients: number): number {
  return registryAreasNeeded(entryOf(key), coefficients);
}

// ---- the weights algebra, kept for the last few neighbour ranges (a dropped one lets go of its helper thread)
const kept = new Recent<WeightsAlgebra>(3, (algebra) => algebra.dispose?.());

/** The weights' pattern and values under two independent 32-bit hashes (64 bits against a stale hit). */
function weightsKey(w: SpatialWeights): string {
  const { mix, digest } = twoHashes();
  for (const v of w.rowPtr) mix(v);
  for (const v of w.colIdx) mix(v);
  const view = new Uint32Array(w.values.buffer, w.values.byteOffset, w.values.length * 2);
  for (const v of view) mix(v);
  return `${w.n}:${w.colIdx.length}:${digest()}:${w.ids.join('\u0001')}`;
}

function algebraFor(w: SpatialWeights): WeightsAlgebra {
  return kept.get(weightsKey(w), () => chooseAlgebra(w, symmetricForm(w), { method: 'auto', seed: 1 }));
}

/** The plain regression and the weights algebra for one set of ranges (the algebra from the cache when the neighbours are unchanged). */
export function prepareInputs(y: Float64Array, design: Design, w: SpatialWeights, robust = false): CellInputs {
  const ols = fitOls(y, design, { robust });
  const algebra = algebraFor(w);
  return { y, design, w: algebra.w, algebra, ols };
}

/**
 * Fits one model by its registry entry: the entry's fit and headline, nothing more (its effects are
 * simulated only when SPILL.EFFECTS asks). `robust` shows the heteroskedasticity-robust standard
 * errors where the fit has them.
 */
export function fitForCells(key: string, inputs: CellInputs, robust = false): CellFit {
  const entry = entryOf(key);
  const n = inputs.y.length;
  const fit = entry.fit(inputs, { robust, seed: 1, impactDraws: 0 });
  const h = entry.headline(fit);
  if (h.logLik !== undefined && !Number.isFinite(h.logLik)) {
    throw new InputError(`The ${entry.label.toLowerCase()} could not be estimated on these data (its log-likelihood is ${h.logLik}; ${formatCount(n)} areas): the areas are too few or the links too sparse for the spatial parameter.`);
  }
  const robustCoefficients = (fit as { robustCoefficients?: Coefficient[] }).robustCoefficients;
  // which standard errors are shown: White's beside the classical ones (plain regression), or the
  // fit's own covariance kind (neighbours' columns, instruments, moments)
  const kind = (fit as { covarianceKind?: string }).covarianceKind;
  const standardErrors = robust && robustCoefficients && !kind ? 'robust to unequal variance (White 1980, HC0)' : kind ?? 'classical';
  return {
    key: entry.key, label: entry.label, statName: entry.leastSquares ? 't' : 'z',
    coefficients: robust && robustCoefficients ? robustCoefficients : fit.coefficients,
    parameters: h.parameters, n, logLik: h.logLik, aic: h.aic, convergence: h.convergence, standardErrors, warnings: fit.warnings, engineFit: fit,
  };
}

/** The models whose standard errors "robust" changes (those whose fit takes the option and says so), as --models spells them. */
export const ROBUST_MODELS = ['ols', 'slx', 'lag-iv'] as const;

/** Direct, indirect and total effects of a fitted model whose entry has them (simulated standard errors). */
export function effectsForCells(fit: CellFit, inputs: CellInputs, draws: number, seed: number): ImpactsResult {
  const entry = entryOf(fit.key);
  if (!entry.impacts) {
    const withEffects = MODELS.filter((m) => m.impacts).map((m) => `"${m.cli}"`).join(', ');
    throw new InputError(`The ${entry.label.toLowerCase()} has no separate direct and indirect effects (its coefficients are the effects); effects are given for ${withEffects}.`);
  }
  return entry.impacts(fit.engineFit, inputs, { seed, impactDraws: draws });
}

/** Moran's I of the plain regression's residuals, the Lagrange-multiplier tests and the suggestion they lead to. */
export function residualTests(inputs: CellInputs): { moran: MoranTest; lm: LmTests; recommendation: Recommendation } {
  const moran = moranResidualTest(inputs.ols, inputs.design, inputs.algebra);
  const lm = lmTests(inputs.ols, inputs.design, inputs.algebra);
  return { moran, lm, recommendation: recommendModel(lm) };
}
