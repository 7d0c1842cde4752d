import {
  categoryCounts, CONTROL_LABEL, describeControl, LOCAL_CATEGORY_LABEL, LOCAL_STATISTIC_LABEL, type AnalysisResult, type LocalOutcome,
} from '../pipeline/index.js';
import type { LocalCategory, LocalStatisticKind } from '../stats/index.js';
import type { Block, Cell, PngRenderer, ReportImage, TableColumn } from './types.js';
import { num } from './format.js';
import { areaKeyCells, areaKeyColumns } from './areas.js';
import { layoutBlocks, ROW_HEIGHT_PX } from './layout.js';
import { placePictures } from './pictures-for-report.js';
import { categoryMapSvg, type MapCategory } from './pictures/category-map.js';
import { localMoranMapCategories, LOCAL_FILL, P_BAND_FILL } from './pictures/local-palette.js';
import type { Picture } from './pictures/index.js';
import { formatCount } from '../core/count.js';
import { localRate, withheldLocal } from './withheld.js';
import { smoothedLocalCaution } from './rates.js';

const ORDER: LocalStatisticKind[] = ['moran', 'gi', 'gistar'];
const CATEGORY_ORDER: LocalCategory[] = ['high-high', 'high-low', 'low-high', 'low-low', 'not-significant', 'no-neighbours'];

/** The statistic the maps show: local Moran when asked for, else the first asked. */
export function mappedStatistic(result: AnalysisResult): LocalStatisticKind | undefined {
  const l = result.local;
  if (!l) return undefined;
  return ORDER.find((k) => l.results[k]);
}

/** The "Local patterns" sheet: the reading, how the tests were made, the counts, the maps, then every area. */
export function localPatternsSheet(result: AnalysisResult, renderPng?: PngRenderer): { blocks: Block[]; images: ReportImage[] } | undefined {
  const l = result.local;
  if (!l) return undefined;
  const kinds = ORDER.filter((k) => l.results[k]);
  const hidden = withheldLocal(result);
  const hiddenCount = hidden ? hidden.filter(Boolean).length : 0;
  const smoothed = smoothedLocalCaution(result);
  const head: Block[] = [
    { kind: 'title', text: `Where the pattern is: local statistics of ${l.variable}` },
    { kind: 'paragraph', style: 'interpretation', text: reading(result) },
    ...(smoothed ? [{ kind: 'paragraph', style: 'caution', text: smoothed } satisfies Block] : []),
    {
      kind: 'keyValues', title: 'How the local tests were made',
      rows: [
        ['Variable', l.variable, 'text'],
        ['Statistics', kinds.map((k) => LOCAL_STATISTIC_LABEL[k]).join('; '), 'text'],
        ['Neighbours', result.weights.description, 'text'],
        ...(l.results.gistar ? [['Weights for Gi*', 'each neighbour 1 and the area itself 1 (binary, area included)', 'text'] as [string, Cell, 'text']] : []),
        ['Permutations per area', l.permutations, 'integer'],
        ['Seed', l.seed, 'integer'],
        ['Decisions rest on', l.permutations > 0 ? 'the permutation p-values' : 'the analytic p-values (no permutations were drawn)', 'text'],
        ['Multiple-testing control', describeControl(l.control), 'text'],
        ['Permutation rule', l.permutationRule, 'text'],
        ...(hiddenCount ? [['Withheld in this workbook', `yes: the local figures of the ${formatCount(hiddenCount)} areas whose ${localRate(result)!.name} rests on few events are blank, and the maps show them grey`, 'text'] as [string, Cell, 'text']] : []),
      ],
    },
  ];
  if (l.results.moran?.categories) {
    const counts = shownCounts(l.results.moran.categories, hidden);
    head.push({
      kind: 'table', title: "How many areas fall in each group (local Moran's I, after control)",
      columns: [{ header: 'Group', format: 'text', width: 22 }, { header: 'Areas', format: 'integer', width: 10 }, { header: 'Share', format: 'percent', width: 10 }],
      rows: [
        ...CATEGORY_ORDER.filter((c) => c !== 'no-neighbours' || counts[c] > 0).map((c): Cell[] => [LOCAL_CATEGORY_LABEL[c], counts[c], counts[c] / result.n]),
        ...(hiddenCount ? [[WITHHELD_WORDS, hiddenCount, hiddenCount / result.n] as Cell[]] : []),
      ],
      note: 'High among high: the area and its neighbours are above the average; low among low: both below; high among low and low among high: the area differs from its neighbours.' +
        (hiddenCount ? ' Withheld areas are counted apart, whatever their group: their rates rest on few events and are left blank for privacy (the tests still used them).' : ''),
    });
  }
  head.push(controlTable(result, kinds, hidden));
  const pictures = localPictures(result);
  const headRows = layoutBlocks(head).lastRow;
  const images = placePictures(pictures, headRows + 3, renderPng);
  const last = images[images.length - 1];
  const row = last ? last.anchor.row + Math.ceil(last.heightPx / ROW_HEIGHT_PX) + 2 : headRows + 3;
  const blocks: Block[] = [...head];
  if (images.length) blocks.push({ kind: 'space', rows: row - headRows - 2 });
  blocks.push(...areaTables(result, kinds));
  blocks.push({ kind: 'paragraph', style: 'caution', text: CAUTION });
  return { blocks, images };
}

/**
 * How many areas pass at the run's level under the chosen control and under the others, side by side
 * (Benjamini–Hochberg, Bonferroni, none), so the reader sees how much the choice matters; the
 * uncontrolled count is labelled as such.
 */
function controlTable(result: AnalysisResult, kinds: LocalStatisticKind[], hidden: boolean[] | undefined): Block {
  const l = result.local!;
  const chosen = l.control.method;
  const methods = (['fdr', 'bonferroni', 'none'] as const).slice().sort((a, b) => Number(b === chosen) - Number(a === chosen));
  const count = (flags: readonly boolean[]) => flags.filter((f, i) => f && !hidden?.[i]).length;
  const tests = l.results[kinds[0]]!.tests;
  return {
    kind: 'table', title: `How many areas are significant at ${l.control.level}, under the chosen control and the others`,
    columns: [
      { header: 'Control for many tests', format: 'text', width: 42 },
      { header: 'Used here', format: 'text', width: 20 },
      ...kinds.map((k): TableColumn => ({ header: LOCAL_STATISTIC_LABEL[k], format: 'integer', width: 16, group: 'Areas significant' })),
    ],
    rows: methods.map((m): Cell[] => [
      CONTROL_LABEL[m],
      m === chosen ? 'yes (chosen)' : m === 'none' ? 'no (uncontrolled)' : 'no (for comparison)',
      ...kinds.map((k) => count(l.results[k]!.significantUnder[m])),
    ]),
    note: `The chosen control decides the groups, the maps and the per-area tables; the others are shown for comparison only. ` +
      `The uncontrolled count is not a finding: among ${formatCount(tests)} tests about ${formatCount(Math.round(tests * l.control.level))} would pass at ${l.control.level} by chance alone.` +
      bonferroniFloor(l.permutations, tests, l.control.level) +
      (hidden ? ' Withheld areas are not counted.' : ''),
  };
}

/**
 * A permutation p-value is never below 1/(R + 1), so Bonferroni, which asks for p ≤ level / tests,
 * can pass no area when 1/(R + 1) is above that; say so, with the permutations that would be needed.
 */
export function bonferroniFloor(permutations: number, tests: number, level: number): string {
  if (permutations === 0 || tests === 0 || 1 / (permutations + 1) <= level / tests) return '';
  const needed = Math.ceil(tests / level) - 1;
  return ` With ${formatCount(permutations)} permutations no permutation p-value can fall below ${1 / (permutations + 1) < 0.001 ? (1 / (permutations + 1)).toExponential(1) : String(Math.round(1e6 / (permutations + 1)) / 1e6)}, ` +
    `above Bonferroni’s threshold of ${level}/${formatCount(tests)}, so no area can pass under Bonferroni; it would take at least ${formatCount(needed)} permutations.`;
}

/** What the sheet and the maps call an area whose local figures are withheld for privacy. */
export const WITHHELD_WORDS = 'withheld for privacy';

/** Counts per group of the areas shown; withheld areas are left out (counted apart). */
function shownCounts(categories: readonly LocalCategory[], hidden: boolean[] | undefined): Record<LocalCategory, number> {
  return categoryCounts(hidden ? categories.filter((_, i) => !hidden[i]) : categories);
}

export const CAUTION =
  'Read local results with care: there is one test per area, so some areas will look significant by chance (hence the control for ' +
  'multiple testing); neighbouring tests share data and are not independent; permutation p-values depend on the seed and the number ' +
  'of permutations; the groups depend on the neighbour definition; and the clusters are of areas, not of people.';

function reading(result: AnalysisResult): string {
  const l = result.local!;
  const parts: string[] = [];
  const m = l.results.moran;
  const hidden = withheldLocal(result);
  if (m?.categories) {
    const c = shownCounts(m.categories, hidden);
    const found = c['high-high'] + c['low-low'] + c['high-low'] + c['low-high'];
    parts.push(found === 0
      ? `No area stands out in local Moran's I once the number of tests is allowed for (${describeControl(l.control)}).`
      : `${formatCount(found)} of ${formatCount(m.tests)} areas stand out in local Moran's I after control: ${formatCount(c['high-high'])} high among high, ${formatCount(c['low-low'])} low among low, ` +
        `${formatCount(c['high-low'])} high among low and ${formatCount(c['low-high'])} low among high.`);
    const loose = m.significantUncontrolled.filter((s, i) => s && !hidden?.[i]).length;
    if (loose > found) parts.push(`Without control, ${formatCount(loose)} areas would pass p ≤ ${l.control.level}; the difference is what chance alone would be expected to supply among so many tests.`);
  }
  for (const k of ['gi', 'gistar'] as const) {
    const g = l.results[k];
    if (!g) continue;
    let high = 0;
    let low = 0;
    g.significant.forEach((s, i) => { if (s && !hidden?.[i]) (g.z[i] > 0 ? high++ : low++); });
    parts.push(`${LOCAL_STATISTIC_LABEL[k]}: ${formatCount(high)} area(s) in a cluster of high values and ${formatCount(low)} in a cluster of low values after control.`);
  }
  if (hidden) {
    const k = hidden.filter(Boolean).length;
    parts.push(`${formatCount(k)} area(s) whose rate rests on few events are withheld for privacy: their local figures are blank, they are not counted above, and the maps show them grey.`);
  }
  return parts.join(' ');
}

/** Gi*'s group of one area, in the words of its map and of the saved areas (geojson.ts): the sign of z decides high or low. */
function getisOrdGroup(s: LocalOutcome, i: number): string {
  return s.neighbourCount[i] === 0 ? 'no neighbours' : !s.significant[i] ? 'not significant' : s.z[i] > 0 ? 'cluster of high values' : 'cluster of low values';
}

function areaTables(result: AnalysisResult, kinds: LocalStatisticKind[]): Block[] {
  const l = result.local!;
  const hidden = withheldLocal(result);
  // the other control beside the chosen one, per area, so the reader sees which areas the choice decides
  const other = l.control.method === 'fdr' ? 'bonferroni' : 'fdr';
  const otherWords = other === 'fdr' ? 'Under the false discovery rate (for comparison)' : 'Under Bonferroni (for comparison)';
  return kinds.map((k, order) => {
    const s = l.results[k]!;
    const columns: TableColumn[] = [
      ...areaKeyColumns(result),
      { header: 'Statistic', format: 'decimal4', width: 10 },
      { header: 'Expected', format: 'decimal4', width: 10 },
      { header: 'Variance', format: 'decimal4', width: 10 },
      { header: 'z', format: 'decimal2', width: 8 },
      { header: 'Normal', format: 'pvalue', width: 9, group: 'p-value' },
      { header: 'Permutation', format: 'pvalue', width: 11, group: 'p-value' },
      { header: 'Adjusted', format: 'pvalue', width: 9, group: 'p-value' },
      { header: 'Significant after control', format: 'text', width: 12 },
      { header: otherWords, format: 'text', width: 14 },
    ];
    columns.push({ header: 'Group', format: 'text', width: 18 });
    const rows: Cell[][] = result.ids.map((_, i) => {
      if (hidden?.[i]) return [...areaKeyCells(result, i), null, null, null, null, null, null, null, WITHHELD_WORDS, WITHHELD_WORDS, WITHHELD_WORDS];
      const row: Cell[] = [...areaKeyCells(result, i), num(s.value[i]), num(s.expected[i]), num(s.variance[i]), num(s.z[i]), num(s.p[i]),
        s.pPermutation ? num(s.pPermutation[i]) : null, num(s.adjusted[i]), s.neighbourCount[i] === 0 ? 'no neighbours' : s.significant[i] ? 'yes' : 'no',
        s.neighbourCount[i] === 0 ? 'no neighbours' : s.significantUnder[other][i] ? 'yes' : 'no'];
      row.push(k === 'moran' ? LOCAL_CATEGORY_LABEL[s.categories![i]] : getisOrdGroup(s, i));
      return row;
    });
    return {
      kind: 'table', title: `${LOCAL_STATISTIC_LABEL[k]}, each area in table order`, columns, rows,
      // the p-values' note once on the sheet, under the first table
      note: (order === 0
        ? `The normal p-value is two-sided from z under total randomisation; the permutation p-value follows the permutation rule above; the adjusted p-value is for ${describeControl(l.control)}.`
        : 'The p-values are found as in the table above.') +
        (hidden ? ' Blank rows are withheld for privacy: each is computed from the area’s own rate, which rests on few events.' : ''),
    } satisfies Block;
  });
}

/** The group map and the significance map of the mapped statistic. */
export function localPictures(result: AnalysisResult): { name: string; pic: Picture }[] {
  const kind = mappedStatistic(result);
  if (!kind || result.geometries.length !== result.n) return [];
  const s = result.local!.results[kind]!;
  const l = result.local!;
  const controlWords = describeControl(l.control);
  const hidden = withheldLocal(result);
  const withheld: MapCategory = { label: WITHHELD_WORDS, fill: { solid: LOCAL_FILL.withheld }, optional: true };
  const out: { name: string; pic: Picture }[] = [];
  if (kind === 'moran') {
    const cats = localMoranMapCategories({
      hh: LOCAL_CATEGORY_LABEL['high-high'], ll: LOCAL_CATEGORY_LABEL['low-low'], hl: LOCAL_CATEGORY_LABEL['high-low'],
      lh: LOCAL_CATEGORY_LABEL['low-high'], ns: LOCAL_CATEGORY_LABEL['not-significant'], nn: LOCAL_CATEGORY_LABEL['no-neighbours'],
    });
    cats.push(withheld);
    const index: Record<LocalCategory, number> = { 'high-high': 0, 'high-low': 1, 'low-high': 2, 'low-low': 3, 'not-significant': 4, 'no-neighbours': 5 };
    out.push({ name: 'map of local groups', pic: categoryMapSvg({
      title: `Where ${l.variable} clusters`, legendTitle: 'Area, then its neighbours',
      geometries: result.geometries, coordinates: result.coordinates, unit: result.coordinateUnit,
      category: s.categories!.map((c, i) => (hidden?.[i] ? 6 : index[c])), categories: cats,
      note: `Local Moran's I; ${controlWords}.`,
    }) });
  } else {
    const cats: MapCategory[] = [
      { label: 'cluster of high values', fill: { solid: LOCAL_FILL.highHigh } },
      { label: 'cluster of low values', fill: { solid: LOCAL_FILL.lowLow } },
      { label: 'not significant', fill: { solid: LOCAL_FILL.none } },
      { label: 'no neighbours', fill: { solid: LOCAL_FILL.noNeighbours }, optional: true },
      withheld,
    ];
    const category = Array.from(s.z, (z, i) => (hidden?.[i] ? 4 : s.neighbourCount[i] === 0 ? 3 : !s.significant[i] ? 2 : z > 0 ? 0 : 1));
    out.push({ name: 'map of local clusters', pic: categoryMapSvg({
      title: `Where ${l.variable} clusters`, legendTitle: LOCAL_STATISTIC_LABEL[kind],
      geometries: result.geometries, coordinates: result.coordinates, unit: result.coordinateUnit, category, categories: cats,
      note: controlWords.replace(/^./, (c) => c.toUpperCase()) + '.',
    }) });
  }
  const level = l.control.level;
  const bands: MapCategory[] = [
    { label: 'p ≤ 0.001', fill: { solid: P_BAND_FILL[0] } },
    { label: 'p ≤ 0.01', fill: { solid: P_BAND_FILL[1] } },
    { label: `p ≤ ${String(level)}`, fill: { solid: P_BAND_FILL[2] } },
    { label: `p above ${String(level)}`, fill: { solid: P_BAND_FILL[3] } },
    { label: 'no neighbours', fill: { solid: LOCAL_FILL.noNeighbours }, optional: true },
    withheld,
  ];
  const band = Array.from(s.adjusted, (p, i) => (hidden?.[i] ? 5 : s.neighbourCount[i] === 0 || !Number.isFinite(p) ? 4 : p <= 0.001 ? 0 : p <= 0.01 ? 1 : p <= level ? 2 : 3));
  out.push({ name: 'map of local p-values', pic: categoryMapSvg({
    title: `How strong the local evidence is (${kind === 'moran' ? "local Moran's I" : LOCAL_STATISTIC_LABEL[kind]})`,
    legendTitle: l.control.method === 'none' ? 'p, not adjusted for many tests' : 'p adjusted for many tests',
    geometries: result.geometries, coordinates: result.coordinates, unit: result.coordinateUnit, category: band, categories: bands,
    note: `${l.permutations > 0 ? 'Permutation p-values' : 'Analytic p-values'}; ${controlWords}.`,
  }) });
  return out;
}

export type { LocalOutcome };
