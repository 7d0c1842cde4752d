/**
 * The one place the model cell functions meet the engine's models: which models there are (by key),
 * fitting one, its spillover effects, and the tests on the plain regression's residuals. Everything
 * else in the cell functions speaks only of `CellFit`. The weights algebra (log-determinant,
 * admissible range, traces) depends only on the neighbours, so it is kept between recalculations:
 * changing a value in the outcome or an explanatory column refits without rebuilding it.
 */
import { chooseAlgebra } from '../../src/linalg/choose-algebra.js';
import type { WeightsAlgebra } from '../../src/linalg/algebra.js';
import {
  fitOls, fitSpatialError, fitSpatialLag, lagImpacts, recommendModel,
  type Coefficient, type Convergence, type Design, type ImpactsResult, type LmTests, type MoranTest, type OlsFit, type Recommendation, type SpatialFit,
} from '../../src/models/index.js';
import { lmTests, moranResidualTest } from '../../src/stats/index.js';
import { symmetricForm, type SpatialWeights } from '../../src/weights/index.js';
import { InputError } from '../../src/errors.js';

/** A spatial parameter as a table names it. */
export interface CellParameter { symbol: string; name: string; estimate: number; se: number; z: number; p: number }

interface ModelInfo { key: string; label: string; parameters: { symbol: string; name: string }[]; hasEffects: boolean }

const MODELS: readonly ModelInfo[] = [
  { key: 'ols', label: 'Plain regression', parameters: [], hasEffects: false },
  { key: 'lag', label: 'Spatial lag model', parameters: [{ symbol: 'ρ', name: 'spillover of the outcome' }], hasEffects: true },
  { key: 'error', label: 'Spatial error model', parameters: [{ symbol: 'λ', name: 'spillover of the errors' }], hasEffects: false },
];

/** The model keys a cell may name, in the order the models are listed. */
export const MODEL_KEYS: readonly string[] = MODELS.map((m) => m.key);

/** What one model's fit shows in cells, whatever the model. */
export interface CellFit {
  key: string;
  label: string;
  /** t for least squares, z for the maximum-likelihood models */
  statName: 't' | 'z';
  coefficients: Coefficient[];
  parameters: CellParameter[];
  n: number;
  logLik: number;
  aic: number;
  convergence?: Convergence;
  warnings: string[];
  /** the engine's own fit, for the effects */
  engineFit: OlsFit | SpatialFit;
}

/** The inputs every model is fitted on. */
export interface CellInputs {
  y: Float64Array;
  design: Design;
  w: SpatialWeights;
  algebra: WeightsAlgebra;
  ols: OlsFit;
}

function info(key: string): ModelInfo {
  const m = MODELS.find((x) => x.key === key);
  if (!m) throw new InputError(`The model "${key}" is not one Spillway fits; choose from ${MODEL_KEYS.map((k) => `"${k}"`).join(', ')}.`);
  return m;
}

/** How many areas a model needs at least: the coefficients, the residual variance and each spatial parameter, plus one. */
export function areasNeeded(key: string, coefficients: number): number {
  return coefficients + info(key).parameters.length + 2;
}

// ---- the weights algebra, kept for the last few neighbour ranges
const KEEP = 3;
const kept: { key: string; algebra: WeightsAlgebra }[] = [];

/** The weights' pattern and values under two independent 32-bit hashes (64 bits against a stale hit). */
function weightsKey(w: SpatialWeights): string {
  let h = 0x811c9dc5;
  let g = 0x9747b28c;
  const mix = (x: number) => {
    h = Math.imul(h ^ x, 0x01000193);
    g = Math.imul((g ^ x) << 13 | (g ^ x) >>> 19, 0x5bd1e995) + 0x6b43a9b5;
  };
  for (const v of w.rowPtr) mix(v);
  for (const v of w.colIdx) mix(v);
  const view = new Uint32Array(w.values.buffer, w.values.byteOffset, w.values.length * 2);
  for (const v of view) mix(v);
  return `${w.n}:${w.colIdx.length}:${(h >>> 0).toString(16)}${(g >>> 0).toString(16)}:${w.ids.join('\u0001')}`;
}

function algebraFor(w: SpatialWeights): WeightsAlgebra {
  const key = weightsKey(w);
  const at = kept.findIndex((k) => k.key === key);
  if (at >= 0) {
    const [hit] = kept.splice(at, 1);
    kept.unshift(hit);
    return hit.algebra;
  }
  const algebra = chooseAlgebra(w, symmetricForm(w), { method: 'auto', seed: 1 });
  kept.unshift({ key, algebra });
  while (kept.length > KEEP) kept.pop()!.algebra.dispose?.();
  return algebra;
}

/** The plain regression and the weights algebra for one set of ranges (the algebra from the cache when the neighbours are unchanged). */
export function prepareInputs(y: Float64Array, design: Design, w: SpatialWeights, robust = false): CellInputs {
  const ols = fitOls(y, design, { robust });
  return { y, design, w, algebra: algebraFor(w), ols };
}

function spatial(m: ModelInfo, f: SpatialFit, n: number): CellFit {
  const [p] = m.parameters;
  return {
    key: m.key, label: m.label, statName: 'z', coefficients: f.coefficients,
    parameters: [{ ...p, estimate: f.parameter, se: f.parameterSe, z: f.parameterZ, p: f.parameterP }],
    n, logLik: f.logLik, aic: f.aic, convergence: f.convergence, warnings: f.warnings, engineFit: f,
  };
}

/** Fits one model by its key. `robust` gives the plain regression heteroskedasticity-robust standard errors. */
export function fitForCells(key: string, inputs: CellInputs, robust = false): CellFit {
  const m = info(key);
  const n = inputs.y.length;
  if (key === 'ols') {
    const o = inputs.ols;
    return {
      key, label: m.label, statName: 't', coefficients: robust && o.robustCoefficients ? o.robustCoefficients : o.coefficients,
      parameters: [], n, logLik: o.logLik, aic: o.aic, warnings: o.warnings, engineFit: o,
    };
  }
  const fit = key === 'lag' ? fitSpatialLag(inputs.y, inputs.design, inputs.algebra, inputs.ols) : fitSpatialError(inputs.y, inputs.design, inputs.algebra, inputs.ols);
  if (!Number.isFinite(fit.logLik)) {
    throw new InputError(`The ${m.label.toLowerCase()} could not be estimated on these data (its log-likelihood is ${fit.logLik}; ${n} areas): the areas are too few or the links too sparse for the spatial parameter.`);
  }
  return spatial(m, fit, n);
}

/** Direct, indirect and total effects of a fitted model that has them (simulated standard errors). */
export function effectsForCells(fit: CellFit, inputs: CellInputs, draws: number, seed: number): ImpactsResult {
  const m = info(fit.key);
  if (!m.hasEffects) {
    const withEffects = MODELS.filter((x) => x.hasEffects).map((x) => `"${x.key}"`).join(', ');
    throw new InputError(`The ${m.label.toLowerCase()} has no separate direct and indirect effects (its coefficients are the effects); effects are given for ${withEffects}.`);
  }
  return lagImpacts(fit.engineFit as SpatialFit, inputs.design, inputs.algebra, { draws, seed });
}

/** Moran's I of the plain regression's residuals, the Lagrange-multiplier tests and the suggestion they lead to. */
export function residualTests(inputs: CellInputs): { moran: MoranTest; lm: LmTests; recommendation: Recommendation } {
  const moran = moranResidualTest(inputs.ols, inputs.design, inputs.algebra);
  const lm = lmTests(inputs.ols, inputs.design, inputs.algebra);
  return { moran, lm, recommendation: recommendModel(lm) };
}
