import type { LmTests, Recommendation } from './types.js';

const RULE =
  'Decision rule of Anselin (2005) and Anselin & Rey (2014): look at the LM error and LM lag tests; if only one is significant, ' +
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
    return out('ols', `Neither LM test is significant at ${pct}: the data give no reason to move beyond the ordinary regression.`);
  }
  if (lagSig && !errorSig) return out('lag', `Only the LM lag test is significant at ${pct}: the lag model is the suggested next step.`);
  if (errorSig && !lagSig) return out('error', `Only the LM error test is significant at ${pct}: the error model is the suggested next step.`);
  const rLag = sig(lm.robustLag);
  const rErr = sig(lm.robustError);
  if (rLag && !rErr) {
    return out('lag', `Both LM tests are significant at ${pct}; of the robust forms only robust LM lag is, so the lag model is suggested.`);
  }
  if (rErr && !rLag) {
    return out('error', `Both LM tests are significant at ${pct}; of the robust forms only robust LM error is, so the error model is suggested.`);
  }
  const lagLarger = lm.robustLag.stat >= lm.robustError.stat;
  const lead = lagLarger ? 'lag' : 'error';
  if (rLag && rErr) {
    return out(
      'either',
      `Both LM tests and both robust forms are significant at ${pct}; the larger robust statistic points to the ${lead} model, ` +
        'and a model with both a lag and an error term is worth considering.',
    );
  }
  return out(
    lead,
    `Both LM tests are significant at ${pct} but neither robust form is; the larger robust statistic points, weakly, to the ${lead} model.`,
  );
}
