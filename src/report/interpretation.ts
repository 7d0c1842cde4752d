import type { AnalysisResult } from '../pipeline/types.js';
import type { Coefficient } from '../models/types.js';
import { inSentence, fittedInOrder } from '../models/index.js';
import { SOME_LEVEL, say, sayList, sayP } from './format.js';
import { formatCount } from '../core/count.js';

/** The models that were fitted, in registry order, with their headline figures (AIC and the like absent for estimators without a likelihood). */
export function fittedModels(result: AnalysisResult): { name: string; label: string; logLik?: number; aic?: number; bic?: number; coefficients: Coefficient[] }[] {
  return fittedInOrder(result.fits).map(({ entry, fit }) => {
    const h = entry.headline(fit);
    return { name: entry.key, label: entry.label, logLik: h.logLik, aic: h.aic, bic: h.bic, coefficients: fit.coefficients };
  });
}

function pattern(I: number, p: number): string {
  if (!(p < SOME_LEVEL)) return 'shows no clear spatial pattern';
  return I > 0 ? 'is clustered: neighbouring areas tend to have similar values' : 'alternates: neighbouring areas tend to have unlike values';
}

/** A plain-language reading of one run, written from its numbers. No causal wording. */
export function interpretation(result: AnalysisResult): string {
  const y = result.request.y;
  const parts: string[] = [];
  const my = result.moranY;
  parts.push(`Across the ${formatCount(result.n)} areas, ${y} ${pattern(my.I, my.p)} (Moran's I ${say(my.I)}, ${sayP(my.p)}).`);

  const m = result.ols.moran;
  parts.push(m.p < SOME_LEVEL
    ? `After taking ${sayList(result.xNames)} into account, the plain regression's residuals still show a spatial pattern (Moran's I ${say(m.I)}, ${sayP(m.p)}), so the plain regression's standard errors and tests are not fully trustworthy.`
    : `After taking ${sayList(result.xNames)} into account, the plain regression's residuals show no clear spatial pattern (Moran's I ${say(m.I)}, ${sayP(m.p)}).`);

  const rec = result.ols.recommendation;
  parts.push(rec.text);

  // Whose estimates to describe: the suggested model when it was fitted; of several to report, the
  // one with the lower AIC (said as such); otherwise the plain regression, saying why.
  const fitted = fittedModels(result);
  const candidates = fitted.filter((f) => (rec.models as readonly string[]).includes(f.name));
  const withAic = <T extends { aic?: number }>(list: T[]) => list.filter((f): f is T & { aic: number } => f.aic !== undefined);
  const label = (f: { label: string }) => inSentence(f.label);
  let preferred = candidates[0] ?? fitted[0];
  let lead: string;
  let comparedByAic: string[] = [];
  const rankedCandidates = withAic(candidates);
  if (candidates.length > 1 && rankedCandidates.length === candidates.length) {
    const best = rankedCandidates.reduce((a, b) => (b.aic < a.aic ? b : a));
    preferred = best;
    comparedByAic = candidates.map((c) => c.name);
    lead = `Of the models to report, the ${label(best)} has the ${candidates.length > 2 ? 'lowest' : 'lower'} AIC (${say(best.aic)} against ${sayList(rankedCandidates.filter((c) => c !== best).map((c) => say(c.aic)))}); in it,`;
  } else if (candidates.length >= 1) {
    lead = `In the ${label(preferred)},`;
  } else {
    lead = `In the ${label(preferred)} (the suggested model was not fitted),`;
  }
  const phrases: string[] = [];
  for (const c of preferred.coefficients) {
    if (c.intercept) continue;
    if (c.p < SOME_LEVEL) {
      phrases.push(`areas with higher ${c.name} tend to have ${c.estimate > 0 ? 'higher' : 'lower'} ${y} (estimate ${say(c.estimate)} per unit, ${sayP(c.p)})`);
    } else {
      phrases.push(`${c.name} shows no clear association with ${y} (${sayP(c.p)})`);
    }
  }
  if (phrases.length) parts.push(`${lead} ${phrases.join('; ')}.`);

  if (preferred.name === 'lag' && result.fits.lag) {
    const f = result.fits.lag;
    parts.push(f.parameterP < SOME_LEVEL
      ? `An area's ${y} moves with the average ${y} of its neighbours even after the explanatory columns are accounted for (spatial parameter ${say(f.parameter)}, ${sayP(f.parameterP)}); the spillover sheet splits each column's association into the part in the area itself and the part spread over other areas.`
      : `The spatial parameter of the lag model is not clearly different from zero (${say(f.parameter)}, ${sayP(f.parameterP)}).`);
  }
  if (preferred.name === 'error' && result.fits.error) {
    const f = result.fits.error;
    parts.push(f.parameterP < SOME_LEVEL
      ? `The unexplained part of ${y} is shared between neighbouring areas (spatial parameter ${say(f.parameter)}, ${sayP(f.parameterP)}), which hints at something missing from the data that varies smoothly across the map.`
      : `The spatial parameter of the error model is not clearly different from zero (${say(f.parameter)}, ${sayP(f.parameterP)}).`);
  }
  const ranked = withAic(fitted);
  if (ranked.length > 1) {
    const best = ranked.reduce((a, b) => (b.aic < a.aic ? b : a));
    // said already when the models to report were compared by AIC and the best of all is among them
    if (!comparedByAic.includes(best.name)) parts.push(`Among all the models fitted in this run, the ${label(best)} has the lowest AIC (${say(best.aic)}), the best balance of fit and simplicity by that measure.`);
  }
  return parts.join(' ');
}
