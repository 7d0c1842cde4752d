/**
 * The neighbours' averages of the explanatory columns (the WX terms of the models with lagged
 * columns): one per column but the intercept, named in plain words and marked `lagged`.
 */
import { csrMultiply, type CsrMatrix } from '../linalg/index.js';
import type { Coefficient, Design } from './types.js';
import { InputError } from '../errors.js';
import { fitOls } from './ols.js';

/** How a WX term reads in tables and the JSON. */
export function laggedName(name: string): string {
  return `neighbours' average of ${name}`;
}

/** Where each WX term of a design with lagged columns comes from. */
export interface LaggedDesign {
  /** [X, WX]: the design's columns, then the neighbours' average of each but the intercept */
  design: Design;
  /** for each WX term, in order: the index of its own column in X */
  source: number[];
  /** columns of X (the WX terms start here) */
  k: number;
}

/** X followed by WX for every column of X but the intercept (the intercept's W·1 is the intercept itself under row-standardised weights, or close to it). */
export function withLaggedColumns(x: Design, w: CsrMatrix): LaggedDesign {
  const source = x.columns.map((_, j) => j).filter((j) => j !== x.intercept);
  return {
    design: {
      names: [...x.names, ...source.map((j) => laggedName(x.names[j]))],
      columns: [...x.columns, ...source.map((j) => csrMultiply(w, x.columns[j]))],
      intercept: x.intercept,
    },
    source,
    k: x.columns.length,
  };
}

/** Marks the WX terms (from index k on) of a coefficient table as lagged. */
export function markLagged(coefficients: Coefficient[], k: number): Coefficient[] {
  return coefficients.map((c, j) => (j >= k ? { ...c, lagged: true as const } : c));
}

/** Number of WX terms a design gives (its columns but the intercept): the restrictions of θ = 0. */
export function laggedCount(x: Design): number {
  return x.columns.length - (x.intercept === null ? 0 : 1);
}

/**
 * [X, WX], refused with the column named when a neighbours' average is a combination of the columns
 * (e.g. a region's indicator under neighbours that never cross a region's edge): the plain
 * regression's own rank check on the wider design.
 */
export function laggedDesign(p: { y: Float64Array; design: Design; w: CsrMatrix }): LaggedDesign {
  const lagged = withLaggedColumns(p.design, p.w);
  try {
    fitOls(p.y, lagged.design);
  } catch (e) {
    const column = e instanceof InputError ? e.where.column : undefined;
    const at = column === undefined ? -1 : lagged.design.names.indexOf(column);
    if (at < lagged.k) throw e;
    const own = p.design.names[lagged.source[at - lagged.k]];
    throw new InputError(
      `The neighbours' average of "${own}" is a combination of the explanatory columns (for example every area's neighbours share its value of "${own}"), so the models with the neighbours' columns cannot separate the two. Leave "${own}" out of those models, or fit only the models without the neighbours' columns.`,
      { column: own },
    );
  }
  return lagged;
}
