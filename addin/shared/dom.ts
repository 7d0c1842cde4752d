/** Small DOM helpers for the sidebar: elements, Fluent controls, and native selects styled like them. */
import '@fluentui/web-components/button.js';
import '@fluentui/web-components/checkbox.js';
import '@fluentui/web-components/field.js';
import '@fluentui/web-components/text-input.js';
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

export function clear(el: Element, ...children: Child[]): void {
  el.replaceChildren(...children.filter((c): c is Node | string => c !== null && c !== undefined));
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

/** A Fluent checkbox with its label after it. */
export function checkbox(id: string, label: string, checked: boolean, onChange: (v: boolean) => void): HTMLElement {
  const box = h('fluent-checkbox', { id, slot: 'input' }) as HTMLElement & { checked: boolean };
  if (checked) box.setAttribute('checked', '');
  box.addEventListener('change', () => onChange(Boolean(box.checked)));
  return h('fluent-field', { 'label-position': 'after' }, h('label', { slot: 'label', for: id }, label), box);
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

/** A labelled Fluent number input. */
export function numberInput(id: string, label: string, value: number, onChange: (v: number) => void, opts: { min?: number; step?: number } = {}): HTMLElement {
  const input = h('fluent-text-input', { id, type: 'number', value: String(value), min: opts.min, step: opts.step, slot: 'input' }) as HTMLElement & { value: string };
  input.addEventListener('change', () => onChange(Number(input.value)));
  return h('fluent-field', { 'label-position': 'above' }, h('label', { slot: 'label', for: id }, label), input);
}

/** A message bar. Its text passes through the engine's `printable`, as the command line's messages do. */
export function message(intent: 'error' | 'warning' | 'info' | 'success', text: string, action?: HTMLElement): HTMLElement {
  const bar = h('fluent-message-bar', { intent, layout: 'multiline', role: intent === 'error' ? 'alert' : 'status' }, h('span', { class: 'msg' }, printable(text)));
  if (action) { action.setAttribute('slot', 'actions'); bar.append(action); }
  return bar;
}

/** "a; b; c; and 4 more" */
export function some<T>(items: readonly T[], show: (t: T) => string, max = 8): string {
  const shown = items.slice(0, max).map(show).join('; ');
  return items.length > max ? `${shown}; and ${items.length - max} more` : shown;
}
