/**
 * The model registry: every model Spillway fits, in the order results show them. The pipeline, the
 * comparison of neighbour definitions, the command line's `--models`, the sidebar's model list, the
 * JSON report and the report's sheets all read this list; the report's blocks for each model live in
 * `src/report/model-blocks.ts` under the same key. Adding a model: one file in `src/models` with its
 * fit, one entry here, its report blocks (DEVELOPERS.md, "Adding a model").
 */
import type { OlsFit, SpatialFit } from './types.js';
import { coefficientJson, defineModel, spatialHeadline, spatialJson, testJson, type Fitted, type ParameterName } from './model-entry.js';
import { fitSpatialLag } from './ml-lag.js';
import { fitSpatialError } from './ml-error.js';
import { lagImpacts } from './impacts.js';

const RHO: ParameterName = { key: 'rho', symbol: 'ρ', name: 'spillover of the outcome' };
const LAMBDA: ParameterName = { key: 'lambda', symbol: 'λ', name: 'spillover of the errors' };

const OLS = defineModel({
  key: 'ols',
  cli: 'ols',
  label: 'Plain regression',
  about: 'least squares, without neighbours',
  method: 'least squares',
  baseline: true,
  parameters: [],
  fit: (p): OlsFit => p.ols,
  headline: (f) => ({ parameters: [], logLik: f.logLik, aic: f.aic, bic: f.bic, r2: f.r2, sigma2: f.sigma2 }),
  json: (f) => ({
    coefficients: f.coefficients.map(coefficientJson),
    ...(f.robustCoefficients ? { robustCoefficients: f.robustCoefficients.map(coefficientJson) } : {}),
    r2: f.r2,
    adjR2: f.adjR2,
    f: { stat: f.f.stat, df: f.f.df, df2: f.f.df2, p: f.f.p },
    sigma2: f.sigma2,
    logLik: f.logLik,
    aic: f.aic,
    bic: f.bic,
    conditionNumber: f.conditionNumber,
    jarqueBera: testJson(f.jarqueBera),
    breuschPagan: testJson(f.breuschPagan),
    breuschPaganStudentised: testJson(f.breuschPaganStudentised),
  }),
});

const LAG = defineModel({
  key: 'lag',
  cli: 'lag',
  label: 'Spatial lag model',
  about: 'the outcome depends on the neighbours’ outcome',
  method: 'maximum likelihood',
  parameters: [RHO],
  fit: (p): SpatialFit => fitSpatialLag(p.y, p.design, p.algebra, p.ols),
  headline: (f) => spatialHeadline(f, RHO),
  impacts: (f, p, o) => lagImpacts(f, p.design, p.algebra, { draws: o.impactDraws, seed: o.seed }),
  impactsAtTop: true,
  json: (f) => spatialJson(f, RHO.key),
});

const ERROR = defineModel({
  key: 'error',
  cli: 'error',
  label: 'Spatial error model',
  about: 'unmeasured causes are shared with neighbours',
  method: 'maximum likelihood',
  parameters: [LAMBDA],
  fit: (p): SpatialFit => fitSpatialError(p.y, p.design, p.algebra, p.ols),
  headline: (f) => spatialHeadline(f, LAMBDA),
  json: (f) => spatialJson(f, LAMBDA.key),
});

/** The registry: every model, in the order results show them. */
export const MODELS = [OLS, LAG, ERROR] as const;

type Entry = (typeof MODELS)[number];
export type ModelKey = Entry['key'];
/** The fit type of the model with key K. */
export type FitOf<K extends ModelKey> = ReturnType<Extract<Entry, { key: K }>['fit']>;
/** A run's fitted models by key (the plain regression always among them). */
export type FittedModels = { [K in ModelKey]?: Fitted<FitOf<K>> };

