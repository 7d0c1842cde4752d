/**
 * Small DOM helpers for the sidebar: elements, Fluent buttons, progress and message bars, and native
 * form controls (select, checkbox, number) styled with Fluent's tokens. Native controls carry their
 * label and state to every screen reader and every Office web view, which custom form elements do not
 * reliably do.
 */
import '@fluentui/web-components/button.js';
import '@fluentui/web-components/progress-bar.js';
import '@fluentui/web-components/message-bar.js';
import { setTheme } from '@fluentui/web-components';
import { webLightTheme } from '@fluentui/tokens';
import { printable } from '../../src/errors.js';

export function applyTheme(): void {
  setTheme(webLightTheme);
}

type Attrs = Record<string, string | boolean | number | undefined>;
type Child = Node | string | null | undefined;

export function h<K extends keyof HTMLElementTagNameMap>(tag: K, attrs?: Attrs, ...children: Child[]): HTMLElementTagNameMap[K];
export function h(tag: string, attrs?: Attrs, ...children: Child[]): HTMLElement;
export function h(tag: string, attrs: Attrs = {}, ...children: Child[]): HTMLElement {
  const el = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === false) continue;
    el.setAttribute(k, v === true ? '' : String(v));
  }
  for (const c of children) if (c !== null && c !== undefined) el.append(c);
  return el;
}

/**
 * Replaces el's content. When the focus was on a control inside el, the new control with the same
 * id takes it, so redrawing a step after a change does not throw a keyboard user back to the top.
 */
export function clear(el: Element, ...children: Child[]): void {
  const focusedId = focusedIdIn(el);
  el.replaceChildren(...children.filter((c): c is Node | string => c !== null && c !== undefined));
  if (focusedId) {
    const again = el.querySelector<HTMLElement>(`#${CSS.escape(focusedId)}`);
    again?.focus();
  }
}

/** The id of the focused control when it is inside el ('' otherwise). */
export function focusedIdIn(el: Element): string {
  const active = document.activeElement;
  return active && active !== el && el.contains(active) ? active.id : '';
}

export function button(label: string, onClick: () => void, opts: { primary?: boolean; id?: string; disabled?: boolean } = {}): HTMLElement {
  const b = h('fluent-button', { appearance: opts.primary ? 'primary' : undefined, id: opts.id, disabled: opts.disabled });
  b.textContent = label;
  b.addEventListener('click', () => { if (!b.hasAttribute('disabled')) onClick(); });
  return b;
}

export function setDisabled(el: Element, disabled: boolean): void {
  if (disabled) el.setAttribute('disabled', '');
  else el.removeAttribute('disabled');
}

/** A native checkbox with its label after it, on a line of its own. */
export function checkbox(id: string, label: string, checked: boolean, onChange: (v: boolean) => void): HTMLElement {
  const box = h('input', { type: 'checkbox', id });
  box.checked = checked;
  box.addEventListener('change', () => onChange(box.checked));
  return h('div', { class: 'check' }, box, h('label', { for: id }, label));
}

/** A labelled native select (keyboard and screen readers handle it natively), styled with Fluent tokens. */
export function select(id: string, label: string, options: { value: string; text: string }[], value: string | undefined, onChange: (v: string) => void): HTMLElement {
  const s = h('select', { id, class: 'fl-select' });
  for (const o of options) {
    const opt = h('option', { value: o.value }, o.text);
    if (o.value === value) opt.selected = true;
    s.append(opt);
  }
  s.addEventListener('change', () => onChange(s.value));
  return h('div', { class: 'row-field' }, h('label', { for: id }, label), s);
}

/** A labelled native number input (its label above it). */
export function numberInput(id: string, label: string, value: number | undefined, onChange: (v: number) => void, opts: { min?: number; step?: number | 'any'; hint?: string } = {}): HTMLElement {
  const hintId = opts.hint ? `${id}-hint` : undefined;
  const input = h('input', { id, type: 'number', class: 'fl-input', value: value === undefined ? '' : String(value), min: opts.min, step: opts.step, 'aria-describedby': hintId });
  input.addEventListener('change', () => { if (input.value.trim() !== '') onChange(Number(input.value)); });
  return h('div', { class: 'row-field' }, h('label', { for: id }, label), input, opts.hint ? h('p', { class: 'hint', id: hintId }, opts.hint) : null);
}

/** A message bar. Its text passes through the engine's `printable`, as the command line's messages do. */
export function message(intent: 'error' | 'warning' | 'info' | 'success', text: string, action?: HTMLElement): HTMLElement {
  const bar = h('fluent-message-bar', { intent, layout: 'multiline', role: intent === 'error' ? 'alert' : 'status' }, h('span', { class: 'msg' }, printable(text)));
  if (action) { action.setAttribute('slot', 'actions'); bar.append(action); }
  return bar;
}

// lists in sentences live in a DOM-free module so pure helpers can use them too
export { some } from './text.js';
