/**
 * The done message's facts, built in the worker from the engine's result: the models come from the
 * registry (their labels and spatial parameters) and the suggestion from the run's recommendation.
 * Only the worker imports this file (the sidebar's main thread gets the plain RunSummary).
 */
import { fittedInOrder, modelEntry } from '../../src/models/index.js';
import type { AnalysisResult } from '../../src/pipeline/index.js';
import type { RunSummary, SummaryModel } from './run-summary.js';

/** The registry's key and label of a model the recommendation names; the plain regression is left out. */
function beyondBaseline(keys: readonly string[]): SummaryModel[] {
  return keys.flatMap((key) => {
    const entry = modelEntry(key);
    return entry && !entry.baseline ? [{ key, label: entry.label }] : [];
  });
}

export function runSummary(r: AnalysisResult): RunSummary {
  const rec = r.ols.recommendation;
  return {
    n: r.n,
    outcome: r.request.y,
    residualMoran: { I: r.ols.moran.I, p: r.ols.moran.p },
    suggestion: { choice: rec.choice, text: rec.text, models: beyondBaseline(rec.models), notFitted: beyondBaseline(rec.notFitted), borderline: rec.borderline },
    fitted: fittedInOrder(r.fits).filter(({ entry }) => !entry.baseline).map(({ entry, fit }) => ({
      key: entry.key,
      label: entry.label,
      parameters: entry.headline(fit).parameters.map((q) => ({ symbol: q.symbol, estimate: q.estimate })),
    })),
  };
}
