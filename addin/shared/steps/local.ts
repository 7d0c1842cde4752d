/** Step 5, Where is the pattern?: local statistics of one column, with the allowance for testing every area. */
import { checkbox, clear, h, numberInput, select } from '../dom.js';
import type { SidebarContext } from './context.js';

export interface LocalStep {
  drawLocal(): void;
  /** the run request's `local`, or undefined when the local statistics are not asked for */
  localRequest(): { statistics: ('moran' | 'gi' | 'gistar')[]; of: string; permutations: number; control: { method: 'fdr' | 'bonferroni' | 'none'; level: number } } | undefined;
}

export function mountLocalStep(ctx: SidebarContext): LocalStep {
  const { s, rateBuilder } = ctx;
  const local = ctx.steps.local;

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

  function localRequest() {
    const l = s.local;
    if (!l.on) return undefined;
    const statistics = [...(l.moran ? ['moran' as const] : []), ...(l.gi ? ['gi' as const] : []), ...(l.gistar ? ['gistar' as const] : [])];
    return { statistics, of: l.of, permutations: l.permutations, control: { method: l.control, level: l.level } };
  }

  drawLocal();
  return { drawLocal, localRequest };
}
