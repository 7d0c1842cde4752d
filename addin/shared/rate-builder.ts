/**
 * "Build a rate from two columns": the sidebar section that turns an events column and a population
 * column into a rate (per 1, 100, 1,000 or 100,000), chooses which smoothed rate the model uses and
 * whether the flagged areas' counts and rates are left blank in the results. Self-contained: the
 * sidebar mounts it, asks it for the request's `rates` and the rate names to offer as columns.
 */
import type { RateSmoothing, RatesRequest } from '../../src/pipeline/index.js';
import { button, checkbox, clear, h, message, select } from './dom.js';
import type { RateChoices, RateDefinition } from './types.js';

type Per = RateDefinition['per'];

const PER: { value: string; text: string }[] = [
  { value: '1', text: 'per person (a proportion)' },
  { value: '100', text: 'per 100' },
  { value: '1000', text: 'per 1,000' },
  { value: '100000', text: 'per 100,000' },
];

const SMOOTHING: { value: RateSmoothing; text: string }[] = [
  { value: 'global', text: 'Pulled to the overall rate' },
  { value: 'local', text: 'Pulled to the neighbours’ rate' },
  { value: 'neighbourhood', text: 'Pooled with the neighbours’ counts' },
];

export function perLabel(per: number): string {
  return PER.find((p) => Number(p.value) === per)?.text ?? `per ${per}`;
}

export interface RateBuilder {
  element: HTMLElement;
  /** redraw the column choices after the table changed (rates naming columns that are gone are dropped) */
  refresh(): void;
  /** the rate names, to offer as outcome or explanatory columns */
  names(): string[];
  /** the analysis request's `rates`, or undefined when none is defined */
  request(): RatesRequest | undefined;
  /** what to save with the workbook, and to restore from it */
  choices(): RateChoices;
  restore(c: Partial<RateChoices> | undefined): void;
}

/**
 * `columns()` lists the table's numeric columns; `onChange` is called when a rate is added or removed
 * (so the model's column lists can offer it).
 */
export function mountRateBuilder(columns: () => string[], onChange: () => void): RateBuilder {
  const c: RateChoices = { rates: [], smoothing: 'global', withholdFlagged: false };
  let draft = { name: '', events: '', population: '', per: '1000' };
  const element = h('fieldset', { class: 'rate-builder', id: 'rate-builder' });
  const errors = h('div', { class: 'errors', 'aria-live': 'polite' });

  function add() {
    clear(errors);
    const name = draft.name.trim();
    const cols = columns();
    const problem = !name ? 'Give the rate a name, e.g. cases_per_1000.'
      : cols.includes(name) ? `The table already has a column called ${name}; choose another name for the rate.`
      : c.rates.some((r) => r.name === name) ? `A rate called ${name} is already defined.`
      : /[=/,]/.test(name) ? 'A rate name cannot contain =, / or a comma.'
      : !cols.includes(draft.events) ? 'Choose the events column (the counts: cases, deaths, offences).'
      : !cols.includes(draft.population) ? 'Choose the population column (the people or households the events come from).'
      : draft.events === draft.population ? 'The events and the population must be two different columns.' : '';
    if (problem) { errors.append(message('error', problem)); return; }
    c.rates.push({ name, events: draft.events, population: draft.population, per: Number(draft.per) as Per });
    draft = { ...draft, name: '' };
    draw();
    onChange();
  }

  function draw() {
    const cols = columns();
    const options = [{ value: '', text: '(choose)' }, ...cols.map((k) => ({ value: k, text: k }))];
    const nameInput = h('input', { type: 'text', id: 'rate-name', class: 'fl-select', value: draft.name, autocomplete: 'off', spellcheck: false });
    nameInput.addEventListener('input', () => { draft.name = nameInput.value; });
    nameInput.addEventListener('keydown', (e) => { if (e.key === 'Enter') add(); });
    const list = c.rates.length
      ? h('ul', { class: 'rates-defined', 'aria-label': 'Rates defined' }, ...c.rates.map((r) => h('li', {},
        h('span', {}, h('strong', {}, r.name), ` = ${r.events} ${perLabel(r.per)} ${r.population} `),
        button(`Remove ${r.name}`, () => { c.rates = c.rates.filter((x) => x !== r); draw(); onChange(); }, { id: `rate-remove-${r.name.replace(/\W/g, '_')}` }))))
      : h('p', { class: 'hint' }, 'No rate yet. Counts of events (cases, deaths, offences) and the population they come from make a rate; it can then be the outcome or an explanatory column.');
    clear(element,
      h('legend', {}, 'Build a rate from two columns'),
      list,
      h('div', { class: 'row-field' }, h('label', { for: 'rate-name' }, 'Name of the new rate'), nameInput),
      select('rate-events', 'Events (counts)', options, draft.events, (v) => { draft.events = v; }),
      select('rate-population', 'Population (or exposure)', options, draft.population, (v) => { draft.population = v; }),
      select('rate-per', 'Shown', PER, draft.per, (v) => { draft.per = v; }),
      h('div', { class: 'buttons' }, button('Add rate', add, { id: 'rate-add' })),
      errors,
    );
    if (c.rates.length) {
      element.append(
        select('rate-smoothing', 'The model uses the rate', SMOOTHING, c.smoothing, (v) => { c.smoothing = v as RateSmoothing; }),
        h('p', { class: 'hint' }, 'Each area’s rate is pulled by empirical Bayes towards the overall or the neighbours’ rate as far as its count is unreliable, or pooled with its neighbours. All three are written to the "Rates" sheet, with the raw rate, a flag for areas with fewer than 20 events, and maps of the raw and the smoothed rate.'),
        checkbox('rate-withhold', 'Leave the flagged areas’ counts and rates blank in the results (privacy)', c.withholdFlagged, (v) => { c.withholdFlagged = v; }),
      );
    }
  }
  draw();

  return {
    element,
    refresh() {
      const cols = columns();
      const before = c.rates.length;
      c.rates = c.rates.filter((r) => cols.includes(r.events) && cols.includes(r.population) && !cols.includes(r.name));
      if (!cols.includes(draft.events)) draft.events = '';
      if (!cols.includes(draft.population)) draft.population = '';
      draw();
      if (c.rates.length !== before) onChange();
    },
    names: () => c.rates.map((r) => r.name),
    request: () => (c.rates.length ? { recipes: c.rates.map((r) => ({ ...r })), smoothing: c.smoothing, ...(c.withholdFlagged ? { withholdFlagged: true } : {}) } : undefined),
    choices: () => ({ rates: c.rates.map((r) => ({ ...r })), smoothing: c.smoothing, withholdFlagged: c.withholdFlagged }),
    restore(saved) {
      if (!saved) return;
      c.rates = (saved.rates ?? []).map((r) => ({ ...r }));
      c.smoothing = saved.smoothing ?? 'global';
      c.withholdFlagged = saved.withholdFlagged ?? false;
      draw();
    },
  };
}
