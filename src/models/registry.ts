/**
 * The model registry: every model Spillway fits, in the order results show them. The pipeline, the
 * comparison of neighbour definitions, the command line's `--models`, the sidebar's model list, the
 * JSON report and the report's sheets all read this list; the report's blocks for each model live in
 * `src/report/model-blocks.ts` under the same key. Adding a model: one file in `src/models` with its
 * fit, one entry here, its report blocks (DEVELOPERS.md, "Adding a model").
 */
import type { OlsFit, SpatialFit } from './types.js';
import { coefficientJson, defineModel, spatialHeadline, spatialJson, testJson, type Fitted, type NestedModel, type ParameterName } from './model-entry.js';
import { fitSpatialLag } from './ml-lag.js';
import { fitSpatialError } from './ml-error.js';
import { lagImpacts } from './impacts.js';
import { columnImpacts, fitSlx, slxImpacts, type SlxFit } from './slx.js';
import { fitDurbin, fitDurbinError, type DurbinFit } from './durbin.js';
import { betaRhoCovariance, fitLagError, type LagErrorFit } from './lag-error.js';
import { fitLagIv, type LagIvFit } from './lag-iv.js';
import { fitErrorGm, type ErrorGmFit } from './error-gm.js';
import { laggedCount, withLaggedColumns } from './lagged-columns.js';
import { familyJson, parameterEstimate } from './family-json.js';

const RHO: ParameterName = { key: 'rho', symbol: 'ρ', name: 'spillover of the outcome' };
const LAMBDA: ParameterName = { key: 'lambda', symbol: 'λ', name: 'spillover of the errors' };

const OLS = defineModel({
  key: 'ols',
  cli: 'ols',
  label: 'Plain regression',
  about: 'least squares, without neighbours',
  method: 'least squares',
  leastSquares: true,
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

/** Restrictions that take the wider models to the ones they nest (the tests' degrees of freedom from the inputs). */
const THETA_ZERO = (key: string): NestedModel => ({ key, restriction: 'θ = 0', df: (p) => laggedCount(p.design) });
const ONE = () => 1;

const SLX = defineModel({
  key: 'slx',
  cli: 'slx',
  lagsColumns: true,
  label: 'Neighbours’ columns model',
  about: 'the neighbours’ averages of the explanatory columns added',
  method: 'least squares',
  leastSquares: true,
  onRequest: true,
  parameters: [],
  fit: (p, o): SlxFit => fitSlx(p, { robust: o.robust }),
  headline: (f) => ({ parameters: [], logLik: f.logLik, aic: f.aic, bic: f.bic, lr: f.lr, r2: f.r2, sigma2: f.sigma2 }),
  impacts: (f, p) => slxImpacts(f, p),
  nests: [THETA_ZERO('ols')],
  json: (f) => ({
    coefficients: f.coefficients.map(coefficientJson),
    ...(f.robustCoefficients ? { robustCoefficients: f.robustCoefficients.map(coefficientJson) } : {}),
    r2: f.r2,
    adjR2: f.adjR2,
    sigma2: f.sigma2,
    logLik: f.logLik,
    aic: f.aic,
    bic: f.bic,
    lr: testJson(f.lr),
    conditionNumber: f.conditionNumber,
    breuschPagan: testJson(f.breuschPagan),
    warnings: f.warnings,
  }),
});

const DURBIN = defineModel({
  key: 'durbin',
  cli: 'durbin',
  lagsColumns: true,
  label: 'Spatial Durbin model',
  about: 'the neighbours’ outcome and the neighbours’ explanatory columns both enter',
  method: 'maximum likelihood',
  onRequest: true,
  parameters: [RHO],
  fit: (p): DurbinFit => fitDurbin(p),
  headline: (f) => spatialHeadline(f, RHO),
  // (I − ρW)⁻¹(Iβ + Wθ), by the lag model's simulation with the WX terms drawn with β and ρ
  impacts: (f, p, o) => lagImpacts(f, withLaggedColumns(p.design, p.w).design, p.algebra, { draws: o.impactDraws, seed: o.seed, lagged: { xColumns: f.xColumns, source: f.source } }),
  nests: [
    THETA_ZERO('lag'),
    { key: 'error', restriction: 'θ = −ρβ (common factor)', df: (p) => laggedCount(p.design) },
    { key: 'slx', restriction: 'ρ = 0', df: ONE },
  ],
  json: (f) => spatialJson(f, RHO.key),
});

const DURBIN_ERROR = defineModel({
  key: 'durbinError',
  cli: 'durbin-error',
  lagsColumns: true,
  label: 'Spatial Durbin error model',
  about: 'the neighbours’ explanatory columns enter and unmeasured causes are shared',
  method: 'maximum likelihood',
  onRequest: true,
  parameters: [LAMBDA],
  fit: (p): DurbinFit => fitDurbinError(p),
  headline: (f) => spatialHeadline(f, LAMBDA),
  // β I + θ W: the spillover runs through the neighbours' columns only (exact, from the ML covariance)
  impacts: (f, p) => columnImpacts(f, f.covariance, f.coefficients.length + 2, p.w, { covariance: 'maximum-likelihood' }),
  nests: [THETA_ZERO('error'), { key: 'slx', restriction: 'λ = 0', df: ONE }],
  json: (f) => spatialJson(f, LAMBDA.key),
});

const LAG_ERROR = defineModel({
  key: 'lagError',
  cli: 'lag-error',
  label: 'Lag-and-error model',
  about: 'the outcome depends on the neighbours’ outcome and unmeasured causes are shared too',
  method: 'maximum likelihood',
  onRequest: true,
  parameters: [RHO, LAMBDA],
  fit: (p): LagErrorFit => fitLagError(p),
  headline: (f) => ({
    parameters: [parameterEstimate(RHO, f.rho, f.rhoSe), parameterEstimate(LAMBDA, f.lambda, f.lambdaSe)],
    logLik: f.logLik, aic: f.aic, bic: f.bic, lr: f.lr, r2: f.pseudoR2, sigma2: f.sigma2, convergence: f.convergence, range: f.range,
  }),
  // (I − ρW)⁻¹β as in the lag model (λ shapes the errors, not the effects), drawn from the (β, ρ) block
  impacts: (f, p, o) => lagImpacts({ coefficients: f.coefficients, parameter: f.rho, covariance: betaRhoCovariance(f.covariance, f.coefficients.length), range: f.range }, p.design, p.algebra, { draws: o.impactDraws, seed: o.seed }),
  nests: [{ key: 'lag', restriction: 'λ = 0', df: ONE }, { key: 'error', restriction: 'ρ = 0', df: ONE }],
  json: (f) => familyJson(f, [parameterEstimate(RHO, f.rho, f.rhoSe), parameterEstimate(LAMBDA, f.lambda, f.lambdaSe)], {
    logLik: f.logLik, aic: f.aic, bic: f.bic, lr: testJson(f.lr), pseudoR2: f.pseudoR2, breuschPagan: testJson(f.breuschPagan),
    range: f.range, logDeterminant: f.logDeterminantMethod, traces: f.traceMethod, convergence: f.convergence,
    evaluations: { count: f.evaluations, of: f.evaluationsOf },
  }),
});

const LAG_IV = defineModel({
  key: 'lagIV',
  cli: 'lag-iv',
  label: 'Lag model by instruments',
  about: 'the outcome depends on the neighbours’ outcome; no normality assumed',
  method: 'two-stage least squares',
  onRequest: true,
  parameters: [RHO],
  fit: (p, o): LagIvFit => fitLagIv(p, { robust: o.robust }),
  headline: (f) => ({ parameters: [parameterEstimate(RHO, f.rho, f.rhoSe)], r2: f.pseudoR2, sigma2: f.sigma2, range: f.range }),
  // the lag model's effects from the estimates by instruments and their covariance
  impacts: (f, p, o) => (f.rho > f.range.lower && f.rho < f.range.upper
    ? lagImpacts({ coefficients: f.coefficients, parameter: f.rho, covariance: f.covariance, range: f.range }, p.design, p.algebra, { draws: o.impactDraws, seed: o.seed })
    : { impacts: [], draws: 0, seed: o.seed, method: 'not given: the estimate of ρ lies outside its admissible range' }),
  json: (f) => familyJson(f, [parameterEstimate(RHO, f.rho, f.rhoSe)], {
    pseudoR2: f.pseudoR2,
    standardErrors: f.covarianceKind,
    instruments: f.instruments,
    firstStage: { stat: f.firstStage.stat, df: f.firstStage.df, df2: f.firstStage.df2, p: f.firstStage.p },
    wald: f.wald,
    range: f.range,
  }),
});

const ERROR_GM = defineModel({
  key: 'errorGM',
  cli: 'error-gm',
  label: 'Error model by moments',
  about: 'unmeasured causes are shared with neighbours; robust to unequal variance',
  method: 'generalised moments',
  onRequest: true,
  parameters: [LAMBDA],
  fit: (p): ErrorGmFit => fitErrorGm(p),
  headline: (f) => ({ parameters: [parameterEstimate(LAMBDA, f.lambda, f.lambdaSe)], r2: f.pseudoR2, sigma2: f.sigma2, range: f.range }),
  json: (f) => familyJson(f, [parameterEstimate(LAMBDA, f.lambda, f.lambdaSe)], {
    lambdaInitial: f.lambdaInitial,
    pseudoR2: f.pseudoR2,
    standardErrors: f.covarianceKind,
    criterion: f.criterion,
    wald: f.wald,
    range: f.range,
  }),
});

/** The registry: every model, in the order results show them. */
export const MODELS = [OLS, LAG, ERROR, SLX, DURBIN, DURBIN_ERROR, LAG_ERROR, LAG_IV, ERROR_GM] as const;

type Entry = (typeof MODELS)[number];
export type ModelKey = Entry['key'];
/** The fit type of the model with key K. */
export type FitOf<K extends ModelKey> = ReturnType<Extract<Entry, { key: K }>['fit']>;
/** A run's fitted models by key (the plain regression always among them). */
export type FittedModels = { [K in ModelKey]?: Fitted<FitOf<K>> };

