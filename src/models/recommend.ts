import type { LmTests, Recommendation } from './types.js';

const RULE =
  'Decision rule of Anselin (2005) and Anselin & Rey (2014): look at the Lagrange-multiplier tests for a spatial error and for a spatial lag; if only one is significant, ' +
  'take that model; if both are, compare the robust forms and take the one whose robust test is significant; if both robust ' +
  'tests are significant, the larger one points the way, and a model with both a lag and an error term is worth considering.';

/**
 * Guidance on the choice between the lag and error models from the Lagrange-multiplier tests, by
 * the decision rule described in Anselin (2005, a workbook on exploring spatial data) and Anselin &
 * Rey (2014, Modern Spatial Econometrics in Practice, ch. 5). It is guidance, not a verdict: theory
 * about the process should weigh more than the tests.
 */
export function recommendModel(lm: LmTests, alpha = 0.05): Recommendation {
  const pct = `${+(alpha * 100).toFixed(2)}%`;
  const sig = (t: { p: number }): boolean => t.p < alpha;
  const out = (choice: Recommendation['choice'], text: string): Recommendation => ({ choice, text, rule: RULE, alpha });
  const errorSig = sig(lm.error);
  const lagSig = sig(lm.lag);
  if (!errorSig && !lagSig) {
    return out('ols', `Neither Lagrange-multiplier test is significant at ${pct}: the data give no reason to move beyond the ordinary regression.`);
  }
  if (lagSig && !errorSig) return out('lag', `Only the Lagrange-multiplier test for a spatial lag is significant at ${pct}: the lag model is the suggested next step.`);
  if (errorSig && !lagSig) return out('error', `Only the Lagrange-multiplier test for a spatial error is significant at ${pct}: the error model is the suggested next step.`);
  const rLag = sig(lm.robustLag);
  const rErr = sig(lm.robustError);
  if (rLag && !rErr) {
    return out('lag', `Both Lagrange-multiplier tests are significant at ${pct}; of their robust forms only the one for a lag is, so the lag model is suggested.`);
  }
  if (rErr && !rLag) {
    return out('error', `Both Lagrange-multiplier tests are significant at ${pct}; of their robust forms only the one for an error is, so the error model is suggested.`);
  }
  const lagLarger = lm.robustLag.stat >= lm.robustError.stat;
  const lead = lagLarger ? 'lag' : 'error';
  if (rLag && rErr) {
    return out(
      'either',
      `Both Lagrange-multiplier tests and both robust forms are significant at ${pct}; the larger robust statistic points to the ${lead} model, ` +
        'and a model with both a lag and an error term (the lag-and-error model) is worth considering.',
    );
  }
  return out(
    lead,
    `Both Lagrange-multiplier tests are significant at ${pct} but neither robust form is; the larger robust statistic points, weakly, to the ${lead} model.`,
  );
}
