import { rateToJson } from './rates.js';
import type { Coefficient, Recommendation, SpatialFit, TestResult } from '../models/types.js';
import type { AnalysisResult, ComparedFit } from './types.js';
import type { LocalStatisticKind } from '../stats/index.js';

/**
 * The documented JSON report of the command line (`spillway fit --json`): plain numbers only,
 * no per-area arrays except where asked for, stable field names.
 */
export function resultToJson(r: AnalysisResult, opts: { perArea?: boolean } = {}): Record<string, unknown> {
  const ols = r.ols;
  const out: Record<string, unknown> = {
    engineVersion: r.engineVersion,
    createdAt: r.createdAt,
    n: r.n,
    question: {
      y: r.request.y, x: r.request.x, id: r.request.id, ...(r.request.boundaryId ? { boundaryId: r.request.boundaryId } : {}),
      idsIgnoreLeadingZeros: r.request.idsIgnoreLeadingZeros ?? false, ...(r.request.label ? { label: r.request.label } : {}),
    },
    coordinates: { kind: r.coordinates, guessed: r.coordinatesGuessed ?? false, evidence: r.coordinateEvidence },
    inputs: r.inputs,
    droppedRows: r.droppedRows,
    weights: {
      method: r.weights.method,
      description: r.weights.description,
      transform: r.weights.transform,
      links: r.weights.links,
      withoutNeighbours: r.weights.withoutNeighbours,
      components: r.weights.components,
      minNeighbours: r.weights.summary.minNeighbours,
      meanNeighbours: r.weights.summary.meanNeighbours,
      medianNeighbours: r.weights.summary.medianNeighbours,
      maxNeighbours: r.weights.summary.maxNeighbours,
      density: r.weights.summary.density,
      histogram: r.weights.summary.histogram,
    },
    logDeterminant: r.algebra,
    ols: {
      coefficients: ols.coefficients.map(coef),
      ...(ols.robustCoefficients ? { robustCoefficients: ols.robustCoefficients.map(coef) } : {}),
      r2: ols.r2,
      adjR2: ols.adjR2,
      f: { stat: ols.f.stat, df: ols.f.df, df2: ols.f.df2, p: ols.f.p },
      sigma2: ols.sigma2,
      logLik: ols.logLik,
      aic: ols.aic,
      bic: ols.bic,
      conditionNumber: ols.conditionNumber,
      jarqueBera: test(ols.jarqueBera),
      breuschPagan: test(ols.breuschPagan),
      breuschPaganStudentised: test(ols.breuschPaganStudentised),
      moran: { I: ols.moran.I, expected: ols.moran.expected, variance: ols.moran.variance, z: ols.moran.z, p: ols.moran.p },
      lm: {
        error: test(ols.lm.error),
        lag: test(ols.lm.lag),
        robustError: test(ols.lm.robustError),
        robustLag: test(ols.lm.robustLag),
        joint: test(ols.lm.joint),
      },
      recommendation: recommendationJson(ols.recommendation),
    },
    moranOfY: {
      I: r.moranY.I, expected: r.moranY.expected, variance: r.moranY.variance, z: r.moranY.z, p: r.moranY.p,
      permutationP: r.moranY.permutationP, permutations: r.moranY.permutations,
    },
    warnings: r.warnings,
    seed: r.request.seed,
  };
  if (r.lag) out.lag = spatial(r.lag, 'rho');
  if (r.error) out.error = spatial(r.error, 'lambda');
  if (r.impacts) {
    out.impacts = r.impacts.impacts.map((i) => ({ ...i }));
    out.impactsMethod = { draws: r.impacts.draws, seed: r.impacts.seed, method: r.impacts.method };
  }
  if (r.comparison) {
    const fit = (f: ComparedFit | undefined, key: 'rho' | 'lambda') => f && {
      [key]: f.parameter, [`${key}Se`]: f.se, [`${key}P`]: f.p, logLik: f.logLik, aic: f.aic, converged: f.converged,
    };
    out.comparison = r.comparison.map((c) => ({
      label: c.label, description: c.description, asRun: c.asRun, links: c.links, meanNeighbours: c.meanNeighbours, withoutNeighbours: c.withoutNeighbours, components: c.components,
      moran: c.moran, lmP: c.lmP, suggestion: c.suggestion, ...(c.borderline ? { borderline: true } : {}), ...(c.sameAs ? { sameAs: c.sameAs } : {}), lag: fit(c.lag, 'rho'), error: fit(c.error, 'lambda'),
      ...(c.impacts ? { impacts: c.impacts.map((i) => ({ ...i })) } : {}),
      ...(c.failed ? { failed: c.failed } : {}),
    }));
  }
  if (r.local) out.local = localToJson(r);
  if (r.rates) out.rates = Object.fromEntries(r.rates.map((x) => [x.name, rateToJson(x)]));
  if (opts.perArea) {
    out.areas = r.ids.map((id, i) => ({
      id,
      ...(r.labels ? { label: r.labels[i] } : {}),
      row: r.rows[i],
      observed: r.y[i],
      olsFitted: r.ols.fitted[i],
      olsResidual: r.ols.residuals[i],
      ...(r.lag ? { lagFitted: r.lag.fitted[i], lagResidual: r.lag.residuals[i] } : {}),
      ...(r.error ? { errorFitted: r.error.fitted[i], errorResidual: r.error.residuals[i] } : {}),
    }));
  }
  return out;
}

function coef(c: Coefficient) {
  return { name: c.name, estimate: c.estimate, se: c.se, stat: c.stat, p: c.p };
}

function test(t: TestResult) {
  return { stat: t.stat, df: t.df, p: t.p };
}

function spatial(f: SpatialFit, key: 'rho' | 'lambda') {
  return {
    [key]: f.parameter,
    [`${key}Se`]: f.parameterSe,
    [`${key}Z`]: f.parameterZ,
    [`${key}P`]: f.parameterP,
    coefficients: f.coefficients.map(coef),
    sigma2: f.sigma2,
    logLik: f.logLik,
    aic: f.aic,
    bic: f.bic,
    lr: test(f.lr),
    pseudoR2: f.pseudoR2,
    ...(f.lmRemainingError ? { lmRemainingError: test(f.lmRemainingError) } : {}),
    ...(f.lmRemainingLag ? { lmRemainingLag: test(f.lmRemainingLag) } : {}),
    breuschPagan: test(f.breuschPagan),
    range: f.range,
    logDeterminant: f.logDeterminantMethod,
    convergence: f.convergence,
    warnings: f.warnings,
  };
}

/** `local`: one object per statistic (moran, gi, gistar), each with its areas in table order; NaN becomes null. */
function localToJson(r: AnalysisResult): Record<string, unknown> {
  const l = r.local!;
  const out: Record<string, unknown> = {};
  const num = (x: number) => (Number.isFinite(x) ? x : null);
  for (const kind of Object.keys(l.results) as LocalStatisticKind[]) {
    const s = l.results[kind]!;
    out[kind] = {
      variable: l.variable,
      of: l.of,
      permutations: l.permutations,
      seed: l.seed,
      permutationRule: l.permutationRule,
      control: { method: l.control.method, level: l.control.level, tests: s.tests, decidedOn: s.decidedOn },
      ...(kind === 'gistar' ? { weights: 'binary, each area included with weight 1' } : {}),
      areas: r.ids.map((id, i) => ({
        id,
        ...(r.labels ? { label: r.labels[i] } : {}),
        value: num(s.value[i]),
        expected: num(s.expected[i]),
        variance: num(s.variance[i]),
        z: num(s.z[i]),
        p: num(s.p[i]),
        pPermutation: s.pPermutation ? num(s.pPermutation[i]) : null,
        pAdjusted: num(s.adjusted[i]),
        significant: s.significant[i],
        ...(s.categories ? { category: s.categories[i] } : {}),
      })),
    };
  }
  return out;
}

/** The suggestion with what a script (or the sidebar's "fit it" button) needs: which models, which were not fitted. */
function recommendationJson(r: Recommendation) {
  return {
    choice: r.choice, models: r.models, borderline: r.borderline, bothKinds: r.bothKinds,
    fitted: r.fitted, notFitted: r.notFitted,
    significant: r.significant, alpha: r.alpha, close: r.close,
    text: r.text, rule: r.rule,
  };
}
