/**
 * The "Save areas with results" button shown after a run: the engine worker turns the run's areas and
 * their results into GeoJSON (RFC 7946), which the browser saves as a file — for mapping in any GIS.
 * Self-contained: the sidebar only places it.
 */
import { printable } from '../../src/errors.js';
import { button, h, message } from './dom.js';
import type { EngineClient } from './engine-client.js';
import { formatCount } from '../../src/core/index.js';

export function saveAreasButton(engine: EngineClient, stem: string): HTMLElement {
  const status = h('div', { 'aria-live': 'polite' });
  const fileName = `${stem} areas with results.geojson`;
  const save = async () => {
    status.replaceChildren();
    try {
      const { text, areas, note } = await engine.call({ op: 'geojson' });
      const url = URL.createObjectURL(new Blob([text], { type: 'application/geo+json' }));
      const a = h('a', { href: url, download: fileName });
      document.body.append(a);
      a.click();
      a.remove();
      // the name carries the user's file or sheet name: shown through the same escaping as every message
      status.append(h('p', { class: 'hint' }, printable(`${fileName}: ${formatCount(areas)} areas with their fitted values, residuals and local statistics, for any GIS.`)));
      if (note) status.append(message('warning', note));
      setTimeout(() => URL.revokeObjectURL(url), 60_000);
    } catch (e) {
      status.append(message('error', e instanceof Error ? e.message : String(e)));
    }
  };
  return h('div', { class: 'save-areas' }, h('div', { class: 'buttons' }, button('Save areas with results', () => void save(), { id: 'save-areas' })), status);
}
