/** Step 1, Data: the table from the host (the active sheet, or a file opened on the page) and its ID column. */
import { clear, h, select } from '../dom.js';
import type { TableSource } from '../host.js';
import { profileTable } from '../table-profile.js';
import type { SavedSetup } from '../types.js';
import { formatCount } from '../../../src/core/index.js';
import type { SidebarContext } from './context.js';

export interface DataStep {
  /** a table arrived (or arrived again): keep the choices that still fit it, and redraw */
  useTable(source: TableSource): void;
  drawData(): void;
}

/** `saved`: the last setup, once it has been read (the table may come before it). */
export function mountDataStep(ctx: SidebarContext, saved: () => SavedSetup | null): DataStep {
  const { s, host, engine, rateBuilder } = ctx;
  const data = ctx.steps.data;
  const dataSlot = h('div', { class: 'source' });
  data.body.append(dataSlot);

  function useTable(source: TableSource) {
    s.source = source;
    s.profile = profileTable(source.table);
    const p = s.profile;
    const keep = (c?: string) => (c && source.table.headers.includes(c) ? c : undefined);
    s.id = keep(saved()?.id) ?? keep(s.id) ?? p.suggestedId;
    s.label = keep(saved()?.label) ?? keep(s.label);
    if (s.label === s.id) s.label = undefined;
    rateBuilder.refresh();
    const rate = (c?: string) => (c && rateBuilder.names().includes(c) ? c : undefined);
    // the outcome is the analyst's choice: kept from the last setup when the column is there, never guessed
    s.y = keep(saved()?.y) ?? rate(saved()?.y) ?? keep(s.y) ?? rate(s.y);
    if (s.y === s.id) s.y = undefined;
    s.x = new Set((saved()?.x ?? [...s.x]).filter((c) => (p.numeric.includes(c) || rateBuilder.names().includes(c)) && c !== s.y && c !== s.id));
    ctx.redraw.newPlaces(); // other rows may match other areas
    drawData();
    ctx.redraw.areas();
    ctx.redraw.model();
    void ctx.redraw.check();
  }

  function drawData() {
    const p = s.profile!;
    const t = s.source!.table;
    const kinds = { numbers: 'numbers', text: 'text', mixed: 'numbers and text', empty: 'empty' } as const;
    const list = h('ul', { class: 'columns' }, ...p.columns.map((c) =>
      h('li', {}, h('strong', {}, c.name), `: ${kinds[c.kind]}${c.blanks ? `, ${formatCount(c.blanks)} blank` : ''}${c.unique ? ', all different' : ''}`)));
    clear(data.found,
      h('p', {}, `${s.source!.csv ? 'File' : 'Sheet'} "${t.sheet}": ${formatCount(p.n)} rows (header on row ${t.headerRow}), ${formatCount(p.columns.length)} columns.`),
      select('id-column', 'ID column (one per area)', t.headers.map((c) => ({ value: c, text: c })), s.id, (v) => { s.id = v; ctx.redraw.model(); void ctx.redraw.check(); }),
      p.suggestedId ? h('p', { class: 'hint' }, `Suggested: ${p.suggestedId} (every row has a different value).`) : h('p', { class: 'hint' }, 'No column has a different value in every row; pick the ID column.'),
      // optional: a name column, so the per-area sheets say which area is which, not only its ID
      select('label-column', 'Names shown beside the IDs (optional)', [{ value: '', text: '(none)' }, ...t.headers.filter((c) => c !== s.id).map((c) => ({ value: c, text: c }))], s.label ?? '',
        (v) => { s.label = v || undefined; }),
      h('details', {}, h('summary', {}, 'Column types'), list),
    );
  }

  host.dataSource(dataSlot, (source) => { clear(data.errors); useTable(source); }, (e) => { clear(data.errors); ctx.showError(data.errors, e); }, engine);
  return { useTable, drawData };
}
