/**
 * What every step of the sidebar shares: the state, the host and the engine, the six steps' sections,
 * the inline error, the rate builder, and the other steps' redraws (bound once every step is mounted).
 */
import type { EngineError } from '../engine-protocol.js';
import { Cancelled, EngineFailure, type EngineClient } from '../engine-client.js';
import type { SidebarHost } from '../host.js';
import type { RateBuilder } from '../rate-builder.js';
import { button, h, message } from '../dom.js';
import { cellOf } from '../table-profile.js';
import type { State } from './state.js';

/** One step's section: its controls, what it found (read out as it changes), and its errors. */
export interface Step { body: HTMLElement; found: HTMLElement; errors: HTMLElement }

/** What one step asks of the others. */
export interface Redraws {
  data(): void;
  areas(): void;
  /** match the table to the areas again and redraw what that finds (areas and neighbours) */
  check(): Promise<void>;
  neighbourControls(): void;
  /** the unit, the suggestion and a suggested value of the band, updated in place after a check */
  bandControl(): void;
  neighbours(): void;
  model(): void;
  local(): void;
  /** the new places (a boundary file, coordinate columns, a statement of the coordinates): a band taken from the data is suggested anew */
  newPlaces(): void;
}

export interface SidebarContext {
  s: State;
  host: SidebarHost;
  engine: EngineClient;
  steps: { data: Step; areas: Step; nb: Step; model: Step; local: Step; run: Step };
  rateBuilder: RateBuilder;
  redraw: Redraws;
  /** An error shown inline; for bad input with a row, names the cell (and in Excel offers to show it). */
  showError(where: HTMLElement, e: unknown): void;
  /** the columns a model may use: the table's numeric columns (not the ID) and the rates built here */
  modelColumns(): string[];
}

/** The six sections, numbered, each with a heading that names it for screen readers. */
export function addStep(root: HTMLElement, n: number, title: string): Step {
  const id = `step-${n}-title`;
  const body = h('div', { class: 'step-body' });
  const found = h('div', { class: 'found', 'aria-live': 'polite' });
  const errors = h('div', { class: 'errors' });
  root.append(h('section', { class: 'step', 'aria-labelledby': id }, h('h2', { id }, h('span', { class: 'num' }, String(n)), ` ${title}`), body, found, errors));
  return { body, found, errors };
}

export function errorShower(s: State, host: SidebarHost): SidebarContext['showError'] {
  return (where, e) => {
    if (e instanceof Cancelled) return;
    const detail: EngineError = e instanceof EngineFailure ? e.detail
      : { message: e instanceof Error ? e.message : String(e), input: (e as { name?: string })?.name === 'InputError', where: (e as { where?: EngineError['where'] })?.where };
    let action: HTMLElement | undefined;
    let text = detail.input ? detail.message : `Something went wrong inside Spillway: ${detail.message}`;
    const t = s.source?.table;
    if (t && detail.where?.row && s.source?.origin === 'sheet' && (detail.where.file === undefined || detail.where.file === s.source.file.name)) {
      const cell = cellOf(t, detail.where.row, detail.where.column);
      text += ` (cell ${cell} on sheet "${t.sheet}")`;
      if (host.showCell) action = button(`Show ${cell}`, () => { void host.showCell!(t.sheet, cell); });
    }
    where.append(message('error', text, action));
  };
}
