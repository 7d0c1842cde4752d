/**
 * The sidebar: six steps top to bottom (data, areas, neighbours, model, where is the pattern, run), each showing what it
 * found. Shared by the Excel task pane and the browser page; the host supplies the table and
 * writes the results. The engine runs in a worker (EngineClient).
 */
import type { ModelKey, NamedBytesLike } from '../../src/pipeline/index.js';
import type { WeightsSpec, WeightsTransform } from '../../src/weights/index.js';
import { button, checkbox, clear, focusedIdIn, h, message, numberInput, select, setDisabled, some } from './dom.js';
import { Cancelled, EngineClient, EngineFailure } from './engine-client.js';
import type { CheckRequest, CheckResult, EngineError, ModelChoice } from './engine-protocol.js';
import type { SidebarHost, TableSource } from './host.js';
import { saveAreasButton } from './save-areas.js';
import { functionsHelp } from './functions-help.js';
import { cellOf, pointsLayer, profileTable, type TableProfile } from './table-profile.js';
import { joinProblemLines } from './join-lines.js';
import { builtRateParts, rateParts } from './rate-parts.js';
import { modelWords, summaryLines, type RunSummary } from './run-summary.js';
import { mountRateBuilder } from './rate-builder.js';
import type { BoundaryFile, SavedSetup } from './types.js';
import { formatCount } from '../../src/core/count.js';

type Method = WeightsSpec['method'];

interface State {
  source?: TableSource;
  profile?: TableProfile;
  id?: string;
  /** for a boundary file: its ID property when named differently from the table's ID column */
  areas: { kind: 'file'; files: BoundaryFile[]; stored?: boolean; idProperty?: string; suggested?: { property: string } }
    | { kind: 'points'; x?: string; y?: string } | null;
  check?: CheckResult;
  method: Method;
  /** distance band: undefined until the data suggest one or the analyst types one */
  k: number; distance?: number; power: number; order: number;
  /** the band distance is the one suggested from the data (a new boundary file or coordinates suggest anew) */
  distanceFromData: boolean;
  /** k-nearest: every area tied at the k-th distance becomes a neighbour (else the lower rows fill the places) */
  tiesInclude: boolean;
  transform: WeightsTransform;
  linkUnneighboured: boolean;
  /** the analyst's statement of the coordinates ('' = as the file says, or guessed) */
  coordinates: '' | 'geographic' | 'projected';
  /** match all-digit IDs that differ only by leading zeros: off until the analyst ticks it (recorded in the results) */
  idsIgnoreLeadingZeros: boolean;
  /** refit under the usual alternative neighbour definitions, for a comparison sheet */
  compare: boolean;
  y?: string;
  x: Set<string>;
  /** the engine's models (from its registry), once it has said */
  modelChoices: ModelChoice[] | null;
  /** the models ticked beyond the always-fitted ones; null: every model (the default) */
  models: Set<string> | null;
  robust: boolean; dropMissing: boolean;
  /** where is the pattern? local statistics of one column */
  local: { on: boolean; of: string; moran: boolean; gi: boolean; gistar: boolean; permutations: number; seed: number; control: 'fdr' | 'bonferroni' | 'none'; level: number };
  running: boolean;
}

/** About three significant figures, for a distance in a sentence. */
const round3 = (x: number) => String(Number(x.toPrecision(3)));

const METHODS: { value: Method; text: string }[] = [
  { value: 'queen', text: 'Shared border or corner (queen)' },
  { value: 'rook', text: 'Shared border only (rook)' },
  { value: 'knn', text: 'Nearest areas (a fixed number)' },
  { value: 'band', text: 'All areas within a distance' },
  { value: 'idw', text: 'Inverse distance' },
];

export function mountSidebar(root: HTMLElement, host: SidebarHost): void {
  const engine = new EngineClient();
  const s: State = {
    areas: null, method: 'queen', k: 5, distance: undefined, distanceFromData: true, power: 1, order: 1, tiesInclude: false, transform: 'row', linkUnneighboured: false, idsIgnoreLeadingZeros: false, coordinates: '', compare: false,
    x: new Set(), modelChoices: null, models: null, robust: false, dropMissing: false, running: false,
    local: { on: false, of: 'outcome', moran: true, gi: false, gistar: false, permutations: 999, seed: 20261201, control: 'fdr', level: 0.05 },
  };
  let saved: SavedSetup | null = null;

  const step = (n: number, title: string) => {
    const id = `step-${n}-title`;
    const body = h('div', { class: 'step-body' });
    const found = h('div', { class: 'found', 'aria-live': 'polite' });
    const errors = h('div', { class: 'errors' });
    root.append(h('section', { class: 'step', 'aria-labelledby': id }, h('h2', { id }, h('span', { class: 'num' }, String(n)), ` ${title}`), body, found, errors));
    return { body, found, errors };
  };
  const data = step(1, 'Data');
  const areas = step(2, 'Areas');
  const nb = step(3, 'Neighbours');
  const model = step(4, 'Model');
  const local = step(5, 'Where is the pattern?');
  const run = step(6, 'Run');
  // "Build a rate from two columns" sits at the top of the model step; its rates join the column lists
  const rateBuilder = mountRateBuilder(() => (s.profile ? s.profile.numeric.filter((c) => c !== s.id) : []), () => {
    const names = modelColumns();
    if (s.y && !names.includes(s.y)) s.y = undefined; // never a guess: the analyst chooses again
    for (const c of [...s.x]) if (!names.includes(c)) s.x.delete(c);
    if (s.local.of.startsWith('rate:') && !rateBuilder.names().includes(s.local.of.slice(5))) s.local.of = 'outcome';
    drawModel();
    drawLocal();
  });
  /** the columns a model may use: the table's numeric columns (not the ID) and the rates built here */
  const modelColumns = () => [...(s.profile ? s.profile.numeric.filter((c) => c !== s.id) : []), ...rateBuilder.names()];

  /** An error shown inline; for bad input with a row, names the cell (and in Excel offers to show it). */
  const showError = (where: HTMLElement, e: unknown) => {
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

  // ---- 1 Data
  const dataSlot = h('div', { class: 'source' });
  data.body.append(dataSlot);
  host.dataSource(dataSlot, (source) => { clear(data.errors); useTable(source); }, (e) => { clear(data.errors); showError(data.errors, e); }, engine);

  function useTable(source: TableSource) {
    s.source = source;
    s.profile = profileTable(source.table);
    const p = s.profile;
    const keep = (c?: string) => (c && source.table.headers.includes(c) ? c : undefined);
    s.id = keep(saved?.id) ?? keep(s.id) ?? p.suggestedId;
    rateBuilder.refresh();
    const rate = (c?: string) => (c && rateBuilder.names().includes(c) ? c : undefined);
    // the outcome is the analyst's choice: kept from the last setup when the column is there, never guessed
    s.y = keep(saved?.y) ?? rate(saved?.y) ?? keep(s.y) ?? rate(s.y);
    if (s.y === s.id) s.y = undefined;
    s.x = new Set((saved?.x ?? [...s.x]).filter((c) => (p.numeric.includes(c) || rateBuilder.names().includes(c)) && c !== s.y && c !== s.id));
    newPlaces(); // other rows may match other areas
    drawData();
    drawAreas();
    drawModel();
    void refreshCheck();
  }

  function drawData() {
    const p = s.profile!;
    const t = s.source!.table;
    const kinds = { numbers: 'numbers', text: 'text', mixed: 'numbers and text', empty: 'empty' } as const;
    const list = h('ul', { class: 'columns' }, ...p.columns.map((c) =>
      h('li', {}, h('strong', {}, c.name), `: ${kinds[c.kind]}${c.blanks ? `, ${c.blanks} blank` : ''}${c.unique ? ', all different' : ''}`)));
    clear(data.found,
      h('p', {}, `${s.source!.csv ? 'File' : 'Sheet'} "${t.sheet}": ${formatCount(p.n)} rows (header on row ${t.headerRow}), ${formatCount(p.columns.length)} columns.`),
      select('id-column', 'ID column (one per area)', t.headers.map((c) => ({ value: c, text: c })), s.id, (v) => { s.id = v; drawModel(); void refreshCheck(); }),
      p.suggestedId ? h('p', { class: 'hint' }, `Suggested: ${p.suggestedId} (every row has a different value).`) : h('p', { class: 'hint' }, 'No column has a different value in every row; pick the ID column.'),
      h('details', {}, h('summary', {}, 'Column types'), list),
    );
  }

  // ---- 2 Areas
  const fileInput = h('input', { type: 'file', id: 'boundary-file', accept: '.geojson,.json,.topojson,.zip,.shp,.shx,.dbf,.prj,.cpg', multiple: true, hidden: true });
  fileInput.addEventListener('change', async () => {
    const files = [...(fileInput.files ?? [])];
    if (!files.length) return;
    const kept = s.areas?.kind === 'file' ? s.areas.idProperty : undefined;
    s.areas = { kind: 'file', files: await Promise.all(files.map(async (f) => ({ name: f.name, bytes: new Uint8Array(await f.arrayBuffer()) }))), idProperty: kept };
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

  /** The boundary file's ID property when it differs from the table's ID column (points carry the table's own IDs). */
  function boundaryId(): string | undefined {
    return s.areas?.kind === 'file' && s.areas.idProperty && s.areas.idProperty !== s.id ? s.areas.idProperty : undefined;
  }

  /** New places (a boundary file, coordinate columns, a statement of the coordinates): a band taken from the data is suggested anew. */
  function newPlaces() {
    if (s.distanceFromData) s.distance = undefined;
  }

  /** The neighbour rule; a distance band without a distance yet is left for the check to suggest. */
  function checkSpec(): CheckRequest['weights'] {
    return s.method === 'band' && s.distance === undefined ? { method: 'band' } : weightsSpec();
  }

  function weightsSpec(): WeightsSpec {
    switch (s.method) {
      case 'queen': case 'rook': return { method: s.method, order: s.order };
      case 'knn': return s.tiesInclude ? { method: 'knn', k: s.k, ties: 'include' } : { method: 'knn', k: s.k };
      case 'band': return { method: 'band', distance: s.distance ?? NaN };
      case 'idw': return { method: 'idw', power: s.power };
    }
  }

  let checkSerial = 0;
  let refocusAreas = '';
  async function refreshCheck() {
    const serial = ++checkSerial;
    clear(areas.errors); clear(nb.errors);
    let boundary: NamedBytesLike[] | null;
    try { boundary = boundaryFiles(); } catch (e) { showError(areas.errors, e); return; }
    if (!boundary || !s.source || !s.id) { clear(areas.found); clear(nb.found); return; }
    // a control of this step that had the focus (the leading-zeros tick box, the ID property) gets it back once the answer is drawn
    refocusAreas ||= focusedIdIn(areas.found);
    clear(areas.found, h('p', { class: 'hint' }, 'Matching the table to the areas…'));
    try {
      const { result } = await engine.call({ op: 'check', check: {
        boundary, data: s.source.file, sheet: s.source.sheet, id: s.id, boundaryId: boundaryId(), idsIgnoreLeadingZeros: s.idsIgnoreLeadingZeros, weights: checkSpec(), transform: s.transform, linkUnneighboured: s.linkUnneighboured,
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
      if (s.method === 'band') updateBandControl();
      drawJoin(result);
      if (refocusAreas) { areas.found.querySelector<HTMLElement>(`#${CSS.escape(refocusAreas)}`)?.focus(); refocusAreas = ''; }
      drawNeighbours(result);
    } catch (e) {
      if (serial !== checkSerial) return;
      refocusAreas = '';
      clear(areas.found);
      showError(areas.errors, e);
    }
  }

  function drawJoin(r: CheckResult) {
    const lines = joinProblemLines(r.join, Boolean(r.joinError));
    const property = boundaryId();
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
        + (r.joinError ? `the rows cannot be matched to them by ${by} until the problems below are fixed.` : `${r.matched} matched to rows by ${by}.`)),
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

  // ---- 3 Neighbours
  const nbControls = h('div');
  nb.body.append(nbControls);
  function drawNeighbourControls() {
    const changed = () => { drawNeighbourControls(); void refreshCheck(); };
    const extra: HTMLElement[] = [];
    if (s.method === 'queen' || s.method === 'rook') extra.push(numberInput('order', 'Steps away (1 = touching)', s.order, (v) => { s.order = Math.max(1, Math.round(v)); changed(); }, { min: 1 }));
    if (s.method === 'knn') {
      extra.push(numberInput('k', 'How many nearest areas', s.k, (v) => { s.k = Math.max(1, Math.round(v)); changed(); }, { min: 1 }));
      extra.push(checkbox('ties-include', 'Include every area tied at the last place (otherwise the lower rows are taken)', s.tiesInclude, (v) => { s.tiesInclude = v; void refreshCheck(); }));
    }
    if (s.method === 'band') extra.push(bandControl(changed));
    if (s.method === 'idw') extra.push(numberInput('power', 'Power of the distance', s.power, (v) => { s.power = v; changed(); }, { min: 0, step: 0.5 }));
    clear(nbControls,
      select('method', 'Who counts as a neighbour', METHODS, s.method, (v) => { s.method = v as Method; changed(); }),
      ...extra,
      select('transform', 'Weights', [{ value: 'row', text: 'Each area’s weights sum to 1' }, { value: 'binary', text: 'Every link weighs 1' }], s.transform, (v) => { s.transform = v as WeightsTransform; void refreshCheck(); }),
      checkbox('link-unneighboured', 'Link areas without neighbours to the nearest area', s.linkUnneighboured, (v) => { s.linkUnneighboured = v; void refreshCheck(); }),
      checkbox('compare', 'Also fit under a few other neighbour definitions, side by side', s.compare, (v) => { s.compare = v; }),
    );
  }
  drawNeighbourControls();

  /** The band's distance in the unit of the coordinates, with the distance the data suggest. */
  function bandControl(changed: () => void): HTMLElement {
    const { label, hint } = bandWords();
    return numberInput('distance', label, s.distance, (v) => {
      s.distance = v > 0 ? v : undefined;
      s.distanceFromData = !(v > 0);
      changed();
    }, { min: 0, step: 'any', hint: hint || ' ' });
  }

  function bandWords(): { label: string; hint: string } {
    const suggestion = s.check?.bandSuggestion;
    const unit = suggestion?.unit ?? (s.check ? (s.check.coordinates === 'geographic' ? 'km' : 'coordinate units') : undefined);
    const label = unit === 'km' ? 'Distance in kilometres (great-circle)' : unit ? 'Distance in the coordinates’ units' : 'Distance';
    const hint = !suggestion ? (s.check ? '' : 'Suggested from the data once the areas are matched.')
      : `Every area has a neighbour from ${round3(suggestion.allLinked)} ${suggestion.unit}; ${suggestion.distance} ${suggestion.unit} is that rounded up${s.distanceFromData ? ' (used until you type another)' : ''}.`;
    return { label, hint };
  }

  /** After a check: the unit, the suggestion and a suggested value, updated in place (the analyst may be typing). */
  function updateBandControl() {
    const input = nbControls.querySelector<HTMLInputElement>('#distance');
    if (!input) return;
    const { label, hint } = bandWords();
    nbControls.querySelector('label[for="distance"]')!.textContent = label;
    nbControls.querySelector('#distance-hint')!.textContent = hint;
    if (s.distanceFromData && document.activeElement !== input) input.value = s.distance === undefined ? '' : String(s.distance);
  }

  function drawNeighbours(r: CheckResult) {
    clear(nb.found);
    if (r.neighboursError) { showError(nb.errors, new EngineFailure(r.neighboursError)); return; }
    const w = r.neighbours;
    if (!w) return;
    const top = Math.max(...w.histogram.map(([, c]) => c), 1);
    const bars = h('div', { class: 'histogram', role: 'img', 'aria-label': `Neighbour counts: ${w.histogram.map(([k, c]) => `${formatCount(c)} areas have ${k}`).join(', ')}` },
      ...w.histogram.map(([k, c]) => {
        const bar = h('span', { class: 'bar' });
        bar.style.width = `${Math.max(2, (100 * c) / top)}%`;
        return h('div', { class: 'hrow' }, h('span', { class: 'hk' }, String(k)), bar, h('span', { class: 'hc' }, String(c)));
      }));
    nb.found.append(
      h('p', {}, `${w.description}. Neighbours per area: fewest ${w.minNeighbours}, average ${w.meanNeighbours.toFixed(1)}, most ${w.maxNeighbours}.`),
      h('p', { class: 'hint' }, 'Number of neighbours → number of areas'), bars,
      h('p', {}, w.components === 1 ? 'All areas are linked into one group.' : `The areas fall into ${w.components} separate groups.`),
    );
    if (w.tiesWarning) nb.found.append(message('warning', w.tiesWarning));
    if (w.withoutNeighbours.length) nb.found.append(message('warning', `${formatCount(w.withoutNeighbours.length)} area(s) have no neighbours: ${some(w.withoutNeighbours, (i) => i)}.`));
  }

  // ---- 4 Model
  function drawModel() {
    const p = s.profile;
    if (!p) { clear(model.body, h('p', { class: 'hint' }, 'Choose the data first.')); return; }
    const candidates = modelColumns();
    const rates = rateBuilder.names();
    const shown = (c: string) => (rates.includes(c) ? `${c} (rate built above)` : c);
    const outcomes = [{ value: '', text: '(choose the outcome)' }, ...candidates.map((c) => ({ value: c, text: shown(c) }))];
    // one replacement, so the control that had the focus gets it back (dom.ts clear)
    clear(model.body,
      rateBuilder.element,
      select('y-column', 'Outcome to explain', outcomes, s.y ?? '', (v) => { s.y = v || undefined; if (v) s.x.delete(v); drawModel(); drawLocal(); }),
      h('fieldset', { class: 'xs' }, h('legend', {}, 'Explained by'),
        ...candidates.filter((c) => c !== s.y).map((c) => checkbox(`x-${c.replace(/\W/g, '_')}`, shown(c), s.x.has(c), (v) => { if (v) s.x.add(c); else s.x.delete(c); drawRateParts(); }))),
      rateWarnings,
      modelChoice(),
      checkbox('robust', 'Standard errors robust to unequal spread', s.robust, (v) => { s.robust = v; }),
      checkbox('drop-missing', 'Leave out rows with missing values', s.dropMissing, (v) => { s.dropMissing = v; }),
    );
    drawRateParts();
  }
  const rateWarnings = h('div', { class: 'rate-parts' });
  drawModel();

  /** A warning for each ticked column that is one of the counts the outcome is made from. */
  function drawRateParts() {
    const t = s.source?.table;
    const ticked = [...s.x];
    const built = rateBuilder.request()?.recipes.find((r) => r.name === s.y);
    const found = !t || !s.y || !ticked.length ? [] : built ? builtRateParts(built, ticked) : rateParts(t, s.y, ticked, s.profile!.numeric);
    clear(rateWarnings, ...found.map((f) => message('warning',
      `${f.column} looks like ${f.role === 'numerator' ? 'the numerator of' : f.role === 'denominator' ? 'the denominator of' : 'the numerator or denominator of'} the rate ${s.y} (${f.evidence}). ` +
      `Explaining a rate by its own counts explains it by construction, not by anything about the areas; untick ${f.column} unless that is what you mean.`)));
  }

  /** The engine's models: the always-fitted ones named in the legend, a tick box for each of the others. */
  function modelChoice(): HTMLElement {
    const choices = s.modelChoices;
    if (!choices) return h('fieldset', { class: 'models' }, h('legend', {}, 'Models'), h('p', { class: 'hint' }, 'Asking the engine which models it fits…'));
    const always = choices.filter((c) => c.baseline).map((c) => c.label.toLowerCase());
    const ticked = tickedModels(choices);
    return h('fieldset', { class: 'models' }, h('legend', {}, `Models (the ${always.join(' and ')} ${always.length > 1 ? 'are' : 'is'} always fitted)`),
      ...choices.filter((c) => !c.baseline).map((c) => checkbox(`model-${c.key}`, `${c.label}: ${c.about}`, ticked.has(c.key), (v) => {
        const now = tickedModels(choices);
        if (v) now.add(c.key); else now.delete(c.key);
        s.models = now;
      })));
  }

  /** The ticked models beyond the always-fitted ones (by default every one). */
  function tickedModels(choices: ModelChoice[]): Set<string> {
    return new Set(s.models ?? choices.filter((c) => !c.baseline).map((c) => c.key));
  }

  void engine.call({ op: 'models' }).then(({ models }) => { s.modelChoices = models; drawModel(); }, () => undefined);

  // ---- 5 Where is the pattern? (local statistics)
  function drawLocal() {
    const l = s.local;
    const columns = s.profile ? s.profile.numeric.filter((c) => c !== s.id) : [];
    const controls: HTMLElement[] = [
      checkbox('local-on', 'Find where values cluster, area by area (local statistics)', l.on, (v) => { l.on = v; drawLocal(); }),
    ];
    if (l.on) {
      controls.push(
        select('local-of', 'Of which values', [
          { value: 'outcome', text: `The outcome${s.y ? ` (${s.y})` : ''}` },
          { value: 'residuals', text: 'The plain regression’s residuals' },
          ...rateBuilder.names().map((c) => ({ value: `rate:${c}`, text: `${c}, standardised (fair to small areas)` })),
          ...columns.filter((c) => c !== s.y).map((c) => ({ value: c, text: c })),
        ], l.of, (v) => { l.of = v; }),
        h('fieldset', { class: 'local-statistics' }, h('legend', {}, 'Statistics'),
          checkbox('local-moran', 'Local Moran’s I: clusters and areas unlike their neighbours', l.moran, (v) => { l.moran = v; }),
          checkbox('local-gi', 'Getis–Ord Gi: the neighbours’ values, the area left out', l.gi, (v) => { l.gi = v; }),
          checkbox('local-gistar', 'Getis–Ord Gi*: the area and its neighbours together', l.gistar, (v) => { l.gistar = v; })),
        numberInput('local-permutations', 'Permutations per area', l.permutations, (v) => { l.permutations = v; }, { min: 0, step: 100 }),
        numberInput('local-seed', 'Seed (fixes the random draws)', l.seed, (v) => { l.seed = v; }, { min: 0, step: 1 }),
        select('local-control', 'Allowance for testing every area', [
          { value: 'fdr', text: 'False discovery rate (Benjamini–Hochberg)' },
          { value: 'bonferroni', text: 'Any false finding (Bonferroni)' },
          { value: 'none', text: 'None: each area on its own (labelled as such)' },
        ], l.control, (v) => { l.control = v as typeof l.control; }),
        numberInput('local-level', 'Level', l.level, (v) => { l.level = v; }, { min: 0.001, step: 0.01 }),
      );
    }
    clear(local.body, ...controls);
  }
  drawLocal();

  function localRequest() {
    const l = s.local;
    if (!l.on) return undefined;
    const statistics = [...(l.moran ? ['moran' as const] : []), ...(l.gi ? ['gi' as const] : []), ...(l.gistar ? ['gistar' as const] : [])];
    return { statistics, of: l.of, permutations: l.permutations, control: { method: l.control, level: l.level } };
  }

  // ---- 6 Run
  const progress = h('fluent-progress-bar', { id: 'progress', max: 100, value: 0, 'aria-label': 'Progress' }) as HTMLElement & { value: number };
  const stage = h('p', { class: 'stage', role: 'status', 'aria-live': 'polite' });
  const runButton = button('Run', () => void start(), { primary: true, id: 'run' });
  // Cancel is there only while a run goes (a greyed-out button is hard to read and does nothing)
  const cancelButton = button('Cancel', () => engine.cancel(), { id: 'cancel' });
  cancelButton.hidden = true;
  run.body.append(h('div', { class: 'buttons' }, runButton, cancelButton), progress, stage);

  /** Run becomes Cancel while the engine works; the keyboard focus follows. */
  function setRunning(running: boolean) {
    s.running = running;
    const from = running ? runButton : cancelButton;
    const to = running ? cancelButton : runButton;
    const hadFocus = from.contains(document.activeElement);
    setDisabled(runButton, running);
    cancelButton.hidden = !running;
    if (hadFocus) to.focus();
  }

  /** Adds a model to the ticked ones (the done message's "run again with the suggested model"). */
  function includeModel(key: string) {
    if (!s.modelChoices) return;
    s.models = new Set([...tickedModels(s.modelChoices), key]);
  }

  function setup(): SavedSetup {
    return {
      version: 1, sheet: s.source?.table.sheet, id: s.id, y: s.y, x: [...s.x],
      areas: s.areas?.kind === 'file' ? { kind: 'file', names: s.areas.files.map((f) => f.name), ...(boundaryId() ? { idProperty: boundaryId() } : {}) }
        : s.areas?.kind === 'points' && s.areas.x && s.areas.y ? { kind: 'points', xColumn: s.areas.x, yColumn: s.areas.y } : undefined,
      weights: weightsSpec(), transform: s.transform, linkUnneighboured: s.linkUnneighboured, compare: s.compare,
      ...(s.method === 'band' && s.distanceFromData ? { bandFromData: true } : {}),
      ...(s.idsIgnoreLeadingZeros ? { idsIgnoreLeadingZeros: true } : {}),
      ...(s.coordinates ? { coordinates: s.coordinates } : {}),
      ...(s.models ? { models: [...s.models] } : {}), robust: s.robust, dropMissing: s.dropMissing,
      ...(rateBuilder.names().length ? { rates: rateBuilder.choices() } : {}),
    };
  }

  async function start() {
    clear(run.errors); clear(run.found);
    const missing = !s.source ? 'Choose the data (step 1).' : !s.id ? 'Choose the ID column (step 1).'
      : !s.areas ? 'Open a boundary file or choose coordinate columns (step 2).' : !s.y ? 'Choose the outcome (step 4).'
      : s.method === 'band' && !(s.distance && s.distance > 0) ? 'Give the distance of the band (step 3).'
      : s.check?.joinError ? 'The rows do not match the areas yet: fix the problems shown in step 2 first.'
      : s.x.size === 0 ? 'Tick at least one explanatory column (step 4).'
      : s.local.on && !s.local.moran && !s.local.gi && !s.local.gistar ? 'Tick at least one local statistic (step 5), or untick the local statistics.' : '';
    if (missing) { run.errors.append(message('error', missing)); return; }
    let boundary: NamedBytesLike[] | null;
    try { boundary = boundaryFiles(); } catch (e) { showError(run.errors, e); return; }
    if (!boundary) { run.errors.append(message('error', 'Choose both coordinate columns (step 2).')); return; }
    let choices: ModelChoice[];
    try { choices = s.modelChoices ?? (await engine.call({ op: 'models' })).models; } catch (e) { showError(run.errors, e); return; }
    s.modelChoices = choices;
    const ticked = tickedModels(choices);
    setRunning(true);
    progress.value = 0;
    const onProgress = (f: number, text: string) => { progress.value = Math.round(100 * f); stage.textContent = text; };
    try {
      const { output } = await engine.call({ op: 'run', request: {
        boundary, data: s.source!.file, sheet: s.source!.sheet, id: s.id!, boundaryId: boundaryId(), y: s.y!, x: [...s.x],
        ...(s.idsIgnoreLeadingZeros ? { idsIgnoreLeadingZeros: true } : {}),
        weights: weightsSpec(), transform: s.transform, linkUnneighboured: s.linkUnneighboured,
        ...(s.coordinates ? { coordinates: s.coordinates } : {}),
        models: choices.filter((c) => c.baseline || ticked.has(c.key)).map((c) => c.key as ModelKey),
        robust: s.robust, dropMissing: s.dropMissing, ...(s.compare ? { compareWeights: 'suggested' as const } : {}),
        ...(localRequest() ? { local: localRequest(), seed: s.local.seed } : {}),
        ...(rateBuilder.request() ? { rates: rateBuilder.request() } : {}),
      } }, onProgress);
      onProgress(0.94, 'Writing the results');
      const outcome = await host.writeResults(output, engine, (text) => { stage.textContent = text; });
      await host.saveSetup(setup()).catch(() => undefined);
      const used = s.areas;
      // the results stand without it, but the analyst must learn that the boundary was not kept, and why
      let notKept = '';
      if (used?.kind === 'file' && !used.stored) {
        await host.storeBoundary(used.files).catch((e: unknown) => { notKept = e instanceof Error ? e.message : String(e); });
      }
      onProgress(1, 'Done');
      showDone(output.summary, outcome.message);
      if (notKept) run.found.append(message('warning', notKept));
      if (outcome.download) run.found.append(h('p', {}, h('a', { href: outcome.download.url, download: outcome.download.fileName, id: 'download' }, `Save ${outcome.download.fileName} again`)));
      run.found.append(saveAreasButton(engine, host.kind === 'page' ? (s.source?.file.name ?? 'data').replace(/\.[^.]+$/, '') : s.source?.table.sheet ?? 'sheet'));
      for (const w of output.warnings) run.found.append(message('warning', w));
      const rateMaps = output.report.sheets.find((sheet) => sheet.role === 'rates')?.images ?? [];
      if (rateMaps.length) {
        run.found.append(h('div', { class: 'rate-maps' }, ...rateMaps.map((m) =>
          h('img', { src: `data:image/svg+xml;charset=utf-8,${encodeURIComponent(m.svg)}`, alt: m.alt, width: String(Math.min(m.widthPx, 360)) }))));
      }
      const maps = output.report.sheets.find((sheet) => sheet.role === 'local')?.images ?? [];
      if (maps.length) {
        run.found.append(h('div', { class: 'local-maps' }, ...maps.map((m) =>
          h('img', { src: `data:image/svg+xml;charset=utf-8,${encodeURIComponent(m.svg)}`, alt: m.alt, width: String(Math.min(m.widthPx, 360)) }))));
      }
    } catch (e) {
      progress.value = 0;
      if (e instanceof Cancelled) stage.textContent = 'Stopped. Nothing was written.';
      else { stage.textContent = ''; showError(run.errors, e); }
    } finally {
      setRunning(false);
    }
  }

  /** The done message: the residuals' Moran's I, the suggested model, and a button to fit it when this run did not. */
  function showDone(summary: RunSummary, written: string) {
    run.found.append(message('success', [...summaryLines(summary), written].join('\n')));
    const add = summary.suggestion.notFitted;
    if (add.length) {
      run.found.append(h('div', { class: 'buttons' }, button(`Run again with the ${modelWords(add)}`, () => {
        for (const m of add) includeModel(m.key);
        drawModel();
        runButton.focus();
        void start();
      }, { id: 'run-suggested', primary: true })));
    }
    run.found.append(h('details', {}, h('summary', {}, 'Why this model'), h('p', {}, summary.suggestion.text)));
  }

  // the cell functions, where there are cells (Excel)
  if (host.kind === 'excel') root.append(functionsHelp());

  // ---- the last setup, and boundaries kept in the document
  void (async () => {
    saved = await host.loadSetup().catch(() => null);
    if (saved) {
      if (saved.weights) {
        s.method = saved.weights.method;
        if ('k' in saved.weights) { s.k = saved.weights.k; s.tiesInclude = saved.weights.ties === 'include'; }
        // a band taken from the data is suggested anew from the data at hand
        if ('distance' in saved.weights && !saved.bandFromData) { s.distance = saved.weights.distance; s.distanceFromData = false; }
        if ('power' in saved.weights) s.power = saved.weights.power;
        if ('order' in saved.weights && saved.weights.order) s.order = saved.weights.order;
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
      drawNeighbourControls();
      drawModel();
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
      drawAreas();
      void refreshCheck();
    }
  })();
}
