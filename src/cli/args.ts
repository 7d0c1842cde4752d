import { parseArgs } from 'node:util';
import type { WeightsSpec, WeightsTransform } from '../weights/types.js';
import { DEFAULT_MODEL_KEYS, MODELS, baselineModel, withBaseline, type ModelKey } from '../models/index.js';
import { InputError } from '../errors.js';
import { parseRateRecipe, MAX_SEED, MIN_IMPACT_DRAWS, MAX_IMPACT_DRAWS, MAX_PERMUTATIONS, type RatesRequest, type RateSmoothing } from '../pipeline/index.js';
import { formatCount } from '../core/count.js';

export interface FitArgs {
  boundary: string;
  layer?: string;
  coordinates?: 'geographic' | 'projected';
  data?: string;
  sheet?: string;
  id: string;
  boundaryId?: string;
  idsIgnoreLeadingZeros: boolean;
  label?: string;
  y: string;
  x: string[];
  weights: WeightsSpec;
  edgeList?: string;
  compare?: WeightsSpec[] | 'suggested';
  transform: WeightsTransform;
  linkUnneighboured: boolean;
  models: ModelKey[];
  dropMissing: boolean;
  robust: boolean;
  seed?: number;
  draws?: number;
  permutations?: number;
  algebra: 'auto' | 'dense' | 'sparse';
  /** 1 or 2: a second thread for the large sparse factorisations */
  threads: 1 | 2;
  /** local statistics (--local), of what, and how their many tests are controlled */
  local?: { statistics: ('moran' | 'gi' | 'gistar')[]; of: string; control: { method: 'fdr' | 'bonferroni' | 'none'; level: number } };
  /** rates built from counts (--rate, --per) and which smoothed rate is modelled (--smooth) */
  rates?: RatesRequest;
  json: boolean;
  perArea: boolean;
  out?: string;
  /** per-area results joined to the shapes, as GeoJSON */
  outGeojson?: string;
  /** folder for the maps and plots as SVG and PNG files */
  pictures?: string;
  /** replace an existing --out, --out-geojson or picture file (never an input, never a read-only file) */
  overwrite: boolean;
}

export const FIT_USAGE = `Usage:
  spillway fit --boundary FILE --id COLUMN --y COLUMN --x COL1,COL2 [options]

Files
  --boundary FILE      GeoJSON, TopoJSON, a shapefile (.shp with its .dbf beside it) or a .zip of one
  --layer NAME         which object of a TopoJSON file (default: the first)
  --coordinates KIND   geographic (longitude/latitude) or projected, when the file does not say
  --data FILE          CSV or .xlsx table joined to the areas by --id (default: the boundary's own attributes)
  --sheet NAME         sheet of the .xlsx table (default: the first)
  --out FILE.xlsx      write the results workbook (a copy of the --data workbook, or a new one);
                       never one of the input files
  --out-geojson FILE   write each area's shape with its results (fitted values, residuals, local
                       statistics) as GeoJSON, for mapping in any GIS
  --pictures DIR       write the maps and plots as separate SVG and PNG files into DIR
  --overwrite          replace an output file that exists (a read-only file is never replaced)

Model
  --id COLUMN          column that identifies each area, in the table and the boundary file
  --boundary-id NAME   the boundary file's ID property, when it is named differently from --id
  --ids-ignore-leading-zeros
                       match all-digit IDs that differ only by leading zeros (01001 with 1001);
                       off by default (such IDs stop the join), recorded in the results when on
  --label COLUMN       a column of area names shown beside the IDs (By area, Local patterns, JSON)
  --y COLUMN           the outcome to explain
  --x COL1,COL2        explanatory columns, comma-separated
  --models LIST        ${modelsHelp()}
  --robust             standard errors robust to unequal variance: beside the classical ones for the plain
                       regression and the neighbours' columns model, in place of them for the lag model
                       by instruments (the moments error model's are robust always)
  --drop-missing       leave out rows with missing values (default: stop and list them)

Neighbours
  --weights RULE       queen | rook | knn:K | band:DISTANCE | idw:POWER[:CUTOFF]   (default: queen)
                       distances are km on longitude/latitude, coordinate units otherwise
  --order K            contiguity of order K (neighbours of neighbours...)
  --cumulative         with --order K, every area up to K steps away (not only exactly K)
  --tolerance T        snapping tolerance for contiguity, in coordinate units
  --link-unneighboured link each area without neighbours to its nearest area
  --ties RULE          knn: areas tied at the K-th distance — lower-row (default: the lowest rows
                       fill the K places) or include (every tied area is a neighbour)
  --neighbours FILE    read neighbours from a CSV edge list (origin, neighbour, weight) instead
  --transform T        row (default) or binary
  --compare RULES      also fit under other neighbour rules, comma-separated (e.g. rook,knn:6),
                       or "suggested"; the results sit side by side

Where the pattern is (local statistics)
  --local LIST         any of moran,gi,gistar: local Moran's I, Getis–Ord Gi, Gi* per area
  --local-of WHAT      outcome (default), residuals (of the plain regression), residuals:MODEL
                       (a model's, spelt as in --models, e.g. residuals:lag), a column of the table,
                       or rate:NAME (a --rate's empirical-Bayes standardised values; use with moran)
  --multiple-testing M fdr (default: Benjamini–Hochberg false discovery rate), bonferroni or none
  --fdr-level Q        the level of that control (default 0.05)
                       --permutations and --seed apply to the local tests too (default 999 permutations)

Rates from counts
  --rate NAME=EVENTS/POPULATION  define a column NAME (repeatable) that --y or --x may use
  --per N              the rate's multiplier: 1, 100, 1000 (default) or 100000; one --per for
                       every rate, or one after each --rate for that rate
  --smooth S           which smoothed rate is modelled: global (default), local or neighbourhood
                       empirical Bayes; all three are computed and written
  --withhold-flagged   leave the flagged areas' counts and rates blank in the --out workbook,
                       with the local statistics drawn from them (for privacy; the run record
                       and --json say which areas)

Output and reproducibility
  --json               print one JSON document instead of the readable summary
  --per-area           with --json, include fitted values and residuals per area
  --seed N             seed for permutations and simulated impacts, 0 to 4294967295 (default 20261201)
  --draws N            simulation draws for impact standard errors, 2 to 100,000 (default 1000)
  --permutations N     permutations for Moran's I of the outcome, 0 to 99,999 (default 999; 0 above
                       10,000 areas)
  --algebra A          auto | dense | sparse log-determinant (default auto)
  --threads N          1 or 2: a second thread shares large sparse factorisations (default 2)
`;

export function parseFitArgs(argv: string[]): FitArgs {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: false,
      tokens: true,
      options: {
        boundary: { type: 'string' }, layer: { type: 'string' }, coordinates: { type: 'string' }, data: { type: 'string' }, sheet: { type: 'string' },
        id: { type: 'string' }, 'boundary-id': { type: 'string' }, 'ids-ignore-leading-zeros': { type: 'boolean' }, label: { type: 'string' }, y: { type: 'string' }, x: { type: 'string' },
        weights: { type: 'string' }, order: { type: 'string' }, cumulative: { type: 'boolean' },
        tolerance: { type: 'string' }, ties: { type: 'string' }, 'link-unneighboured': { type: 'boolean' }, neighbours: { type: 'string' }, compare: { type: 'string' },
        transform: { type: 'string' }, models: { type: 'string' }, 'drop-missing': { type: 'boolean' },
        robust: { type: 'boolean' }, seed: { type: 'string' }, draws: { type: 'string' },
        permutations: { type: 'string' }, algebra: { type: 'string' }, threads: { type: 'string' }, json: { type: 'boolean' },
        'per-area': { type: 'boolean' }, out: { type: 'string' }, 'out-geojson': { type: 'string' }, pictures: { type: 'string' }, overwrite: { type: 'boolean' },
        local: { type: 'string' }, 'local-of': { type: 'string' }, 'multiple-testing': { type: 'string' }, 'fdr-level': { type: 'string' },
        rate: { type: 'string', multiple: true }, per: { type: 'string', multiple: true }, smooth: { type: 'string' }, 'withhold-flagged': { type: 'boolean' },
      },
    });
  } catch (e) {
    const message = (e as Error).message.replace(/^TypeError \[[A-Z_]+\]: /, '');
    // a value starting with "-" (a negative number) is taken for an option: say so, and how to give it
    const ambiguous = /^Option '(--[\w-]+)' argument is ambiguous/.exec(message);
    if (ambiguous) {
      const at = argv.indexOf(ambiguous[1]);
      const value = at >= 0 ? argv[at + 1] : undefined;
      throw new InputError(
        `${ambiguous[1]} is followed by "${value ?? '-…'}", which starts with "-" and so reads as another option. ` +
          `To give that value, write ${ambiguous[1]}=${value ?? 'VALUE'} (its allowed range is then checked).`,
      );
    }
    throw new InputError(`${message} (spillway fit --help lists the options)`);
  }
  const v = parsed.values;
  refuseRepeated(parsed.tokens);
  const need = (name: 'boundary' | 'id' | 'y' | 'x') => {
    const value = v[name];
    if (!value || !value.trim()) throw new InputError(`--${name} is required (spillway fit --help lists the options).`);
    return value.trim();
  };
  const transform = (v.transform ?? 'row') as WeightsTransform;
  if (transform !== 'row' && transform !== 'binary') throw new InputError(`--transform must be row or binary, not "${v.transform}".`);
  const models = parseModels(v.models);
  const algebra = (v.algebra ?? 'auto') as FitArgs['algebra'];
  if (!['auto', 'dense', 'sparse'].includes(algebra)) throw new InputError(`--algebra must be auto, dense or sparse, not "${v.algebra}".`);
  const threads = v.threads === undefined ? 2 : Number(v.threads.trim());
  if (threads !== 1 && threads !== 2) throw new InputError(`--threads must be 1 or 2, not "${v.threads}".`);
  if (v.coordinates !== undefined && v.coordinates !== 'geographic' && v.coordinates !== 'projected') {
    throw new InputError(`--coordinates must be geographic or projected, not "${v.coordinates}".`);
  }
  if (v.cumulative && v.order === undefined) throw new InputError('--cumulative goes with --order K (every area up to K steps away).');
  if (v.neighbours !== undefined) {
    const ruleOptions = (['weights', 'order', 'tolerance', 'ties', 'link-unneighboured'] as const).filter((o) => v[o] !== undefined);
    if (ruleOptions.length) {
      throw new InputError(`--neighbours reads the neighbours from a list, so ${ruleOptions.map((o) => `--${o}`).join(', ')} would be ignored; give either the list or a rule.`);
    }
  }
  if (v.out !== undefined && !/\.xlsx$/i.test(v.out)) throw new InputError(`--out must name an .xlsx file, not "${v.out}".`);
  if (v['out-geojson'] !== undefined && !/\.(geo)?json$/i.test(v['out-geojson'])) throw new InputError(`--out-geojson must name a .geojson (or .json) file, not "${v['out-geojson']}".`);
  if (v.pictures !== undefined && !v.pictures.trim()) throw new InputError('--pictures needs a folder name.');
  if (v.overwrite && v.out === undefined && v['out-geojson'] === undefined && v.pictures === undefined) {
    throw new InputError('--overwrite goes with --out, --out-geojson or --pictures (the output files to replace).');
  }
  return {
    boundary: need('boundary'),
    layer: v.layer,
    coordinates: v.coordinates as FitArgs['coordinates'],
    data: v.data,
    sheet: v.sheet,
    id: need('id'),
    boundaryId: v['boundary-id']?.trim() || undefined,
    idsIgnoreLeadingZeros: v['ids-ignore-leading-zeros'] ?? false,
    label: v.label?.trim() || undefined,
    y: need('y'),
    x: need('x').split(',').map((s) => s.trim()).filter(Boolean),
    weights: parseWeightsRule(v.weights ?? 'queen', v.order, v.cumulative ?? false, v.tolerance, v.ties, !v.compare),
    edgeList: v.neighbours,
    compare: parseCompare(v.compare, v.tolerance, v.ties),
    transform,
    linkUnneighboured: v['link-unneighboured'] ?? false,
    models,
    dropMissing: v['drop-missing'] ?? false,
    robust: v.robust ?? false,
    seed: optionalInteger('seed', v.seed, 0, MAX_SEED),
    draws: optionalInteger('draws', v.draws, MIN_IMPACT_DRAWS, MAX_IMPACT_DRAWS, ' (the simulated standard errors settle long before the upper end)'),
    permutations: optionalInteger('permutations', v.permutations, 0, MAX_PERMUTATIONS, ' (p-values resolve to 1/(N + 1): 9,999 already reaches 0.0001)'),
    algebra,
    threads,
    local: parseLocal(v.local, v['local-of'], v['multiple-testing'], v['fdr-level']),
    rates: parseRates(v.rate, ratePers(parsed.tokens), v.smooth, v['withhold-flagged']),
    json: v.json ?? false,
    perArea: v['per-area'] ?? false,
    out: v.out,
    outGeojson: v['out-geojson'],
    pictures: v.pictures,
    overwrite: v.overwrite ?? false,
  };
}

/** The --models line of the help: every model of the registry. */
function modelsHelp(): string {
  const byDefault = MODELS.filter((m) => DEFAULT_MODEL_KEYS.includes(m.key)).map((m) => m.cli);
  return `any of ${spellings().join(',')}, or all (default: ${byDefault.join(',')}; ${baselineModel().cli} is always fitted)`;
}

/** How --models spells each model of the registry, in registry order (a function: the help text is built at load). */
function spellings(): string[] {
  return MODELS.map((m) => m.cli);
}

/** --models: the registry's spellings, comma-separated, or "all"; the plain regression is always among them. */
function parseModels(text: string | undefined): ModelKey[] {
  const known = spellings();
  if (text === undefined) return withBaseline(DEFAULT_MODEL_KEYS);
  const asked = text.split(',').map((m) => m.trim().toLowerCase()).filter(Boolean);
  if (asked.length === 0) throw new InputError(`--models needs at least one of ${known.join(', ')}, or all.`);
  if (asked.includes('all')) return withBaseline(MODELS.map((m) => m.key));
  const keys = asked.map((spelling) => {
    const entry = MODELS.find((m) => m.cli === spelling);
    if (!entry) throw new InputError(`--models: unknown model "${spelling}"; choose from ${known.join(', ')}, or all.`);
    return entry.key;
  });
  return withBaseline(keys);
}

/** --compare: comma-separated rules (contiguity ones take --tolerance), or "suggested". */
function parseCompare(text: string | undefined, tolerance: string | undefined, ties?: string): FitArgs['compare'] {
  if (text === undefined) return undefined;
  if (text.trim().toLowerCase() === 'suggested') return 'suggested';
  const rules = text.split(',').map((r) => r.trim()).filter(Boolean);
  if (rules.length === 0) throw new InputError('--compare needs neighbour rules, e.g. --compare rook,knn:6, or "suggested".');
  return rules.map((rule) => {
    try {
      return parseWeightsRule(rule, undefined, false, tolerance, ties, false);
    } catch (e) {
      if (e instanceof InputError) throw new InputError(`--compare: ${e.message.replace(/^--weights: /, '')}`);
      throw e;
    }
  });
}

/** A number as people write one: digits with an optional point and exponent (no hex, no "Infinity"). */
const DECIMAL = /^\+?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** The allowed range of a distance in a rule, with its unit. */
const BAND_RANGE = 'a number above 0 (kilometres for longitude/latitude, else the coordinates\' own unit)';

/** queen | rook | knn:K | band:D | idw:P[:CUTOFF]. Every part is read; a part the rule does not take is refused. */
export function parseWeightsRule(rule: string, order?: string, cumulative = false, tolerance?: string, ties?: string, tiesOnlyForKnn = true): WeightsSpec {
  const [name, ...params] = rule.trim().toLowerCase().split(':').map((p) => p.trim());
  const tieRule = ties?.trim().toLowerCase();
  if (tieRule !== undefined && tieRule !== 'lower-row' && tieRule !== 'include') {
    throw new InputError(`--ties must be lower-row or include, not "${ties}".`);
  }
  if (tieRule !== undefined && tiesOnlyForKnn && name !== 'knn') throw new InputError('--ties applies to k-nearest neighbours (knn:K) only.');
  /** A rule's number: refused with the part's name and its allowed range (a sign or a word is no way around it). */
  const num = (s: string | undefined, what: string, range: string, ok: (n: number) => boolean) => {
    const t = s?.trim() ?? '';
    const n = Number(t);
    const isNumber = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t) && Number.isFinite(n);
    if (!isNumber || !ok(n)) {
      throw new InputError(`--weights ${rule}: ${what} must be ${range}${s ? `; got "${s}"` : ', and none was given'}.`);
    }
    return n;
  };
  const parts = (most: number, form: string) => {
    if (params.length > most) {
      const extra = params.slice(most).map((p) => `"${p}"`).join(', ');
      throw new InputError(
        `--weights ${rule}: ${name} takes ${most === 0 ? 'no number' : most === 1 ? 'one number' : `at most ${most} numbers`} (${form}), so ${extra} cannot be read.` +
          (most === 0 ? ` For neighbours more than one step away, add --order K (e.g. --weights ${name} --order ${params[0] || 2}).` : ''),
      );
    }
  };
  if (name === 'queen' || name === 'rook') {
    parts(0, name);
    const spec: Extract<WeightsSpec, { method: 'queen' | 'rook' }> = { method: name };
    if (order !== undefined) {
      if (!/^\s*\d+\s*$/.test(order) || Number(order) < 1) throw new InputError(`--order must be a whole number of at least 1, not "${order}".`);
      spec.order = Number(order);
      spec.cumulative = cumulative;
    }
    if (tolerance !== undefined) {
      if (!DECIMAL.test(tolerance.trim()) || !Number.isFinite(Number(tolerance))) throw new InputError(`--tolerance must be a number of 0 or more, not "${tolerance}".`);
      spec.tolerance = Number(tolerance);
    }
    return spec;
  }
  if (order !== undefined) throw new InputError('--order applies to queen or rook neighbours only.');
  if (tolerance !== undefined && tiesOnlyForKnn) throw new InputError('--tolerance applies to queen or rook neighbours only.');
  if (name === 'knn') {
    parts(1, 'knn:K');
    const k = num(params[0], 'the number of neighbours K (knn:K)', 'a whole number of at least 1', (n) => Number.isInteger(n) && n >= 1);
    return tieRule === 'include' ? { method: 'knn', k, ties: 'include' } : { method: 'knn', k };
  }
  if (name === 'band') {
    parts(1, 'band:DISTANCE');
    const d = num(params[0], 'the distance (band:DISTANCE)', BAND_RANGE, (n) => n > 0);
    return { method: 'band', distance: d };
  }
  if (name === 'idw') {
    parts(2, 'idw:POWER or idw:POWER:CUTOFF');
    const p = num(params[0], 'the power (idw:POWER)', 'a number above 0 (1 and 2 are usual)', (n) => n > 0);
    const spec: Extract<WeightsSpec, { method: 'idw' }> = { method: 'idw', power: p };
    if (params[1] !== undefined) {
      const c = num(params[1], 'the cut-off (idw:POWER:CUTOFF)', BAND_RANGE, (n) => n > 0);
      spec.cutoff = c;
    }
    return spec;
  }
  throw new InputError(`--weights: unknown rule "${rule}"; use queen, rook, knn:K, band:DISTANCE or idw:POWER[:CUTOFF].`);
}

/** A whole number written in digits, within [min, max] (the range is stated when refused). */
function optionalInteger(name: string, s: string | undefined, min: number, max: number, why = ''): number | undefined {
  if (s === undefined) return undefined;
  const t = s.trim();
  const n = Number(t);
  if (!/^\d+$/.test(t) || n < min || n > max) {
    throw new InputError(`--${name} must be a whole number from ${min} to ${formatCount(max)}, not "${s}"${why}.`);
  }
  return n;
}

function parseLocal(list?: string, of?: string, control?: string, level?: string): FitArgs['local'] {
  if (list === undefined) {
    const stray = of !== undefined ? '--local-of' : control !== undefined ? '--multiple-testing' : level !== undefined ? '--fdr-level' : undefined;
    if (stray) throw new InputError(`${stray} goes with --local (e.g. --local moran).`);
    return undefined;
  }
  const statistics = list.split(',').map((s) => s.trim().toLowerCase()).filter(Boolean);
  if (statistics.length === 0) throw new InputError('--local needs at least one of moran, gi, gistar.');
  for (const s of statistics) if (!['moran', 'gi', 'gistar'].includes(s)) throw new InputError(`--local: unknown statistic "${s}"; choose from moran, gi, gistar.`);
  const method = (control ?? 'fdr').trim().toLowerCase();
  if (!['fdr', 'bonferroni', 'none'].includes(method)) throw new InputError(`--multiple-testing must be fdr, bonferroni or none, not "${control}".`);
  const q = level === undefined ? 0.05 : Number(level.trim());
  if (!(q > 0 && q < 1) || (level !== undefined && !/^\s*(0?\.\d+|\d+(\.\d+)?(e-?\d+)?)\s*$/i.test(level))) throw new InputError(`--fdr-level must be a number between 0 and 1, not "${level}".`);
  return {
    statistics: statistics as NonNullable<FitArgs['local']>['statistics'],
    of: of?.trim() || 'outcome',
    control: { method: method as 'fdr' | 'bonferroni' | 'none', level: q },
  };
}

type Tokens = NonNullable<ReturnType<typeof parseArgs>['tokens']>;

/** Options that may be given more than once; any other given twice would silently keep only the last. */
const REPEATABLE = new Set(['rate', 'per']);

/** Refuses an option given twice (`--x INC --x HOVAL` would fit HOVAL alone), naming both values. */
function refuseRepeated(tokens: Tokens): void {
  const seen = new Map<string, string[]>();
  for (const t of tokens) {
    if (t.kind !== 'option' || REPEATABLE.has(t.name)) continue;
    seen.set(t.name, [...(seen.get(t.name) ?? []), t.value ?? '']);
  }
  for (const [name, values] of seen) {
    if (values.length < 2) continue;
    const given = values.some((x) => x !== '') ? ` (${values.map((x) => `"${x}"`).join(', ')})` : '';
    const hint = name === 'x' ? '; name the explanatory columns once, comma-separated: --x INC,HOVAL'
      : name === 'local' || name === 'compare' || name === 'models' ? `; list them once, comma-separated` : '; give it once';
    throw new InputError(`--${name} is given ${values.length} times${given}${hint}.`);
  }
}

/**
 * The multipliers as given: each --per with the --rate it follows (or null for one before any
 * --rate), in order, so `--rate a=… --per 1000 --rate b=… --per 100` keeps each its own.
 */
function ratePers(tokens: Tokens): { value: string; after: number | null }[] {
  let rates = 0;
  const out: { value: string; after: number | null }[] = [];
  for (const t of tokens) {
    if (t.kind !== 'option') continue;
    if (t.name === 'rate') rates++;
    else if (t.name === 'per') out.push({ value: t.value ?? '', after: rates > 0 ? rates - 1 : null });
  }
  return out;
}

/**
 * --rate NAME=EVENTS/POPULATION (repeatable), --per, --smooth, --withhold-flagged. One --per applies
 * to every rate; given more than once, each applies to the --rate just before it, and then every
 * --rate has its own (a rate left with the default beside others that were given one is more
 * likely a slip than a choice).
 */
function parseRates(recipes: string[] | undefined, pers: { value: string; after: number | null }[], smooth?: string, withhold?: boolean): FitArgs['rates'] {
  if (!recipes || recipes.length === 0) {
    const stray = pers.length ? '--per' : smooth !== undefined ? '--smooth' : withhold ? '--withhold-flagged' : undefined;
    if (stray) throw new InputError(`${stray} goes with --rate (e.g. --rate cases_rate=cases/residents).`);
    return undefined;
  }
  const multipliers: number[] = recipes.map(() => (pers.length === 1 ? Number(pers[0].value.trim()) : 1000));
  if (pers.length > 1) {
    const mine = new Map<number, string>();
    for (const p of pers) {
      if (p.after === null) throw new InputError(`--per is given ${pers.length} times; one --per applies to every rate, or put one after each --rate for that rate (--rate a=… --per 1000 --rate b=… --per 100).`);
      if (mine.has(p.after)) throw new InputError(`--rate ${recipes[p.after]} is followed by --per ${mine.get(p.after)} and --per ${p.value}; give each rate one multiplier.`);
      mine.set(p.after, p.value);
    }
    const without = recipes.filter((_, i) => !mine.has(i));
    if (without.length) throw new InputError(`--per follows some rates but not ${without.map((r) => `--rate ${r}`).join(', ')}; give one --per for every rate, or one after each --rate.`);
    recipes.forEach((_, i) => { multipliers[i] = Number(mine.get(i)!.trim()); });
  }
  if (smooth !== undefined && !['global', 'local', 'neighbourhood'].includes(smooth)) {
    throw new InputError(`--smooth must be global, local or neighbourhood, not "${smooth}".`);
  }
  return {
    recipes: recipes.map((r, i) => parseRateRecipe(r, multipliers[i])), smoothing: (smooth ?? 'global') as RateSmoothing,
    ...(withhold ? { withholdFlagged: true } : {}),
  };
}
