/**
 * The no-install browser page: the same sidebar, with an .xlsx (or CSV) opened from disk as the
 * data and the results downloaded as a workbook. Nothing is sent anywhere (see the page's CSP).
 */
import '../shared/sidebar.css';
import { applyTheme, button, clear, h, select } from '../shared/dom.js';
import type { EngineClient } from '../shared/engine-client.js';
import type { SidebarHost, TableSource } from '../shared/host.js';
import { drawReportPictures } from '../shared/png.js';
import { mountSidebar } from '../shared/sidebar.js';
import type { SavedSetup } from '../shared/types.js';

const SETUP_KEY = 'spillway.setup';
let opened: { name: string; bytes: Uint8Array; isWorkbook: boolean } | null = null;

const host: SidebarHost = {
  kind: 'page',
  dataSource(slot, provide, fail, engine: EngineClient) {
    const input = h('input', { type: 'file', id: 'data-file', accept: '.xlsx,.xlsm,.csv,.txt', class: 'visually-hidden' });
    const sheets = h('div');
    const status = h('p', { class: 'hint' }, 'Open the workbook (.xlsx) or CSV file with one row per area. It is read on this computer only.');
    const load = async (sheet?: string) => {
      const { table } = await engine.call({ op: 'table', file: opened!, sheet });
      const source: TableSource = { table, origin: 'file', file: { name: opened!.name, bytes: opened!.bytes }, sheet: opened!.isWorkbook ? table.sheet : undefined };
      provide(source);
    };
    input.addEventListener('change', async () => {
      const f = input.files?.[0];
      if (!f) return;
      try {
        const bytes = new Uint8Array(await f.arrayBuffer());
        const isWorkbook = bytes[0] === 0x50 && bytes[1] === 0x4b;
        opened = { name: f.name, bytes, isWorkbook };
        status.textContent = `Opened ${f.name}.`;
        clear(sheets);
        if (isWorkbook) {
          const { sheets: names, hidden = [] } = await engine.call({ op: 'sheets', file: opened });
          const saved = host.loadSetup && (await host.loadSetup());
          // as the engine does: the first sheet the user can see, not a hidden one
          const first = names.find((n) => n === saved?.sheet) ?? names.find((n) => !hidden.includes(n)) ?? names[0];
          sheets.append(select('sheet', 'Sheet', names.map((n) => ({ value: n, text: hidden.includes(n) ? `${n} (hidden)` : n })), first, (v) => { load(v).catch(fail); }));
          await load(first);
        } else {
          await load();
        }
      } catch (e) {
        fail(e);
      }
    });
    slot.append(status, h('div', { class: 'buttons' }, button('Open data file…', () => input.click(), { id: 'open-data', primary: true })), input, sheets);
  },
  async loadSetup() {
    try {
      const s = JSON.parse(localStorage.getItem(SETUP_KEY) ?? 'null') as SavedSetup | null;
      return s && s.version === 1 ? s : null;
    } catch {
      return null;
    }
  },
  async saveSetup(setup) { localStorage.setItem(SETUP_KEY, JSON.stringify(setup)); },
  async loadBoundary() { return null; },
  async storeBoundary() {},
  async writeResults(output, engine, stage) {
    stage('Drawing the maps');
    await drawReportPictures(output.report);
    stage('Writing the workbook');
    const base = opened?.isWorkbook ? opened.bytes : undefined;
    const { bytes, note } = await engine.call({ op: 'workbook', report: output.report, base, baseName: opened?.name });
    const stem = (opened?.name ?? 'data').replace(/\.[^.]+$/, '');
    const fileName = `${stem} with results.xlsx`;
    const url = URL.createObjectURL(new Blob([bytes as Uint8Array<ArrayBuffer>], { type: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' }));
    const a = h('a', { href: url, download: fileName });
    document.body.append(a);
    a.click();
    a.remove();
    return {
      message: `The results are in ${fileName} (${output.report.sheets.length} new sheets${base && !note ? ' after your own' : ''}).${note ? ` ${note}` : ''}`,
      download: { url, fileName },
    };
  },
};

applyTheme();
mountSidebar(document.getElementById('sidebar')!, host);
