/**
 * The sidebar's short guide to the SPILL cell functions (Excel only): each function in a line, and a
 * worked example on the demo sheet (the text is in functions-guide.ts). Self-contained: the sidebar
 * only places it. The full descriptions are in the functions' own metadata.
 */
import { h } from './dom.js';
import { CELL_FUNCTION_GUIDE, WORKED_EXAMPLE } from './functions-guide.js';

export function functionsHelp(): HTMLElement {
  return h('details', { class: 'functions-help', id: 'functions-help' },
    h('summary', {}, 'Cell functions (SPILL.…)'),
    h('p', { class: 'hint' }, 'They recalculate when the cells they read change. Neighbours may be a list of links (origin, neighbour, weight) or an n × n weights matrix; whole columns such as A:A work.'),
    h('ul', { class: 'function-list' }, ...CELL_FUNCTION_GUIDE.map((f) => h('li', {}, h('code', {}, `=${f.call}`), `: ${f.gives}`))),
    h('p', {}, h('strong', {}, 'Worked example'), ' on the Vell Basin demo sheet "Districts" (A: district_id, C: long_commute_pct, D to F: broadband_pct, rail_km, rent_index):'),
    h('ol', { class: 'worked-example' }, ...WORKED_EXAMPLE.map((s) => h('li', {}, 'In ', h('strong', {}, s.cell), ' type ', h('code', {}, s.formula), `: ${s.what}.`))),
    h('p', { class: 'hint' }, 'Change a value in column C and the tables follow. K1# means the whole range that K1 spilled into.'),
  );
}
