/**
 * The sidebar: six steps top to bottom (data, areas, neighbours, model, where is the pattern, run), each showing what it
 * found. Shared by the Excel task pane and the browser page; the host supplies the table and
 * writes the results. The engine runs in a worker (EngineClient). Each step is a module of its own
 * under steps/; they share the state and one another's redraws through the context (steps/context.ts).
 */
import { EngineClient } from './engine-client.js';
import type { SidebarHost } from './host.js';
import { functionsHelp } from './functions-help.js';
import { mountRateBuilder } from './rate-builder.js';
import type { SavedSetup } from './types.js';
import { addStep, errorShower, type Redraws, type SidebarContext } from './steps/context.js';
import { initialState } from './steps/state.js';
import { mountDataStep } from './steps/data.js';
import { mountAreasStep } from './steps/areas.js';
import { mountNeighboursStep } from './steps/neighbours.js';
import { mountModelStep } from './steps/model.js';
import { mountLocalStep } from './steps/local.js';
import { mountRunStep } from './steps/run.js';
import { restoreSetup } from './steps/saved.js';

export function mountSidebar(root: HTMLElement, host: SidebarHost): void {
  const engine = new EngineClient();
  const s = initialState();
  let saved: SavedSetup | null = null;
  const steps = {
    data: addStep(root, 1, 'Data'),
    areas: addStep(root, 2, 'Areas'),
    nb: addStep(root, 3, 'Neighbours'),
    model: addStep(root, 4, 'Model'),
    local: addStep(root, 5, 'Where is the pattern?'),
    run: addStep(root, 6, 'Run'),
  };
  // each step's redraws, bound below once the step is mounted
  const redraw = {} as Redraws;
  // "Build a rate from two columns" sits at the top of the model step; its rates join the column lists
  const rateBuilder = mountRateBuilder(() => (s.profile ? s.profile.numeric.filter((c) => c !== s.id) : []), () => {
    const names = ctx.modelColumns();
    if (s.y && !names.includes(s.y)) s.y = undefined; // never a guess: the analyst chooses again
    for (const c of [...s.x]) if (!names.includes(c)) s.x.delete(c);
    if (s.local.of.startsWith('rate:') && !rateBuilder.names().includes(s.local.of.slice(5))) s.local.of = 'outcome';
    redraw.model();
    redraw.local();
  });
  const ctx: SidebarContext = {
    s, host, engine, steps, rateBuilder, redraw,
    showError: errorShower(s, host),
    modelColumns: () => [...(s.profile ? s.profile.numeric.filter((c) => c !== s.id) : []), ...rateBuilder.names()],
  };

  const data = mountDataStep(ctx, () => saved);
  redraw.data = data.drawData;
  const areas = mountAreasStep(ctx);
  Object.assign(redraw, { areas: areas.drawAreas, check: areas.refreshCheck, newPlaces: areas.newPlaces });
  const neighbours = mountNeighboursStep(ctx);
  Object.assign(redraw, { neighbourControls: neighbours.drawNeighbourControls, bandControl: neighbours.updateBandControl, neighbours: neighbours.drawNeighbours });
  const model = mountModelStep(ctx);
  redraw.model = model.drawModel;
  const local = mountLocalStep(ctx);
  redraw.local = local.drawLocal;
  mountRunStep(ctx, { boundaryFiles: areas.boundaryFiles, localRequest: local.localRequest });

  // the cell functions, where there are cells (Excel)
  if (host.kind === 'excel') root.append(functionsHelp());

  // the last setup, and boundaries kept in the document
  void restoreSetup(ctx, (setup) => { saved = setup; }, data.useTable, areas.storedNote);
}
