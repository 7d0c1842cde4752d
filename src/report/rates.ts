import type { AnalysisResult, RateResult, RateSmoothing } from '../pipeline/index.js';
import type { Block, Cell, NumberFormat, PngRenderer, ReportImage, TableColumn } from './types.js';
import { num, say, sayP } from './format.js';
import { layoutBlocks, ROW_HEIGHT_PX } from './layout.js';
import { placePictures } from './pictures-for-report.js';
import { rateMapsSvg } from './pictures/rate-maps.js';
import { formatCount } from '../core/count.js';
import { localRate } from './withheld.js';

/** The smoothed rates in words, as the sheets name them. */
export const SMOOTHING_LABEL: Record<RateSmoothing, string> = {
  global: 'global empirical-Bayes rate',
  local: 'local empirical-Bayes rate',
  neighbourhood: 'neighbourhood rate',
};

/** "per 1,000" */
export function perWords(per: number): string {
  return per === 1 ? 'per person' : `per ${per.toLocaleString('en-US')}`;
}

/** The recipe in words: "SID74 per 1,000 BIR74". */
export function recipeWords(r: { events: string; population: string; per: number }): string {
  return `${r.events} ${r.per === 1 ? 'per unit of' : perWords(r.per)} ${r.population}`;
}

/** Where the rate went in the model: its outcome, an explanatory column, or neither. */
function rateRole(result: AnalysisResult, r: RateResult): 'outcome' | 'explanatory' | undefined {
  if (result.request.y === r.name) return 'outcome';
  return result.request.x.includes(r.name) ? 'explanatory' : undefined;
}

/** Where the rate went in the model, in words. */
export function rateUse(result: AnalysisResult, r: RateResult): string {
  const as = `its ${SMOOTHING_LABEL[r.smoothing]}`;
  const role = rateRole(result, r);
  if (role === 'outcome') return `the outcome, as ${as}`;
  if (role === 'explanatory') return `an explanatory column, as ${as}`;
  return 'not used (defined for this sheet, its tests and the local statistics)';
}

const RATE_CAUTIONS = (withheld: boolean): string[] => [
  'Smoothing changes the rates of small areas most: a flagged area’s smoothed rate says more about its neighbourhood or the whole region than about the area itself.',
  'Do not publish smoothed rates as observed ones; call them modelled estimates, and give the raw counts beside them where the rules allow.',
  'A model of smoothed rates answers a different question from one of raw rates: it explains a stabilised estimate that partly borrows from other areas, not what was counted.',
  'Local and neighbourhood smoothing borrow strength from neighbours, and so create spatial correlation of their own: Moran’s I (and the local statistics) of smoothed rates overstate clustering. Judge clustering by the rate-adjusted Moran’s I above.',
  withheld
    ? 'Follow your department’s own rules on suppressing small counts. In this workbook the flagged areas’ events and rates are left blank; your own data sheets in it are left as they were, so remove the counts there before sharing it.'
    : 'Follow your department’s own rules on suppressing small counts: many do not release counts below a threshold. Spillway can leave the flagged areas’ events and rates blank in the written workbook (the option to withhold flagged areas).',
];

/** The "Rates" sheet: per rate the reading, the recipe, the two clustering tests, the maps and every area. */
export function ratesSheet(result: AnalysisResult, renderPng?: PngRenderer): { blocks: Block[]; images: ReportImage[] } | undefined {
  if (!result.rates?.length) return undefined;
  const blocks: Block[] = [];
  const images: ReportImage[] = [];
  for (const r of result.rates) {
    blocks.push(...headBlocks(result, r));
    const headRows = layoutBlocks(blocks).lastRow;
    const pictures = result.geometries.length === result.n ? [{ name: `maps of ${r.name}`, pic: rateMapsSvg({
      valueName: r.name, units: perWords(r.per),
      geometries: result.geometries, coordinates: result.coordinates,
      raw: r.areas.map((a) => a.rate), smoothed: r.modelled, smoothedName: SMOOTHING_LABEL[r.smoothing],
      flagged: r.areas.map((a) => a.flagged), withheld: r.areas.map((a) => r.withholdFlagged && a.flagged),
    }) }] : [];
    const placed = placePictures(pictures, headRows + 3, renderPng);
    images.push(...placed);
    const last = placed[placed.length - 1];
    if (last) blocks.push({ kind: 'space', rows: last.anchor.row + Math.ceil(last.heightPx / ROW_HEIGHT_PX) + 2 - headRows - 2 });
    blocks.push(areaTable(result, r));
  }
  blocks.push({ kind: 'title', text: 'Before using these rates' });
  const withheld = result.rates.some((r) => r.withholdFlagged && r.areas.some((a) => a.flagged));
  for (const text of RATE_CAUTIONS(withheld)) blocks.push({ kind: 'paragraph', style: 'caution', text });
  return { blocks, images };
}

function rateFormat(per: number): NumberFormat {
  return per === 1 ? 'decimal4' : 'decimal2';
}

function median(v: number[]): number {
  if (!v.length) return NaN;
  const s = [...v].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Why the plain and the rate-adjusted Moran's I differ, with this run's direction. */
export function moranContrast(r: RateResult): string {
  const why = 'The two differ because a raw rate resting on few events swings widely by chance, and those swings weigh as much as any other area in the plain statistic; ' +
    'the rate-adjusted statistic first scales each rate by how reliable its count makes it, so each area counts by the evidence it carries.';
  const a = r.moranRaw.I, b = r.ebMoran.I;
  if (!Number.isFinite(a) || !Number.isFinite(b)) return why;
  const d = b - a;
  const here = Math.abs(d) < 0.02
    ? 'Here the two agree closely, so unequal area sizes do not distort the picture much.'
    : d > 0
      ? 'Here the adjusted statistic shows more clustering than the raw rates: the chance swings of small areas were hiding part of it.'
      : 'Here the adjusted statistic shows less clustering than the raw rates: part of the apparent pattern came from unreliable small-area rates.';
  return `${why} ${here}`;
}

function pOf(m: RateResult['moranRaw']): number {
  return m.permutationP ?? m.p;
}

function reading(result: AnalysisResult, r: RateResult): string {
  const flagged = r.areas.filter((a) => a.flagged);
  const parts: string[] = [];
  const share = Math.round((100 * flagged.length) / r.areas.length);
  parts.push(flagged.length === 0
    ? `None of the ${formatCount(r.areas.length)} areas is flagged: every rate rests on enough events.`
    : `${formatCount(flagged.length)} of ${formatCount(r.areas.length)} areas (${share} %) are flagged: their rates rest on few events and are unreliable.`);
  const shift = r.areas.map((a, i) => Math.abs(r.modelled[i] - a.rate));
  const moved = (flag: boolean) => median(shift.filter((_, i) => r.areas[i].flagged === flag));
  if (flagged.length && flagged.length < r.areas.length) {
    parts.push(`Smoothing (the ${SMOOTHING_LABEL[r.smoothing]}) moved a flagged area’s rate by ${say(moved(true))} ${perWords(r.per)} (median) and any other area’s by ${say(moved(false))}.`);
  }
  if (r.clippedGlobal) {
    parts.push('The raw rates vary no more than chance alone would make them (the between-area variance was estimated below zero and set to zero), so the global smoother pulls every area fully to the overall rate.');
  }
  const raw = r.moranRaw, eb = r.ebMoran;
  if (Number.isFinite(raw.I)) {
    parts.push(`The plain Moran’s I of the raw rate is ${say(raw.I)} (${sayP(pOf(raw))}); the rate-adjusted Moran’s I is ${say(eb.I)} (${sayP(pOf(eb))}).`);
  } else {
    parts.push(`The rate-adjusted Moran’s I is ${say(eb.I)} (${sayP(pOf(eb))}).`);
  }
  parts.push(moranContrast(r));
  const role = rateRole(result, r);
  parts.push(role === undefined ? 'The model does not use this rate.'
    : `The model uses it as ${role === 'outcome' ? 'the outcome' : 'an explanatory column'}: its ${SMOOTHING_LABEL[r.smoothing]}.`);
  return parts.join(' ');
}

function headBlocks(result: AnalysisResult, r: RateResult): Block[] {
  const flagged = r.areas.filter((a) => a.flagged).length;
  const withheld = r.withholdFlagged ? flagged : 0;
  const sd = Math.sqrt(r.overall.variance) * r.per;
  const fmt = rateFormat(r.per);
  const test = (name: string, m: RateResult['moranRaw']): Cell[] => [name, num(m.I), num(m.z), num(m.p), m.permutationP === undefined ? null : num(m.permutationP), m.permutations];
  return [
    { kind: 'title', text: `Rates from counts: ${r.name}, ${recipeWords(r)}` },
    { kind: 'paragraph', style: 'interpretation', text: reading(result, r) },
    {
      kind: 'keyValues', title: 'How the rate was built',
      rows: [
        ['Rate', `${r.name} = ${r.events} ÷ ${r.population} × ${r.per.toLocaleString('en-US')}`, 'text'],
        ['Overall rate (areas pooled)', num(r.overall.rate), fmt],
        ['Between-area standard deviation', r.clippedGlobal ? 'estimated below zero and set to 0' : num(sd), r.clippedGlobal ? 'text' : fmt],
        ['Local spreads set to 0 (areas)', r.clippedLocal, 'integer'],
        ['Neighbourhood (local smoothing)', `each area with its neighbours: ${result.weights.description}`, 'text'],
        ['Rule for flagging', r.flagRule, 'text'],
        ['Areas flagged', flagged, 'integer'],
        ['In the model', rateUse(result, r), 'text'],
        ['Withheld in this workbook', withheld ? `yes: the events and rates of the ${withheld} flagged areas are blank` : 'no', 'text'],
      ],
    },
    {
      kind: 'table', title: 'Is the rate clustered? The plain and the rate-adjusted Moran’s I',
      columns: [
        { header: 'Test', format: 'text', width: 30 },
        { header: 'Moran’s I', format: 'decimal4', width: 12 },
        { header: 'z', format: 'decimal2', width: 10 },
        { header: 'p (normal)', format: 'pvalue', width: 11 },
        { header: 'p (permutation)', format: 'pvalue', width: 14 },
        { header: 'Permutations', format: 'integer', width: 12 },
      ],
      rows: [
        test('Plain, of the raw rate', r.moranRaw),
        test('Rate-adjusted (Assunção & Reis 1999)', r.ebMoran),
      ],
      note: `Why the two differ: see the reading at the top of this sheet. Both use the run’s neighbours and weights and the same seed (${r.ebMoran.seed}); p-values are two-sided.` +
        (r.permutationNote ? ` ${r.permutationNote}` : ''),
    },
  ];
}

function areaTable(result: AnalysisResult, r: RateResult): Block {
  const fmt = rateFormat(r.per);
  const units = perWords(r.per);
  const columns: TableColumn[] = [
    { header: 'Area ID', format: 'text', width: 14 },
    { header: 'Table row', format: 'integer', width: 9 },
    // the column names go in the note: a long name cannot wrap inside a narrow header
    { header: 'Events', format: 'integer', width: 10 },
    { header: 'Population', format: 'integer', width: 12 },
    { header: `Raw rate ${units}`, format: fmt, width: 12 },
    { header: 'Smoothed, global empirical Bayes', format: fmt, width: 17 },
    { header: 'Smoothed, local empirical Bayes', format: fmt, width: 17 },
    { header: 'Smoothed, neighbourhood', format: fmt, width: 15 },
    { header: 'Few events (flagged)', format: 'text', width: 13 },
    { header: 'Shrinkage weight, global', format: 'decimal4', width: 15 },
    { header: 'Shrinkage weight, local', format: 'decimal4', width: 15 },
  ];
  const rows: Cell[][] = r.areas.map((a, i) => {
    if (r.withholdFlagged && a.flagged) return [a.id, result.rows[i], null, a.population, null, null, null, null, 'yes, withheld', null, null];
    return [a.id, result.rows[i], a.events, a.population, num(a.rate), num(a.ebGlobal), num(a.ebLocal), num(a.neighbourhood),
      a.flagged ? 'yes' : 'no', num(a.weightGlobal), num(a.weightLocal)];
  });
  return {
    kind: 'table', title: `${r.name}: each area in table order`, columns, rows,
    note: `Events: ${r.events}; population: ${r.population}; rates are ${units}. The shrinkage weight is the share of the area’s own raw rate that its empirical-Bayes rate keeps ` +
      '(1: kept as counted; 0: replaced by the overall or the neighbourhood rate); the neighbourhood rate pools the events and population ' +
      `of the area and its neighbours.${r.withholdFlagged ? ' Blank cells are withheld for privacy.' : ''}`,
  };
}

/** The Summary's cautions about the rates this run built (none when no rate was defined). */
export function rateCautions(result: AnalysisResult): string[] {
  const out: string[] = [];
  for (const r of result.rates ?? []) {
    const flagged = r.areas.filter((a) => a.flagged).length;
    const used = result.request.y === r.name || result.request.x.includes(r.name);
    out.push(`${formatCount(flagged)} of ${formatCount(r.areas.length)} areas have a ${r.name} resting on few events (sheet "Rates"). ` +
      (used ? `The model uses the ${SMOOTHING_LABEL[r.smoothing]}, so it answers a question about smoothed rates, not counted ones; do not publish smoothed rates as observed.` : 'Its smoothed rates are modelled estimates, not observed rates.'));
    if (used && r.smoothing !== 'global') {
      out.push(`The ${SMOOTHING_LABEL[r.smoothing]} of ${r.name} borrows from neighbours and so creates spatial correlation of its own: Moran’s I and the spatial models here overstate how strongly areas cluster or spill over. The rate-adjusted Moran’s I on the "Rates" sheet tests clustering fairly.`);
    }
  }
  const local = smoothedLocalCaution(result);
  if (local) out.push(local);
  return out;
}

/**
 * The caution for local statistics run on a smoothed rate (the outcome when it is a rate, its
 * residuals, or the rate NAME; not `rate:NAME`, the standardised raw rates): local and neighbourhood
 * smoothing borrow from neighbours and so make neighbours alike by construction, and global smoothing
 * pulls small areas to the overall rate. Undefined when the local statistics are not of a smoothed rate.
 */
export function smoothedLocalCaution(result: AnalysisResult): string | undefined {
  const r = localRate(result);
  const of = result.local?.of ?? '';
  if (!r || of.startsWith('rate:')) return undefined;
  const what = of === 'outcome' || of === r.name ? `the ${SMOOTHING_LABEL[r.smoothing]} of ${r.name}` : `residuals of a model of the ${SMOOTHING_LABEL[r.smoothing]} of ${r.name}`;
  const fair = `For a fairer local test use the rate’s empirical-Bayes standardised values (local statistics of rate:${r.name}).`;
  return r.smoothing === 'global'
    ? `The local statistics ("Local patterns") are of ${what}, which pulls each small area towards the overall rate: small areas seldom stand out, and where they sit together the smoothing moves them together. ${fair}`
    : `The local statistics ("Local patterns") are of ${what}, which borrows strength from neighbours and so induces spatial correlation of its own: neighbouring areas look alike partly because their rates were pulled towards one another, so local Moran’s I and the Getis–Ord statistics of smoothed rates overstate clustering. ${fair}`;
}
