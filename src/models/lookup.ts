/** Looking up the registry: by key, by command-line spelling, the fitted models in order; and fitting one model. */
import { csrMultiply } from '../linalg/index.js';
import { InputError } from '../errors.js';
import { chiSquareUpper } from '../stats/index.js';
import { MODELS, type FittedModels, type ModelKey } from './registry.js';
import type { FitOptions, Fitted, ModelEntry, NestedTest, PreparedInputs } from './model-entry.js';

/** Every key, in registry order. */
export const MODEL_KEYS: readonly ModelKey[] = MODELS.map((m) => m.key);

/** The models a run fits when it names none: every one but those fitted only on request. */
export const DEFAULT_MODEL_KEYS: readonly ModelKey[] = MODELS.filter((m) => !m.onRequest).map((m) => m.key);

/** A model's label inside a sentence: its first letter in lower case, names kept ("the spatial Durbin model"). */
export function inSentence(label: string): string {
  return label.charAt(0).toLowerCase() + label.slice(1);
}

/** The entry of a key (undefined for a key that names no model). */
export function modelEntry(key: string): ModelEntry | undefined {
  return MODELS.find((m) => m.key === key);
}

/** The entries of some keys, refusing a key that names no model (a cell function's argument, a request's list). */
export function entriesOf(keys: readonly string[]): ModelEntry[] {
  return keys.map((key) => {
    const entry = modelEntry(key);
    if (!entry) throw new InputError(`Unknown model "${key}": choose from ${MODEL_KEYS.join(', ')}.`);
    return entry;
  });
}

/** The plain regression's entry: fitted on every run. */
export function baselineModel(): ModelEntry {
  return MODELS.find((m) => m.baseline)!;
}

/** The entry of a command-line spelling. */
export function modelByCli(spelling: string): ModelEntry | undefined {
  return MODELS.find((m) => m.cli === spelling);
}

/** The fitted models of a run in registry order, each with its entry. */
export function fittedInOrder(fits: FittedModels): { entry: ModelEntry; fit: Fitted }[] {
  const out: { entry: ModelEntry; fit: Fitted }[] = [];
  for (const entry of MODELS) {
    const fit = (fits as Record<string, Fitted | undefined>)[entry.key];
    if (fit) out.push({ entry, fit });
  }
  return out;
}

/** Keys in registry order, without repeats, the plain regression first (every run fits it). */
export function withBaseline(keys: readonly string[]): ModelKey[] {
  const asked = new Set(keys);
  return MODELS.filter((m) => m.baseline || asked.has(m.key)).map((m) => m.key);
}

/** Areas a model needs at least: the coefficients (with its WX terms), the residual variance and each spatial parameter, plus one to spare. */
export function areasNeeded(entry: ModelEntry, coefficients: number): number {
  // with the neighbours' averages: one more coefficient per column but the intercept
  const lagged = entry.lagsColumns ? coefficients - 1 : 0;
  return coefficients + lagged + entry.parameters.length + 2;
}

/**
 * Fits one model on prepared inputs: the fit, a check that it describes the data, the neighbours'
 * average residual, and its spillover effects when the model has them (`beforeImpacts` is told
 * when the fit is done and the effects start).
 */
export function fitModel(key: string, p: PreparedInputs, o: FitOptions, beforeImpacts?: () => void): Fitted {
  const [entry] = entriesOf([key]);
  const fit = entry.fit(p, o);
  const { logLik } = entry.headline(fit);
  if (logLik !== undefined && !Number.isFinite(logLik)) {
    throw new InputError(
      `The ${inSentence(entry.label)} could not be estimated on these data (its log-likelihood is ${logLik}; n = ${p.y.length}, k = ${p.design.columns.length}): the areas are too few or the neighbour links too sparse for the spatial parameter. Use more areas or run only the plain regression.`,
    );
  }
  const fitted: Fitted = { ...fit, residualLag: csrMultiply(p.w, fit.residuals) };
  if (entry.impacts) {
    beforeImpacts?.();
    fitted.impacts = entry.impacts(fit, p, o);
  }
  return fitted;
}


/**
 * Likelihood-ratio tests between the fitted models that nest one another (each entry's `nests`):
 * LR = 2(ℓ_general − ℓ_nested), chi-square on the number of restrictions. Added to the general
 * model's fit; pairs where either has no likelihood are left out.
 */
export function addNestedTests(fits: FittedModels, p: PreparedInputs): void {
  const byKey = fits as Record<string, Fitted | undefined>;
  for (const { entry, fit } of fittedInOrder(fits)) {
    const tests: NestedTest[] = [];
    for (const nested of entry.nests ?? []) {
      const other = byKey[nested.key];
      const restricted = other && modelEntry(nested.key)!.headline(other).logLik;
      const general = entry.headline(fit).logLik;
      if (restricted === undefined || general === undefined) continue;
      const stat = 2 * (general - restricted);
      const df = nested.df(p);
      tests.push({ against: nested.key, restriction: nested.restriction, stat, df, p: chiSquareUpper(stat, df) });
    }
    if (tests.length) fit.nestedTests = tests;
  }
}
