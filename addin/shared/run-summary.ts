/**
 * What the sidebar says when a run is done: the residuals' Moran's I with its p-value, the model the
 * Lagrange-multiplier tests suggest, and whether that model was fitted in this run (if not, the
 * sidebar offers to re-run with it). Pure: built in the worker from the engine's result.
 */
import type { AnalysisResult } from '../../src/pipeline/index.js';

export type SpatialModel = 'lag' | 'error';

export interface RunSummary {
  n: number;
  outcome: string;
  /** Moran's I of the plain regression's residuals and its p-value */
  residualMoran: { I: number; p: number };
  suggestion: {
    choice: AnalysisResult['ols']['recommendation']['choice'];
    /** the guidance sentence, with the rule's reasoning */
    text: string;
    /** the spatial models the suggestion names (none when the plain regression suffices) */
    models: SpatialModel[];
    /** of those, the ones this run did not fit */
    notFitted: SpatialModel[];
    /** the call turns on p-values close to the significance level: both models should be reported */
    borderline: boolean;
  };
  /** the spatial models fitted, with their spatial parameter */
  fitted: { model: SpatialModel; parameter: number }[];
}

/** The spatial models a suggestion names: one, both when the tests do not separate them, or none. */
export function suggestedModels(choice: string): SpatialModel[] {
  if (choice === 'lag' || choice === 'error') return [choice];
  if (choice === 'either') return ['lag', 'error'];
  return [];
}

/**
 * What a recommendation may say beyond its choice: the models it asks to be reported, whether the
 * call is borderline, and which of them this run did not fit. Read when the engine gives them;
 * otherwise derived from the choice and the models fitted.
 */
type RecommendationDetail = { models?: readonly string[]; notFitted?: readonly string[]; borderline?: boolean };
const isSpatial = (m: string): m is SpatialModel => m === 'lag' || m === 'error';

export function runSummary(r: AnalysisResult): RunSummary {
  const rec = r.ols.recommendation;
  const detail = rec as typeof rec & RecommendationDetail;
  const models = detail.models ? detail.models.filter(isSpatial) : suggestedModels(rec.choice);
  const fitted: RunSummary['fitted'] = [];
  if (r.fits.lag) fitted.push({ model: 'lag', parameter: r.fits.lag.parameter });
  if (r.fits.error) fitted.push({ model: 'error', parameter: r.fits.error.parameter });
  const notFitted = detail.notFitted ? detail.notFitted.filter(isSpatial) : models.filter((m) => !fitted.some((f) => f.model === m));
  return {
    n: r.n,
    outcome: r.request.y,
    residualMoran: { I: r.ols.moran.I, p: r.ols.moran.p },
    suggestion: { choice: rec.choice, text: rec.text, models, notFitted, borderline: detail.borderline ?? false },
    fitted,
  };
}

const MODEL_WORDS: Record<SpatialModel, string> = { lag: 'spatial lag model', error: 'spatial error model' };
const SYMBOL: Record<SpatialModel, string> = { lag: 'ρ', error: 'λ' };

/** Two significant figures, so a p near a threshold shows which side it is on: "p < 0.001", "p = 0.0045", "p = 0.053", "p = 0.41". */
export function pText(p: number): string {
  if (!Number.isFinite(p)) return 'p not available';
  if (p < 0.001) return 'p < 0.001';
  return `p = ${Number(p.toPrecision(2))}`;
}

export function modelWords(models: SpatialModel[]): string {
  return models.map((m) => MODEL_WORDS[m]).join(' and the ');
}

/** The done message's sentences, plain text. */
export function summaryLines(s: RunSummary): string[] {
  const lines = [`${s.n} areas. Moran's I of the plain regression's residuals: ${s.residualMoran.I.toFixed(3)} (${pText(s.residualMoran.p)}).`];
  const { models, notFitted } = s.suggestion;
  if (models.length === 0) {
    lines.push('Suggested model: the plain regression (the Lagrange-multiplier tests give no reason for a spatial model).');
  } else {
    const which = models.length === 2
      ? `both spatial models (${s.suggestion.borderline ? 'a borderline call' : 'the tests do not separate them'})`
      : `the ${modelWords(models)}${s.suggestion.borderline ? ' (a borderline call)' : ''}`;
    const state = notFitted.length === 0 ? 'fitted in this run' : notFitted.length === models.length ? 'not fitted in this run' : `the ${modelWords(notFitted)} was not fitted in this run`;
    lines.push(`Suggested by the Lagrange-multiplier tests: ${which}; ${state}.`);
  }
  for (const f of s.fitted) lines.push(`${MODEL_WORDS[f.model][0].toUpperCase()}${MODEL_WORDS[f.model].slice(1)}: ${SYMBOL[f.model]} = ${f.parameter.toFixed(3)}.`);
  return lines;
}
