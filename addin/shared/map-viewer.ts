/**
 * The sidebar's small maps, each with a "Show at full size" button: the narrow task pane shrinks a
 * map to about 300 pixels, too small to tell neighbouring areas apart, so the button opens the same
 * picture at its drawn size in a modal dialog (the platform's <dialog>: Escape and the Close button
 * end it, focus returns to the button). Self-contained: the run step only places it.
 */
import { button, h } from './dom.js';
import type { ReportImage } from '../../src/report/index.js';

const svgSource = (m: ReportImage) => `data:image/svg+xml;charset=utf-8,${encodeURIComponent(m.svg)}`;

/** The maps of one sheet, each small with its button; `cls` is the group's class (local-maps, rate-maps). */
export function mapGallery(maps: readonly ReportImage[], cls: string, idPrefix: string): HTMLElement {
  return h('div', { class: cls }, ...maps.map((m, i) => {
    const open: HTMLElement = button('Show at full size', () => showLarge(m, open), { id: `${idPrefix}-full-${i + 1}` });
    open.setAttribute('aria-label', `Show at full size: ${m.alt.split('.')[0]}`);
    return h('figure', { class: 'map' },
      h('img', { src: svgSource(m), alt: m.alt, width: String(Math.min(m.widthPx, 360)) }),
      h('div', { class: 'buttons' }, open));
  }));
}

function showLarge(m: ReportImage, opener: HTMLElement): void {
  const title = m.alt.split('.')[0];
  const heading = h('h2', { id: 'map-full-title' }, title);
  const dialog = h('dialog', { class: 'map-full', 'aria-labelledby': 'map-full-title' },
    h('div', { class: 'map-full-bar' }, heading, button('Close', () => dialog.close(), { id: 'map-full-close', primary: true })),
    h('img', { src: svgSource(m), alt: m.alt, width: String(m.widthPx), height: String(m.heightPx) }));
  dialog.addEventListener('close', () => { dialog.remove(); opener.focus(); });
  document.body.append(dialog);
  dialog.showModal();
  (dialog.querySelector('#map-full-close') as HTMLElement | null)?.focus();
}
