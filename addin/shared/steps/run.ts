/**
 * Step 6, Run: checks that every step has what a run needs, runs the engine (Run becomes Cancel),
 * has the host write the results, and says what was found: the done message, the suggested model
 * with a button to fit it, "Save areas with results", the warnings and the small maps.
 */
import type { ModelKey, NamedBytesLike } from '../../../src/pipeline/index.js';
import { button, clear, h, message, setDisabled } from '../dom.js';
import { Cancelled } from '../engine-client.js';
import type { ModelChoice } from '../engine-protocol.js';
import { modelWords, summaryLines, type RunSummary } from '../run-summary.js';
import { saveAreasButton } from '../save-areas.js';
import { mapGallery } from '../map-viewer.js';
import type { AreasStep } from './areas.js';
import type { SidebarContext } from './context.js';
import type { LocalStep } from './local.js';
import { currentSetup } from './saved.js';
import { requestedModels } from '../model-choices.js';
import { boundaryId, tickedModels, weightsSpec } from './state.js';

/** What a run takes from the other steps. */
export interface RunNeeds {
  boundaryFiles: AreasStep['boundaryFiles'];
  localRequest: LocalStep['localRequest'];
}

export function mountRunStep(ctx: SidebarContext, needs: RunNeeds): void {
  const { s, host, engine, rateBuilder } = ctx;
  const run = ctx.steps.run;

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
    s.models = new Set([...tickedModels(s, s.modelChoices), key]);
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
    try { boundary = needs.boundaryFiles(); } catch (e) { ctx.showError(run.errors, e); return; }
    if (!boundary) { run.errors.append(message('error', 'Choose both coordinate columns (step 2).')); return; }
    let choices: ModelChoice[];
    try { choices = s.modelChoices ?? (await engine.call({ op: 'models' })).models; } catch (e) { ctx.showError(run.errors, e); return; }
    s.modelChoices = choices;
    setRunning(true);
    progress.value = 0;
    const onProgress = (f: number, text: string) => { progress.value = Math.round(100 * f); stage.textContent = text; };
    try {
      const local = needs.localRequest();
      const { output } = await engine.call({ op: 'run', request: {
        boundary, data: s.source!.file, sheet: s.source!.sheet, id: s.id!, boundaryId: boundaryId(s), y: s.y!, x: [...s.x],
        ...(s.idsIgnoreLeadingZeros ? { idsIgnoreLeadingZeros: true } : {}),
        ...(s.label && s.label !== s.id ? { label: s.label } : {}),
        weights: weightsSpec(s), transform: s.transform, linkUnneighboured: s.linkUnneighboured,
        ...(s.coordinates ? { coordinates: s.coordinates } : {}),
        models: requestedModels(s.models, choices) as ModelKey[],
        robust: s.robust, dropMissing: s.dropMissing, ...(s.compare ? { compareWeights: 'suggested' as const } : {}),
        ...(local ? { local, seed: s.local.seed } : {}),
        ...(rateBuilder.request() ? { rates: rateBuilder.request() } : {}),
      } }, onProgress);
      onProgress(0.94, 'Writing the results');
      const outcome = await host.writeResults(output, engine, (text) => { stage.textContent = text; });
      await host.saveSetup(currentSetup(s, rateBuilder)).catch(() => undefined);
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
        run.found.append(mapGallery(rateMaps, 'rate-maps', 'rate-map'));
      }
      const maps = output.report.sheets.find((sheet) => sheet.role === 'local')?.images ?? [];
      if (maps.length) {
        run.found.append(mapGallery(maps, 'local-maps', 'local-map'));
      }
    } catch (e) {
      progress.value = 0;
      if (e instanceof Cancelled) stage.textContent = 'Stopped. Nothing was written.';
      else { stage.textContent = ''; ctx.showError(run.errors, e); }
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
        ctx.redraw.model();
        runButton.focus();
        void start();
      }, { id: 'run-suggested', primary: true })));
    }
    run.found.append(h('details', {}, h('summary', {}, 'Why this model'), h('p', {}, summary.suggestion.text)));
  }
}
