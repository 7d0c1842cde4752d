/** Shapes shared by the sidebar, its two hosts (Excel, the browser page) and the engine worker. No DOM, no Office. */
import type { NamedBytesLike } from '../../src/pipeline/index.js';
import type { Report } from '../../src/report/index.js';
import type { WeightsSpec, WeightsTransform } from '../../src/weights/index.js';
import type { RunSummary } from './run-summary.js';
import type { RateSmoothing } from '../../src/pipeline/index.js';

export type SheetValue = string | number | boolean | null;

/** A table as read from a sheet: the header row and the rows under it, with where it sits. */
export interface TableSnapshot {
  /** sheet name */
  sheet: string;
  /** 1-based sheet row of the header and 1-based sheet column of the first column */
  headerRow: number;
  firstColumn: number;
  headers: string[];
  rows: SheetValue[][];
  /** 1-based sheet row of each entry of rows (blank rows are left out) */
  rowNumbers: number[];
}

/** A rate built in the sidebar from two columns. */
export interface RateDefinition { name: string; events: string; population: string; per: 1 | 100 | 1000 | 100000 }

/** The sidebar's rates: their recipes, the smoothed rate the model uses, and whether flagged areas are withheld. */
export interface RateChoices {
  rates: RateDefinition[];
  smoothing: RateSmoothing;
  withholdFlagged: boolean;
}

/** What the analyst chose, saved with the workbook so the next run starts from it. */
export interface SavedSetup {
  version: 1;
  sheet?: string;
  id?: string;
  /** the column of names shown beside the IDs */
  label?: string;
  y?: string;
  x?: string[];
  areas?: { kind: 'file'; names: string[]; layer?: string; idProperty?: string } | { kind: 'points'; xColumn: string; yColumn: string };
  weights?: WeightsSpec;
  transform?: WeightsTransform;
  linkUnneighboured?: boolean;
  /** the analyst's statement of the boundary file's coordinates */
  coordinates?: 'geographic' | 'projected';
  /** IDs that differ only by leading zeros were matched on request ("match 01001 with 1001") */
  idsIgnoreLeadingZeros?: boolean;
  /** a distance band's distance was the one suggested from the data (so new data suggest anew) */
  bandFromData?: boolean;
  /** also fit under the usual alternative neighbour definitions */
  compare?: boolean;
  /** registry keys of the models ticked (the plain regression is always fitted) */
  models?: string[];
  robust?: boolean;
  dropMissing?: boolean;
  /** rates built from two columns, the smoothed rate modelled, and whether flagged areas are withheld */
  rates?: RateChoices;
}

/** Points of the Moran scatter plot, for a native chart. */
export interface ScatterPoints {
  valueName: string;
  z: number[];
  lag: number[];
  slope: number;
}

/** What one run hands to the host to write. */
export interface RunOutput {
  report: Report;
  scatter: ScatterPoints;
  /** the figures for the sidebar's done message (residuals' Moran's I, the suggested model, what was fitted) */
  summary: RunSummary;
  /** the same in one line of text */
  headline: string;
  warnings: string[];
}

export type BoundaryFile = NamedBytesLike;
