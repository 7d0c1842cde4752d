/** Step 3, Neighbours: the rule (with its options), and what the engine's check built with it. */
import type { WeightsTransform } from '../../../src/weights/index.js';
import { checkbox, clear, h, message, numberInput, select, some } from '../dom.js';
import { EngineFailure } from '../engine-client.js';
import { formatCount } from '../../../src/core/index.js';
import type { SidebarContext } from './context.js';
import type { Method } from './state.js';

/** About three significant figures, for a distance in a sentence. */
const round3 = (x: number) => String(Number(x.toPrecision(3)));

const METHODS: { value: Method; text: string }[] = [
  { value: 'queen', text: 'Shared border or corner (queen)' },
  { value: 'rook', text: 'Shared border only (rook)' },
  { value: 'knn', text: 'Nearest areas (a fixed number)' },
  { value: 'band', text: 'All areas within a distance' },
  { value: 'idw', text: 'Inverse distance' },
];

export interface NeighboursStep {
  drawNeighbourControls(): void;
  /** After a check: the unit, the suggestion and a suggested value, updated in place (the analyst may be typing). */
  updateBandControl(): void;
  /** what the last check built: counts, the histogram, groups, ties and areas without neighbours */
  drawNeighbours(): void;
}

export function mountNeighboursStep(ctx: SidebarContext): NeighboursStep {
  const { s } = ctx;
  const nb = ctx.steps.nb;
  const nbControls = h('div');
  nb.body.append(nbControls);

  function drawNeighbourControls() {
    const changed = () => { drawNeighbourControls(); void ctx.redraw.check(); };
    const extra: HTMLElement[] = [];
    if (s.method === 'queen' || s.method === 'rook') {
      extra.push(numberInput('order', 'Steps away (1 = touching)', s.order, (v) => { s.order = Math.max(1, Math.round(v)); changed(); }, { min: 1 }));
      // two or more steps: exactly that many steps away by default, or every area up to it
      if (s.order > 1) extra.push(checkbox('cumulative', `Every area up to ${s.order} steps away (otherwise exactly ${s.order} steps away)`, s.cumulative, (v) => { s.cumulative = v; void ctx.redraw.check(); }));
    }
    if (s.method === 'knn') {
      extra.push(numberInput('k', 'How many nearest areas', s.k, (v) => { s.k = Math.max(1, Math.round(v)); changed(); }, { min: 1 }));
      extra.push(checkbox('ties-include', 'Include every area tied at the last place (otherwise the lower rows are taken)', s.tiesInclude, (v) => { s.tiesInclude = v; void ctx.redraw.check(); }));
    }
    if (s.method === 'band') extra.push(bandControl(changed));
    if (s.method === 'idw') extra.push(numberInput('power', 'Power of the distance', s.power, (v) => { s.power = v; changed(); }, { min: 0, step: 0.5 }));
    clear(nbControls,
      select('method', 'Who counts as a neighbour', METHODS, s.method, (v) => { s.method = v as Method; changed(); }),
      ...extra,
      select('transform', 'Weights', [{ value: 'row', text: 'Each area’s weights sum to 1' }, { value: 'binary', text: 'Every link weighs 1' }], s.transform, (v) => { s.transform = v as WeightsTransform; void ctx.redraw.check(); }),
      checkbox('link-unneighboured', 'Link areas without neighbours to the nearest area', s.linkUnneighboured, (v) => { s.linkUnneighboured = v; void ctx.redraw.check(); }),
      checkbox('compare', 'Also fit under a few other neighbour definitions, side by side', s.compare, (v) => { s.compare = v; }),
    );
  }

  /** The band's distance in the unit of the coordinates, with the distance the data suggest. */
  function bandControl(changed: () => void): HTMLElement {
    const { label, hint } = bandWords();
    return numberInput('distance', label, s.distance, (v) => {
      s.distance = v > 0 ? v : undefined;
      s.distanceFromData = !(v > 0);
      changed();
    }, { min: 0, step: 'any', hint: hint || ' ' });
  }

  function bandWords(): { label: string; hint: string } {
    const suggestion = s.check?.bandSuggestion;
    const unit = suggestion?.unit ?? (s.check ? (s.check.coordinates === 'geographic' ? 'km' : 'coordinate units') : undefined);
    const label = unit === 'km' ? 'Distance in kilometres (great-circle)' : unit ? 'Distance in the coordinates’ units' : 'Distance';
    const hint = !suggestion ? (s.check ? '' : 'Suggested from the data once the areas are matched.')
      : `Every area has a neighbour from ${round3(suggestion.allLinked)} ${suggestion.unit}; ${suggestion.distance} ${suggestion.unit} is that rounded up${s.distanceFromData ? ' (used until you type another)' : ''}.`;
    return { label, hint };
  }

  function updateBandControl() {
    const input = nbControls.querySelector<HTMLInputElement>('#distance');
    if (!input) return;
    const { label, hint } = bandWords();
    nbControls.querySelector('label[for="distance"]')!.textContent = label;
    nbControls.querySelector('#distance-hint')!.textContent = hint;
    if (s.distanceFromData && document.activeElement !== input) input.value = s.distance === undefined ? '' : String(s.distance);
  }

  function drawNeighbours() {
    const r = s.check;
    clear(nb.found);
    if (!r) return;
    if (r.neighboursError) { ctx.showError(nb.errors, new EngineFailure(r.neighboursError)); return; }
    const w = r.neighbours;
    if (!w) return;
    const top = Math.max(...w.histogram.map(([, c]) => c), 1);
    const bars = h('div', { class: 'histogram', role: 'img', 'aria-label': `Neighbour counts: ${w.histogram.map(([k, c]) => `${formatCount(c)} areas have ${k}`).join(', ')}` },
      ...w.histogram.map(([k, c]) => {
        const bar = h('span', { class: 'bar' });
        bar.style.width = `${Math.max(2, (100 * c) / top)}%`;
        return h('div', { class: 'hrow' }, h('span', { class: 'hk' }, String(k)), bar, h('span', { class: 'hc' }, String(c)));
      }));
    nb.found.append(
      h('p', {}, `${w.description}. Neighbours per area: fewest ${w.minNeighbours}, average ${w.meanNeighbours.toFixed(1)}, most ${w.maxNeighbours}.`),
      h('p', { class: 'hint' }, 'Number of neighbours → number of areas'), bars,
      h('p', {}, w.components === 1 ? 'All areas are linked into one group.' : `The areas fall into ${w.components} separate groups.`),
    );
    if (w.tiesWarning) nb.found.append(message('warning', w.tiesWarning));
    if (w.withoutNeighbours.length) nb.found.append(message('warning', `${formatCount(w.withoutNeighbours.length)} area(s) have no neighbours: ${some(w.withoutNeighbours, (i) => i)}.`));
  }

  drawNeighbourControls();
  return { drawNeighbourControls, updateBandControl, drawNeighbours };
}
