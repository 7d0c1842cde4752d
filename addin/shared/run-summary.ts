/**
 * What the sidebar says when a run is done: the residuals' Moran's I with its p-value, the model the
 * Lagrange-multiplier tests suggest, and whether that model was fitted in this run (if not, the
 * sidebar offers to re-run with it). The summary is built in the worker from the engine's result and
 * its model registry (run-summary-build.ts) and carries the models' keys and labels, so this file,
 * which the sidebar's main thread loads, needs nothing of the engine but types.
 */
import type { Recommendation } from '../../src/models/index.js';
import { formatCount } from '../../src/core/index.js';

/** A model as the done message names it: the registry's key and label. */
export interface SummaryModel { key: string; label: string }

export interface RunSummary {
  n: number;
  outcome: string;
  /** Moran's I of the plain regression's residuals and its p-value */
  residualMoran: { I: number; p: number };
  suggestion: {
    choice: Recommendation['choice'];
    /** the guidance sentence, with the rule's reasoning */
    text: string;
    /** the models beyond the plain regression that the reading asks to be reported (none when the plain regression suffices) */
    models: SummaryModel[];
    /** of those, the ones this run did not fit */
    notFitted: SummaryModel[];
    /** the call turns on p-values close to the significance level */
    borderline: boolean;
  };
  /** every model fitted beyond the plain regression, in registry order, with its spatial parameters */
  fitted: (SummaryModel & { parameters: { symbol: string; estimate: number }[] })[];
}

/** Two significant figures, so a p near a threshold shows which side it is on: "p < 0.001", "p = 0.0045", "p = 0.053", "p = 0.41". */
export function pText(p: number): string {
  if (!Number.isFinite(p)) return 'p not available';
  if (p < 0.001) return 'p < 0.001';
  return `p = ${Number(p.toPrecision(2))}`;
}

/**
 * "spatial lag model", "spatial lag model and the spatial Durbin model": for "the …" in a sentence; a
 * label keeps its names, only its first letter is lowered (as the engine's inSentence does).
 */
export function modelWords(models: readonly SummaryModel[]): string {
  return models.map((m) => m.label.charAt(0).toLowerCase() + m.label.slice(1)).join(' and the ');
}

/** The done message's sentences, plain text. */
export function summaryLines(s: RunSummary): string[] {
  const lines = [`${formatCount(s.n)} areas. Moran's I of the plain regression's residuals: ${s.residualMoran.I.toFixed(3)} (${pText(s.residualMoran.p)}).`];
  const { models, notFitted, borderline } = s.suggestion;
  if (models.length === 0) {
    lines.push('Suggested model: the plain regression (the Lagrange-multiplier tests give no reason for a spatial model).');
  } else {
    const why = borderline ? 'a borderline call' : models.length > 1 ? 'the tests do not separate them' : '';
    const which = `the ${modelWords(models)}${why ? ` (${why})` : ''}`;
    const state = notFitted.length === 0 ? 'fitted in this run' : notFitted.length === models.length ? 'not fitted in this run'
      : `the ${modelWords(notFitted)} ${notFitted.length > 1 ? 'were' : 'was'} not fitted in this run`;
    lines.push(`Suggested by the Lagrange-multiplier tests: ${which}; ${state}.`);
  }
  for (const f of s.fitted) {
    lines.push(`${f.label}: ${f.parameters.length ? f.parameters.map((q) => `${q.symbol} = ${q.estimate.toFixed(3)}`).join(', ') : 'fitted'}.`);
  }
  return lines;
}
