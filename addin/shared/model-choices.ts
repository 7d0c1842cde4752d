/** The engine's model registry as the sidebar offers it (the worker sends this list; the sidebar draws it). */
import { MODELS } from '../../src/models/index.js';
import type { ModelChoice } from './engine-protocol.js';

export function modelChoices(): ModelChoice[] {
  return MODELS.map((m) => ({ key: m.key, label: m.label, about: m.about, baseline: !!m.baseline, onRequest: !!m.onRequest }));
}


/** The ticked models beyond the always-fitted ones; `null` (nothing chosen yet): every one not fitted only on request. */
export function tickedOf(models: Set<string> | null, choices: ModelChoice[]): Set<string> {
  return new Set(models ?? choices.filter((c) => !c.baseline && !c.onRequest).map((c) => c.key));
}

/** The run's models: the always-fitted ones and the ticked ones, in the engine's order (also what the comparison of neighbour definitions refits). */
export function requestedModels(models: Set<string> | null, choices: ModelChoice[]): string[] {
  const ticked = tickedOf(models, choices);
  return choices.filter((c) => c.baseline || ticked.has(c.key)).map((c) => c.key);
}
