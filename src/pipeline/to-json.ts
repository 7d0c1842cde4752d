import { rateToJson } from './rates.js';
import { MODELS, baselineModel, fittedInOrder, testJson as test, type ModelEntry } from '../models/index.js';
import type { Recommendation } from '../models/types.js';
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
      ...baselineModel().json(r.fits.ols!),
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
  const fitted = fittedInOrder(r.fits).filter(({ entry }) => !entry.baseline);
  for (const { entry, fit } of fitted) {
    out[entry.key] = entry.json(fit);
    // likelihood-ratio tests against the models it nests that the run fitted too
    if (fit.nestedTests) (out[entry.key] as Record<string, unknown>).lrTests = fit.nestedTests.map((t) => ({ against: t.against, restriction: t.restriction, stat: t.stat, df: t.df, p: t.p }));
  }
  for (const { entry, fit } of fitted) {
    if (!fit.impacts) continue;
    const impacts = { impacts: fit.impacts.impacts.map((i) => ({ ...i })), impactsMethod: { draws: fit.impacts.draws, seed: fit.impacts.seed, method: fit.impacts.method } };
    if (entry.impactsAtTop) Object.assign(out, impacts);
    else Object.assign(out[entry.key] as Record<string, unknown>, impacts);
  }
  if (r.comparison) {
    const spatial = MODELS.filter((m) => !m.baseline);
    const fit = (f: ComparedFit | undefined, entry: ModelEntry) => f && {
      ...Object.fromEntries(f.parameters.flatMap((q) => [[q.key, q.estimate], [`${q.key}Se`, q.se], [`${q.key}P`, q.p]])),
      logLik: f.logLik, aic: f.aic, converged: f.converged,
      ...(f.impacts && !entry.impactsAtTop ? { impacts: f.impacts.map((i) => ({ ...i })) } : {}),
    };
    out.comparison = r.comparison.map((c) => {
      const fits = c.fits as Record<string, ComparedFit | undefined>;
      const atTop = spatial.find((m) => m.impactsAtTop && fits[m.key]?.impacts);
      return {
        label: c.label, description: c.description, asRun: c.asRun, links: c.links, meanNeighbours: c.meanNeighbours, withoutNeighbours: c.withoutNeighbours, components: c.components,
        moran: c.moran, lmP: c.lmP, suggestion: c.suggestion, ...(c.borderline ? { borderline: true } : {}), ...(c.sameAs ? { sameAs: c.sameAs } : {}),
        ...(c.tiesDecided ? { tiesDecided: c.tiesDecided } : {}),
        ...Object.fromEntries(spatial.map((m) => [m.key, fit(fits[m.key], m)])),
        ...(atTop ? { impacts: fits[atTop.key]!.impacts!.map((i) => ({ ...i })) } : {}),
        ...(c.failed ? { failed: c.failed } : {}),
      };
    });
  }
  if (r.local) out.local = localToJson(r);
  if (r.rates) out.rates = Object.fromEntries(r.rates.map((x) => [x.name, rateToJson(x)]));
  if (opts.perArea) {
    out.areas = r.ids.map((id, i) => ({
      id,
      ...(r.labels ? { label: r.labels[i] } : {}),
      row: r.rows[i],
      observed: r.y[i],
      ...Object.fromEntries(fittedInOrder(r.fits).flatMap(({ entry, fit }) => [[`${entry.key}Fitted`, fit.fitted[i]], [`${entry.key}Residual`, fit.residuals[i]]])),
    }));
  }
  return out;
}

/** `local`: one object per statistic (moran, gi, gistar), each with its areas in table order; NaN becomes null. */
function localToJson(r: AnalysisResult): Record<string, unknown> {
  const l = r.local!;
  const out: Record<string, unknown> = {};
  const num = (x: number) => (Number.isFinite(x) ? x : null);
  const count = (flags: readonly boolean[]) => flags.filter(Boolean).length;
  for (const kind of Object.keys(l.results) as LocalStatisticKind[]) {
    const s = l.results[kind]!;
    out[kind] = {
      variable: l.variable,
      of: l.of,
      permutations: l.permutations,
      seed: l.seed,
      permutationRule: l.permutationRule,
      control: {
        method: l.control.method, level: l.control.level, tests: s.tests, decidedOn: s.decidedOn,
        // how many areas pass under each control at the same level, the chosen one among them
        significantUnder: { fdr: count(s.significantUnder.fdr), bonferroni: count(s.significantUnder.bonferroni), none: count(s.significantUnder.none) },
      },
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
        significantUnder: { fdr: s.significantUnder.fdr[i], bonferroni: s.significantUnder.bonferroni[i], none: s.significantUnder.none[i] },
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
