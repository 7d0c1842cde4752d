import type { AnalysisResult, ModelName } from '../pipeline/types.js';
import type { Coefficient } from '../models/types.js';
import { MODEL_LABEL, SOME_LEVEL, say, sayList, sayP } from './format.js';

/** The models that were fitted, in a fixed order, with their headline figures. */
export function fittedModels(result: AnalysisResult): { name: ModelName; logLik: number; aic: number; bic: number; coefficients: Coefficient[] }[] {
  const out: { name: ModelName; logLik: number; aic: number; bic: number; coefficients: Coefficient[] }[] = [
    { name: 'ols', logLik: result.ols.logLik, aic: result.ols.aic, bic: result.ols.bic, coefficients: result.ols.coefficients },
  ];
  if (result.lag) out.push({ name: 'lag', logLik: result.lag.logLik, aic: result.lag.aic, bic: result.lag.bic, coefficients: result.lag.coefficients });
  if (result.error) out.push({ name: 'error', logLik: result.error.logLik, aic: result.error.aic, bic: result.error.bic, coefficients: result.error.coefficients });
  return out;
}

const label = (m: ModelName): string => MODEL_LABEL[m].toLowerCase();

function pattern(I: number, p: number): string {
  if (!(p < SOME_LEVEL)) return 'shows no clear spatial pattern';
  return I > 0 ? 'is clustered: neighbouring areas tend to have similar values' : 'alternates: neighbouring areas tend to have unlike values';
}

/** A plain-language reading of one run, written from its numbers. No causal wording. */
export function interpretation(result: AnalysisResult): string {
  const y = result.request.y;
  const parts: string[] = [];
  const my = result.moranY;
  parts.push(`Across the ${result.n} areas, ${y} ${pattern(my.I, my.p)} (Moran's I ${say(my.I)}, ${sayP(my.p)}).`);

  const m = result.ols.moran;
  parts.push(m.p < SOME_LEVEL
    ? `After taking ${sayList(result.xNames)} into account, the plain regression's residuals still show a spatial pattern (Moran's I ${say(m.I)}, ${sayP(m.p)}), so the plain regression's standard errors and tests are not fully trustworthy.`
    : `After taking ${sayList(result.xNames)} into account, the plain regression's residuals show no clear spatial pattern (Moran's I ${say(m.I)}, ${sayP(m.p)}).`);

  const rec = result.ols.recommendation;
  parts.push(rec.text);

  // Whose estimates to describe: the suggested model when it was fitted; of several to report, the
  // one with the lower AIC (said as such); otherwise the plain regression, saying why.
  const fitted = fittedModels(result);
  const candidates = fitted.filter((f) => rec.models.includes(f.name));
  let preferred = candidates[0] ?? fitted[0];
  let lead: string;
  let comparedByAic: ModelName[] = [];
  if (candidates.length > 1) {
    preferred = candidates.reduce((a, b) => (b.aic < a.aic ? b : a));
    comparedByAic = candidates.map((c) => c.name);
    lead = `Of the models to report, the ${label(preferred.name)} has the lower AIC (${say(preferred.aic)} against ${sayList(candidates.filter((c) => c !== preferred).map((c) => say(c.aic)))}); in it,`;
  } else if (candidates.length === 1) {
    lead = `In the ${label(preferred.name)},`;
  } else {
    lead = `In the ${label(preferred.name)} (the suggested model was not fitted),`;
  }
  const phrases: string[] = [];
  for (const c of preferred.coefficients) {
    if (c.name === 'constant') continue;
    if (c.p < SOME_LEVEL) {
      phrases.push(`areas with higher ${c.name} tend to have ${c.estimate > 0 ? 'higher' : 'lower'} ${y} (estimate ${say(c.estimate)} per unit, ${sayP(c.p)})`);
    } else {
      phrases.push(`${c.name} shows no clear association with ${y} (${sayP(c.p)})`);
    }
  }
  if (phrases.length) parts.push(`${lead} ${phrases.join('; ')}.`);

  if (preferred.name === 'lag' && result.lag) {
    const f = result.lag;
    parts.push(f.parameterP < SOME_LEVEL
      ? `An area's ${y} moves with the average ${y} of its neighbours even after the explanatory columns are accounted for (spatial parameter ${say(f.parameter)}, ${sayP(f.parameterP)}); the spillover sheet splits each column's association into the part in the area itself and the part spread over other areas.`
      : `The spatial parameter of the lag model is not clearly different from zero (${say(f.parameter)}, ${sayP(f.parameterP)}).`);
  }
  if (preferred.name === 'error' && result.error) {
    const f = result.error;
    parts.push(f.parameterP < SOME_LEVEL
      ? `The unexplained part of ${y} is shared between neighbouring areas (spatial parameter ${say(f.parameter)}, ${sayP(f.parameterP)}), which hints at something missing from the data that varies smoothly across the map.`
      : `The spatial parameter of the error model is not clearly different from zero (${say(f.parameter)}, ${sayP(f.parameterP)}).`);
  }
  if (fitted.length > 1) {
    const best = fitted.reduce((a, b) => (b.aic < a.aic ? b : a));
    // said already when the models to report were compared by AIC and the best of all is among them
    if (!comparedByAic.includes(best.name)) parts.push(`Among all the models fitted in this run, the ${label(best.name)} has the lowest AIC (${say(best.aic)}), the best balance of fit and simplicity by that measure.`);
  }
  return parts.join(' ');
}
