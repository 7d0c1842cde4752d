/**
 * Step 4, Model: a rate built from two columns, the outcome, the explanatory columns (with a warning
 * for a rate's own counts), the engine's models and the fitting options.
 */
import { checkbox, clear, h, message, select } from '../dom.js';
import type { ModelChoice } from '../engine-protocol.js';
import { builtRateParts, ratePartWarning, rateParts } from '../rate-parts.js';
import type { SidebarContext } from './context.js';
import { tickedModels } from './state.js';

export interface ModelStep { drawModel(): void }

export function mountModelStep(ctx: SidebarContext): ModelStep {
  const { s, engine, rateBuilder } = ctx;
  const model = ctx.steps.model;
  const rateWarnings = h('div', { class: 'rate-parts' });

  function drawModel() {
    const p = s.profile;
    if (!p) { clear(model.body, h('p', { class: 'hint' }, 'Choose the data first.')); return; }
    const candidates = ctx.modelColumns();
    const rates = rateBuilder.names();
    const shown = (c: string) => (rates.includes(c) ? `${c} (rate built above)` : c);
    const outcomes = [{ value: '', text: '(choose the outcome)' }, ...candidates.map((c) => ({ value: c, text: shown(c) }))];
    // one replacement, so the control that had the focus gets it back (dom.ts clear)
    clear(model.body,
      rateBuilder.element,
      select('y-column', 'Outcome to explain', outcomes, s.y ?? '', (v) => { s.y = v || undefined; if (v) s.x.delete(v); drawModel(); ctx.redraw.local(); }),
      h('fieldset', { class: 'xs' }, h('legend', {}, 'Explained by'),
        ...candidates.filter((c) => c !== s.y).map((c) => checkbox(`x-${c.replace(/\W/g, '_')}`, shown(c), s.x.has(c), (v) => { if (v) s.x.add(c); else s.x.delete(c); drawRateParts(); }))),
      rateWarnings,
      modelChoice(),
      checkbox('robust', 'Standard errors robust to unequal spread', s.robust, (v) => { s.robust = v; }),
      checkbox('drop-missing', 'Leave out rows with missing values', s.dropMissing, (v) => { s.dropMissing = v; }),
    );
    drawRateParts();
  }

  /** A warning for each ticked column that is one of the counts the outcome is made from. */
  function drawRateParts() {
    const t = s.source?.table;
    const ticked = [...s.x];
    const built = rateBuilder.request()?.recipes.find((r) => r.name === s.y);
    const found = !t || !s.y || !ticked.length ? [] : built ? builtRateParts(built, ticked) : rateParts(t, s.y, ticked, s.profile!.numeric);
    clear(rateWarnings, ...found.map((f) => message('warning', ratePartWarning(f, s.y!))));
  }

  /** The engine's models: the always-fitted ones named in the legend, a tick box for each of the others. */
  function modelChoice(): HTMLElement {
    const choices = s.modelChoices;
    if (!choices) return h('fieldset', { class: 'models' }, h('legend', {}, 'Models'), h('p', { class: 'hint' }, 'Asking the engine which models it fits…'));
    const always = choices.filter((c) => c.baseline).map((c) => c.label.charAt(0).toLowerCase() + c.label.slice(1));
    const ticked = tickedModels(s, choices);
    const box = (c: ModelChoice) => checkbox(`model-${c.key}`, `${c.label}: ${c.about}`, ticked.has(c.key), (v) => {
      const now = tickedModels(s, choices);
      if (v) now.add(c.key); else now.delete(c.key);
      s.models = now;
    });
    const wider = choices.filter((c) => c.onRequest);
    return h('fieldset', { class: 'models' }, h('legend', {}, `Models (the ${always.join(' and ')} ${always.length > 1 ? 'are' : 'is'} always fitted)`),
      ...choices.filter((c) => !c.baseline && !c.onRequest).map(box),
      ...(wider.length
        ? [h('p', { class: 'hint' }, 'The wider family, for when a referee asks (the Summary then tests them against each other):'), ...wider.map(box)]
        : []));
  }

  drawModel();
  void engine.call({ op: 'models' }).then(({ models }) => { s.modelChoices = models; drawModel(); }, () => undefined);
  return { drawModel };
}
