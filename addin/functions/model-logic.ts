/**
 * The model cell functions as pure functions of cell ranges: SPILL.FIT (a model's coefficient
 * table), SPILL.EFFECTS (direct, indirect and total effects) and SPILL.LMTESTS (the tests that guide
 * the choice of model). Ranges are read here; the models are reached through model-adapter.ts only.
 */
import { InputError } from '../../src/errors.js';
import { MAX_IMPACT_DRAWS, MAX_SEED, MIN_IMPACT_DRAWS } from '../../src/pipeline/index.js';
import { areasNeeded, designWithIntercept, effectsForCells, fitForCells, MODEL_SPELLINGS, modelKeyOf, prepareInputs, ROBUST_MODELS, residualTests, type CellInputs, type Design } from './model-adapter.js';
import { weightsFromRange } from './neighbour-range.js';
import { parseOptions, type OptionsArgument, type ParsedOptions } from './options.js';
import { asNumber, flatten, hasHeader, isBlank, readIds, readNumbers, trimTogether, type CellValue, type Grid } from './ranges.js';
import { formatCount } from '../../src/core/index.js';

export type Spill = (string | number)[][];

const OPTIONS = { flags: ['as given', 'standardise', 'robust'], numbers: ['draws', 'seed'] } as const;

/** Outcome, explanatory columns and IDs read together, with the neighbours, ready for a model. */
interface ModelRanges {
  ids: string[];
  y: Float64Array;
  yName: string;
  design: Design;
}

/** Reads y (one column), x (one or more columns) and the IDs; a text first row is a header row in all three. */
export function readModelRanges(y: Grid, x: Grid, ids: Grid): ModelRanges {
  const [yr, xr, ir] = trimTogether([y, x, ids], ['The outcome range', 'The explanatory range', 'The ID range']);
  let ys = flatten(yr, 'The outcome range');
  let idCells = flatten(ir, 'The ID range');
  let rows: CellValue[][] = xr;
  if (xr.length === 1 && ys.length > 1) throw new InputError('The explanatory range is a single row; select the explanatory columns, one row per area.');
  if (ys.length !== rows.length || idCells.length !== rows.length) {
    throw new InputError(`The outcome, explanatory and ID ranges have ${formatCount(ys.length)}, ${formatCount(rows.length)} and ${formatCount(idCells.length)} rows; select the same rows for all three.`);
  }
  const k = Math.max(...rows.map((r) => r.length));
  const header = hasHeader(ys) || rows[0].some((c) => !isBlank(c) && asNumber(c) === null);
  let names = Array.from({ length: k }, (_, j) => `x${j + 1}`);
  let yName = 'y';
  let offset = 1;
  if (header) {
    names = names.map((name, j) => (isBlank(rows[0][j]) ? name : String(rows[0][j]).trim()));
    yName = isBlank(ys[0]) ? 'y' : String(ys[0]).trim();
    ys = ys.slice(1); idCells = idCells.slice(1); rows = rows.slice(1);
    offset = 2;
  }
  if (ys.length === 0) throw new InputError('The ranges hold only a header row; select the rows of the areas too.');
  const seen = new Map<string, number>();
  names.forEach((name, j) => {
    const before = seen.get(name);
    if (before !== undefined) throw new InputError(`Columns ${before + 1} and ${j + 1} of the explanatory range are both called "${name}"; give them different names.`);
    seen.set(name, j);
  });
  const areaIds = readIds(idCells, offset);
  const yValues = readNumbers(ys, offset, 'the outcome range');
  const columns = names.map((name, j) => {
    const cells = rows.map((r) => r[j]);
    const out = new Float64Array(cells.length);
    cells.forEach((c, i) => {
      const v = asNumber(c);
      if (v === null) {
        const shown = isBlank(c) ? 'is empty' : `holds "${String(c)}", not a number`;
        throw new InputError(`Row ${i + offset}, column ${j + 1} (${name}) of the explanatory range ${shown}; every area needs a number.`, { row: i + offset, column: name });
      }
      out[i] = v;
    });
    return out;
  });
  if (yValues.every((v) => v === yValues[0])) throw new InputError(`The outcome ${yName} has the same value (${yValues[0]}) for every area, so there is nothing to explain.`);
  columns.forEach((c, j) => {
    if (c.every((v) => v === c[0])) throw new InputError(`The explanatory column ${names[j]} has the same value (${c[0]}) for every area; the constant is already in every model, so leave the column out.`, { column: names[j] });
  });
  return { ids: areaIds, y: yValues, yName, design: designWithIntercept(names, columns, yValues.length) };
}

/** The registry key the model argument names (by default the spatial lag model). */
function modelKey(model: string | undefined): string {
  const key = modelKeyOf(String(model ?? '').trim() || 'lag');
  if (key === null) throw new InputError(`The model "${model}" is not one Spillway fits; choose from ${MODEL_SPELLINGS.map((k) => `"${k}"`).join(', ')}.`);
  return key;
}

function prepare(y: Grid, x: Grid, ids: Grid, neighbours: Grid, o: ParsedOptions): { ranges: ModelRanges; inputs: CellInputs } {
  if (o.flags.has('as given') && o.flags.has('standardise')) throw new InputError('The options say both "as given" and "standardise"; choose one.');
  const ranges = readModelRanges(y, x, ids);
  const w = weightsFromRange(ranges.ids, neighbours, { rowStandardise: !o.flags.has('as given') });
  return { ranges, inputs: prepareInputs(ranges.y, ranges.design, w, o.flags.has('robust')) };
}

function checkSize(key: string, ranges: ModelRanges): void {
  const need = areasNeeded(key, ranges.design.columns.length);
  if (ranges.y.length < need) throw new InputError(`This model needs at least ${formatCount(need)} areas for ${ranges.design.columns.length} coefficients; the ranges hold ${formatCount(ranges.y.length)}.`);
}

const blank = (x: number): number | string => (Number.isFinite(x) ? x : '');

/**
 * SPILL.FIT: a header row, one row per coefficient (term, estimate, standard error, t or z, p), the
 * spatial parameter's row, then the number of areas, the log-likelihood and AIC; a note row when the
 * search for the spatial parameter did not settle inside its range.
 */
export function fitRows(y: Grid, x: Grid, ids: Grid, neighbours: Grid, model?: string, options?: OptionsArgument): Spill {
  const o = parseOptions(options, OPTIONS);
  const key = modelKey(model);
  const { ranges, inputs } = prepare(y, x, ids, neighbours, o);
  checkSize(key, ranges);
  const fit = fitForCells(key, inputs, o.flags.has('robust'));
  const rows: Spill = [['term', 'estimate', 'standard error', fit.statName, 'p']];
  for (const c of fit.coefficients) rows.push([c.name, c.estimate, blank(c.se), blank(c.stat), blank(c.p)]);
  for (const p of fit.parameters) rows.push([`${p.symbol} (${p.name})`, p.estimate, blank(p.se), blank(p.z), blank(p.p)]);
  // the models by instruments and by moments have no likelihood: say so rather than leave a blank that reads as missing
  const none = 'none (estimated without a likelihood)';
  rows.push(['areas', fit.n, '', '', ''], ['log-likelihood', fit.logLik ?? none, '', '', ''], ['AIC', fit.aic ?? none, '', '', '']);
  // which standard errors the table carries, whenever "robust" was asked for or the estimator is robust always
  const robust = o.flags.has('robust');
  if (robust || fit.standardErrors !== 'classical') {
    rows.push(['standard errors', fit.standardErrors === 'classical'
      ? `classical: "robust" changes them for ${ROBUST_MODELS.map((m) => `"${m}"`).join(', ')} only ("error-gm" is robust always)`
      : fit.standardErrors, '', '', '']);
  }
  const c = fit.convergence;
  if (c && (!c.converged || c.atBound)) rows.push(['note', `${c.message}${c.atBound ? ` (ended at the ${c.atBound} end of the admissible range)` : ''}`, '', '', '']);
  return rows;
}

/** SPILL.EFFECTS: per explanatory column the direct, indirect and total effects, each with its simulated standard error and p. */
export function effectsRows(y: Grid, x: Grid, ids: Grid, neighbours: Grid, model?: string, options?: OptionsArgument): Spill {
  const o = parseOptions(options, OPTIONS);
  const key = modelKey(model);
  const draws = o.numbers.get('draws') ?? 1000;
  const seed = o.numbers.get('seed') ?? 1;
  // the engine's own ranges for a run (src/pipeline/limits.ts)
  if (!Number.isInteger(draws) || draws < MIN_IMPACT_DRAWS || draws > MAX_IMPACT_DRAWS) throw new InputError(`The number of draws must be a whole number from ${MIN_IMPACT_DRAWS} to ${MAX_IMPACT_DRAWS}; got ${draws}.`);
  if (!Number.isInteger(seed) || seed < 0 || seed > MAX_SEED) throw new InputError(`The seed must be a whole number from 0 to ${MAX_SEED}; got ${seed}.`);
  const { ranges, inputs } = prepare(y, x, ids, neighbours, o);
  checkSize(key, ranges);
  // with "robust", the effects are drawn from the robust covariance, as a whole run's are
  const fit = fitForCells(key, inputs, o.flags.has('robust'));
  const effects = effectsForCells(fit, inputs, draws, seed);
  const rows: Spill = [['term', 'direct', 'direct SE', 'direct p', 'indirect', 'indirect SE', 'indirect p', 'total', 'total SE', 'total p']];
  for (const e of effects.impacts) {
    rows.push([e.name, e.direct, blank(e.directSe), blank(e.directP), e.indirect, blank(e.indirectSe), blank(e.indirectP), e.total, blank(e.totalSe), blank(e.totalP)]);
  }
  // the neighbours' columns and Durbin error models' effects are linear in their coefficients: exact, no draws
  const how = effects.draws > 0 ? `${effects.draws} simulated draws, seed ${effects.seed}` : 'exact formulas (no simulation)';
  rows.push(['standard errors from', how, '', '', '', '', '', '', '', '']);
  return rows;
}

/**
 * SPILL.LMTESTS: Moran's I of the plain regression's residuals and the five Lagrange-multiplier tests
 * (statistic, degrees of freedom, p), then the suggestion the decision rule gives.
 */
export function lmTestRows(y: Grid, x: Grid, ids: Grid, neighbours: Grid, options?: OptionsArgument): Spill {
  const o = parseOptions(options, { flags: ['as given', 'standardise'] });
  const { ranges, inputs } = prepare(y, x, ids, neighbours, o);
  checkSize('ols', ranges);
  const { moran, lm, recommendation } = residualTests(inputs);
  return [
    ['test', 'statistic', 'degrees of freedom', 'p'],
    ["Moran's I of the residuals", moran.I, '', blank(moran.p)],
    ['Lagrange multiplier: error', lm.error.stat, lm.error.df, blank(lm.error.p)],
    ['Lagrange multiplier: lag', lm.lag.stat, lm.lag.df, blank(lm.lag.p)],
    ['robust Lagrange multiplier: error', lm.robustError.stat, lm.robustError.df, blank(lm.robustError.p)],
    ['robust Lagrange multiplier: lag', lm.robustLag.stat, lm.robustLag.df, blank(lm.robustLag.p)],
    ['Lagrange multiplier: lag and error together', lm.joint.stat, lm.joint.df, blank(lm.joint.p)],
    ['suggestion', recommendation.text, '', ''],
  ];
}
