/** The engine's model registry as the sidebar offers it (the worker sends this list; the sidebar draws it). */
import { MODELS } from '../../src/models/index.js';
import type { ModelChoice } from './engine-protocol.js';

export function modelChoices(): ModelChoice[] {
  return MODELS.map((m) => ({ key: m.key, label: m.label, about: m.about, baseline: !!m.baseline, onRequest: !!m.onRequest }));
}

