/**
 * What the report shows of each model, by registry key: its own sheet, its rows on the checks sheet
 * and its part of the spillover sheet. The type asks for an entry per registry key; a model without
 * one (never the case for a registered model) still gets a sheet of its coefficients and headline figures.
 */
import type { AnalysisResult } from '../pipeline/types.js';
import type { FitOf, Fitted, ModelEntry, ModelFitBase, ModelKey } from '../models/index.js';
import type { Block, Cell } from './types.js';
import { headlineBlocks, olsBlocks, spatialBlocks, spatialChecks } from './model-tables.js';
import { impactsBlocks } from './impacts.js';
import { familyChecks, familyImpacts, familySheet } from './family.js';

export interface ModelBlocks<F extends ModelFitBase> {
  /** the model's own sheet */
  sheet(result: AnalysisResult, fit: Fitted<F>, entry: ModelEntry): Block[];
  /** its rows in the checks table for it on the "Checks on residuals" sheet */
  checks?(fit: Fitted<F>): Cell[][];
  /** its blocks on the "Spillover effects" sheet */
  impacts?(result: AnalysisResult, fit: Fitted<F>, entry: ModelEntry): Block[];
}

export const MODEL_BLOCKS: { [K in ModelKey]: ModelBlocks<FitOf<K>> } = {
  ols: { sheet: olsBlocks },
  lag: { sheet: spatialBlocks, checks: spatialChecks, impacts: impactsBlocks },
  error: { sheet: spatialBlocks, checks: spatialChecks },
  slx: { sheet: familySheet, checks: familyChecks, impacts: familyImpacts },
  durbin: { sheet: familySheet, checks: familyChecks, impacts: familyImpacts },
  durbinError: { sheet: familySheet, checks: familyChecks, impacts: familyImpacts },
  lagError: { sheet: familySheet, checks: familyChecks, impacts: familyImpacts },
  lagIV: { sheet: familySheet, impacts: familyImpacts },
  errorGM: { sheet: familySheet },
};

/** The blocks of a model by key (a sheet of headline figures for a key without its own). */
export function blocksOf(key: string): ModelBlocks<ModelFitBase> {
  return (MODEL_BLOCKS as Record<string, ModelBlocks<ModelFitBase> | undefined>)[key] ?? { sheet: headlineBlocks };
}
