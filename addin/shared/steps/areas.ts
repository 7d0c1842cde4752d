/**
 * Step 2, Areas: a boundary file (or coordinate columns of the table), matched to the table's rows by
 * the engine's check, which also builds the neighbours step 3 shows.
 */
import type { NamedBytesLike } from '../../../src/pipeline/index.js';
import { button, checkbox, clear, focusedIdIn, h, message, select } from '../dom.js';
import { joinProblemLines } from '../join-lines.js';
import { pointsLayer } from '../table-profile.js';
import type { CheckResult } from '../engine-protocol.js';
import { formatCount } from '../../../src/core/index.js';
import type { SidebarContext } from './context.js';
import { boundaryId, checkSpec, type State } from './state.js';

export interface AreasStep {
  drawAreas(): void;
  /** match the table to the areas again (and build the neighbours), and draw what the engine found */
  refreshCheck(): Promise<void>;
  /** the boundary files, or a layer of points from the table's coordinate columns; null while not chosen */
  boundaryFiles(): NamedBytesLike[] | null;
  newPlaces(): void;
  /** where a boundary kept in the workbook that could not be read is explained */
  storedNote: HTMLElement;
}

export function mountAreasStep(ctx: SidebarContext): AreasStep {
  const { s, engine } = ctx;
  const areas = ctx.steps.areas;
  const nb = ctx.steps.nb;

  const fileInput = h('input', { type: 'file', id: 'boundary-file', accept: '.geojson,.json,.topojson,.zip,.shp,.shx,.dbf,.prj,.cpg', multiple: true, hidden: true });
  fileInput.addEventListener('change', async () => {
    const files = [...(fileInput.files ?? [])];
    if (!files.length) return;
    // a new file is chosen afresh: the ID property chosen for the last one may not exist in it, or mean something else
    s.areas = { kind: 'file', files: await Promise.all(files.map(async (f) => ({ name: f.name, bytes: new Uint8Array(await f.arrayBuffer()) }))) };
    newPlaces();
    drawAreas();
    void refreshCheck();
  });
  const openButton = button('Open boundary file…', () => fileInput.click(), { id: 'open-boundary' });
  const pointsButton = button('Use coordinate columns instead', () => { s.areas = { kind: 'points' }; newPlaces(); drawAreas(); }, { id: 'use-points' });
  areas.body.append(h('p', { class: 'hint' }, 'GeoJSON, TopoJSON or a zipped shapefile. It stays on this computer.'), h('div', { class: 'buttons' }, openButton, pointsButton), fileInput);
  const areaChoice = h('div');
  // why a boundary kept in the workbook could not be read; stays until another choice is made
  const storedNote = h('div', { id: 'stored-boundary-note' });
  areas.body.append(storedNote, areaChoice);

  function drawAreas() {
    clear(areaChoice);
    if (s.areas) clear(storedNote);
    if (s.areas?.kind === 'file') {
      areaChoice.append(h('p', {}, `Boundaries: ${s.areas.files.map((f) => f.name).join(', ')}${s.areas.stored ? ' (kept in this workbook from an earlier run)' : ''}.`));
    } else if (s.areas?.kind === 'points' && s.profile) {
      const a = s.areas;
      const opts = [{ value: '', text: '(choose)' }, ...s.profile.numeric.map((c) => ({ value: c, text: c }))];
      areaChoice.append(
        select('across-column', 'Across (x or longitude)', opts, a.x, (v) => { a.x = v || undefined; newPlaces(); void refreshCheck(); }),
        select('up-column', 'Up (y or latitude)', opts, a.y, (v) => { a.y = v || undefined; newPlaces(); void refreshCheck(); }),
      );
    }
  }

  function boundaryFiles(): NamedBytesLike[] | null {
    if (!s.areas || !s.source || !s.id) return null;
    if (s.areas.kind === 'file') return s.areas.files;
    if (!s.areas.x || !s.areas.y) return null;
    return [pointsLayer(s.source.table, s.id, s.areas.x, s.areas.y)];
  }

  /** New places (a boundary file, coordinate columns, a statement of the coordinates): a band taken from the data is suggested anew. */
  function newPlaces() {
    if (s.distanceFromData) s.distance = undefined;
  }

  let checkSerial = 0;
  let refocusAreas = '';
  async function refreshCheck() {
    const serial = ++checkSerial;
    clear(areas.errors); clear(nb.errors);
    let boundary: NamedBytesLike[] | null;
    try { boundary = boundaryFiles(); } catch (e) { ctx.showError(areas.errors, e); return; }
    if (!boundary || !s.source || !s.id) { clear(areas.found); clear(nb.found); return; }
    // a control of this step that had the focus (the leading-zeros tick box, the ID property) gets it back once the answer is drawn
    refocusAreas ||= focusedIdIn(areas.found);
    clear(areas.found, h('p', { class: 'hint' }, 'Matching the table to the areas…'));
    try {
      const { result } = await engine.call({ op: 'check', check: {
        boundary, data: s.source.file, sheet: s.source.sheet, id: s.id, boundaryId: boundaryId(s), idsIgnoreLeadingZeros: s.idsIgnoreLeadingZeros, weights: checkSpec(s), transform: s.transform, linkUnneighboured: s.linkUnneighboured,
        ...(s.coordinates ? { coordinates: s.coordinates } : {}),
      } });
      if (serial !== checkSerial) return;
      // the boundary file names the IDs otherwise: take the property holding most of the table's IDs, once
      const best = result.idCandidates?.[0];
      if (best && s.areas?.kind === 'file' && !s.areas.idProperty) {
        s.areas.idProperty = best.property;
        s.areas.suggested = best;
        void refreshCheck();
        return;
      }
      s.check = result;
      if (s.method === 'band' && s.distance === undefined && result.bandSuggestion) {
        s.distance = result.bandSuggestion.distance;
        s.distanceFromData = true;
      }
      if (s.method === 'band') ctx.redraw.bandControl();
      drawJoin(result);
      if (refocusAreas) { areas.found.querySelector<HTMLElement>(`#${CSS.escape(refocusAreas)}`)?.focus(); refocusAreas = ''; }
      ctx.redraw.neighbours();
    } catch (e) {
      if (serial !== checkSerial) return;
      refocusAreas = '';
      clear(areas.found);
      ctx.showError(areas.errors, e);
    }
  }

  function drawJoin(r: CheckResult) {
    const lines = joinProblemLines(r.join, Boolean(r.joinError));
    const property = boundaryId(s);
    const by = property ? `${s.id} (called ${property} in the boundary file)` : s.id;
    const idChoice: HTMLElement[] = [];
    if (s.areas?.kind === 'file') {
      const areasNow = s.areas;
      const current = areasNow.idProperty ?? s.id;
      const names = r.propertyNames.includes(current!) ? r.propertyNames : ['', ...r.propertyNames];
      idChoice.push(select('boundary-id', 'ID in the boundary file', names.map((n) => ({ value: n, text: n || '(choose)' })), r.propertyNames.includes(current!) ? current : '',
        (v) => { areasNow.idProperty = v || undefined; void refreshCheck(); }));
      const chosen = areasNow.suggested;
      if (chosen && chosen.property === areasNow.idProperty) idChoice.push(h('p', { class: 'hint' }, `Chosen by itself: the property holding the most of ${s.id}'s IDs. Change it here if another is meant.`));
    }
    clear(areas.found,
      h('p', {}, `${formatCount(r.features)} areas in the file (${r.coordinates === 'geographic' ? 'longitude/latitude' : 'projected coordinates'}${r.coordinatesGuessed ? ', guessed: the file does not say' : ''}); `
        + (r.joinError ? `the rows cannot be matched to them by ${by} until the problems below are fixed.` : `${formatCount(r.matched)} matched to rows by ${by}.`)),
      ...idChoice,
      ...(r.join.zeroPaddingSuspects.length || s.idsIgnoreLeadingZeros
        ? [checkbox('ids-leading-zeros', 'Match 01001 with 1001 (IDs that differ only by leading zeros; recorded in the results)', s.idsIgnoreLeadingZeros,
          (v) => { s.idsIgnoreLeadingZeros = v; void refreshCheck(); })]
        : []),
      ...(s.areas ? [select('coordinates', 'Coordinates', [
        { value: '', text: 'As the file says (guessed when it does not)' },
        { value: 'geographic', text: 'Longitude/latitude degrees' },
        { value: 'projected', text: 'Projected (planar units)' },
      ], s.coordinates, (v) => { s.coordinates = v as State['coordinates']; newPlaces(); void refreshCheck(); })] : []),
      lines.length ? h('ul', { class: 'join-problems' }, ...lines.map((l) => h('li', {}, l))) : r.joinError ? h('span') : h('p', { class: 'ok' }, 'Every row has exactly one area.'),
    );
    if (r.joinError) areas.errors.append(message('error', r.joinError));
    for (const w of r.warnings) areas.found.append(message('warning', w));
  }

  return { drawAreas, refreshCheck, boundaryFiles, newPlaces, storedNote };
}
