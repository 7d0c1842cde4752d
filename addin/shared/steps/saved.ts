/**
 * The setup a run leaves in the workbook (or the page's storage), and how the sidebar takes it up
 * again when it opens: the choices, the rates built, and a boundary file kept in the workbook.
 */
import { clear, message } from '../dom.js';
import type { TableSource } from '../host.js';
import type { RateBuilder } from '../rate-builder.js';
import type { SavedSetup } from '../types.js';
import type { SidebarContext } from './context.js';
import { boundaryId, weightsSpec, type State } from './state.js';

/** The choices to keep for the next run. */
export function currentSetup(s: State, rateBuilder: RateBuilder): SavedSetup {
  return {
    version: 1, sheet: s.source?.table.sheet, id: s.id, ...(s.label ? { label: s.label } : {}), y: s.y, x: [...s.x],
    areas: s.areas?.kind === 'file' ? { kind: 'file', names: s.areas.files.map((f) => f.name), ...(boundaryId(s) ? { idProperty: boundaryId(s) } : {}) }
      : s.areas?.kind === 'points' && s.areas.x && s.areas.y ? { kind: 'points', xColumn: s.areas.x, yColumn: s.areas.y } : undefined,
    weights: weightsSpec(s), transform: s.transform, linkUnneighboured: s.linkUnneighboured, compare: s.compare,
    ...(s.method === 'band' && s.distanceFromData ? { bandFromData: true } : {}),
    ...(s.idsIgnoreLeadingZeros ? { idsIgnoreLeadingZeros: true } : {}),
    ...(s.coordinates ? { coordinates: s.coordinates } : {}),
    ...(s.models ? { models: [...s.models] } : {}), robust: s.robust, dropMissing: s.dropMissing,
    ...(rateBuilder.names().length ? { rates: rateBuilder.choices() } : {}),
  };
}

/**
 * Reads the last setup and any boundary kept in the document, and takes them up. `keep` hands the
 * setup to the data step (a table arriving later keeps its columns); `useTable` redraws a table that
 * arrived before the setup did.
 */
export async function restoreSetup(ctx: SidebarContext, keep: (saved: SavedSetup | null) => void, useTable: (source: TableSource) => void, storedNote: HTMLElement): Promise<void> {
  const { s, host, rateBuilder } = ctx;
  const saved = await host.loadSetup().catch(() => null);
  keep(saved);
  if (saved) {
    if (saved.weights) {
      s.method = saved.weights.method;
      if ('k' in saved.weights) { s.k = saved.weights.k; s.tiesInclude = saved.weights.ties === 'include'; }
      // a band taken from the data is suggested anew from the data at hand
      if ('distance' in saved.weights && !saved.bandFromData) { s.distance = saved.weights.distance; s.distanceFromData = false; }
      if ('power' in saved.weights) s.power = saved.weights.power;
      if ('order' in saved.weights && saved.weights.order) s.order = saved.weights.order;
      if ('cumulative' in saved.weights) s.cumulative = saved.weights.cumulative === true;
    }
    s.transform = saved.transform ?? s.transform;
    s.linkUnneighboured = saved.linkUnneighboured ?? false;
    s.idsIgnoreLeadingZeros = saved.idsIgnoreLeadingZeros ?? false;
    s.coordinates = saved.coordinates ?? '';
    s.compare = saved.compare ?? false;
    s.models = saved.models ? new Set(saved.models) : null;
    s.robust = saved.robust ?? false;
    s.dropMissing = saved.dropMissing ?? false;
    if (saved.areas?.kind === 'points') s.areas = { kind: 'points', x: saved.areas.xColumn, y: saved.areas.yColumn };
    rateBuilder.restore(saved.rates);
    ctx.redraw.neighbourControls();
    ctx.redraw.model();
    // the table may have arrived before the setup did
    if (s.source) useTable(s.source);
  }
  // a kept boundary that cannot be read is said plainly; the table, the setup and a new file still work
  const stored = await host.loadBoundary().catch((e: unknown) => {
    // the adapter's reasons name the kept file and end by asking for the original again
    const why = (e instanceof Error ? e.message : String(e)).trim();
    const tail = /open the original file again/i.test(why) ? '' : ' Open the boundary file again to run.';
    if (!s.areas) clear(storedNote, message('warning', `${why}${tail} The table and the other settings work as before.`));
    return null;
  });
  if (stored && !s.areas) {
    s.areas = { kind: 'file', files: stored, stored: true, idProperty: saved?.areas?.kind === 'file' ? saved.areas.idProperty : undefined };
    ctx.redraw.areas();
    void ctx.redraw.check();
  }
}
