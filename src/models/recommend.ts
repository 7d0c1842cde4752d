import type { LmTests, Recommendation, SpatialModelName } from './types.js';

const PUBLISHED_RULE =
  'Decision rule of Anselin (2005) and Anselin & Rey (2014): look at the Lagrange-multiplier tests for a spatial error and for a spatial lag; if neither is significant, ' +
  'stay with the plain regression; if only one is, take that model; if both are, look at the robust forms and take the model whose robust test alone is significant; ' +
  'if both robust tests are significant, the larger robust statistic points the way and a model with both a lag and an error term is worth considering; ' +
  'if neither robust test is significant, the tests do not separate the two models.';

/** How far from the level a p-value counts as close: a factor of two either side (this tool's rule). */
const CLOSE_FACTOR = 2;

type Choice = Recommendation['choice'];
type Significance = Recommendation['significant'];

function significance(lm: LmTests, alpha: number): Significance {
  return { error: lm.error.p < alpha, lag: lm.lag.p < alpha, robustError: lm.robustError.p < alpha, robustLag: lm.robustLag.p < alpha };
}

/** The branch of the published rule at one level. */
function branch(lm: LmTests, alpha: number): Choice {
  const s = significance(lm, alpha);
  if (!s.error && !s.lag) return 'ols';
  if (s.lag && !s.error) return 'lag';
  if (s.error && !s.lag) return 'error';
  if (s.robustLag && !s.robustError) return 'lag';
  if (s.robustError && !s.robustLag) return 'error';
  if (s.robustLag && s.robustError) return lm.robustLag.stat >= lm.robustError.stat ? 'lag' : 'error';
  return 'either';
}

const MODELS_OF: Record<Choice, ('ols' | SpatialModelName)[]> = { ols: ['ols'], lag: ['lag'], error: ['error'], either: ['lag', 'error'] };
const ORDER = ['ols', 'lag', 'error'] as const;
const NAME = { ols: 'the plain regression', lag: 'the spatial lag model', error: 'the spatial error model' } as const;
const TEST = {
  error: 'error', lag: 'lag', robustError: 'robust error', robustLag: 'robust lag',
} as const;

function sayP(p: number): string {
  if (!Number.isFinite(p)) return 'p not available';
  return p < 0.001 ? 'p < 0.001' : `p = ${p.toFixed(3)}`;
}

function percent(x: number): string {
  return `${+(x * 100).toFixed(2)}%`;
}

/** "error p = 0.010, lag p = 0.200" for the named tests. */
function ps(lm: LmTests, keys: (keyof typeof TEST)[]): string {
  return keys.map((k) => `${TEST[k]} ${sayP(lm[k].p)}`).join(', ');
}

function and(items: readonly string[]): string {
  return items.length <= 1 ? items.join('') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

export interface RecommendOptions {
  /** the significance level (default 0.05) */
  alpha?: number;
  /** the models this run fitted (default: all three), so the guidance can say what was not fitted */
  fitted?: readonly string[];
}

/**
 * Guidance on the choice between the lag and error models from the Lagrange-multiplier tests, by
 * the decision rule described in Anselin (2005, a workbook on exploring spatial data) and Anselin &
 * Rey (2014, Modern Spatial Econometrics in Practice, ch. 5). It says no more than the rule: when
 * neither robust test is significant the tests do not separate the models. This tool adds one rule of
 * its own: the call is borderline when it would change had the level been halved or doubled (a
 * p-value it turns on lies between α/2 and 2α) so as to ask for another model; then every model the
 * call could go to should be reported. It is guidance, not a verdict: theory about the process should weigh more than the tests.
 */
export function recommendModel(lm: LmTests, options: RecommendOptions | number = {}): Recommendation {
  const opts = typeof options === 'number' ? { alpha: options } : options;
  const alpha = opts.alpha ?? 0.05;
  const fitted = new Set(opts.fitted ?? ORDER);
  const close = { lower: alpha / CLOSE_FACTOR, upper: Math.min(1, alpha * CLOSE_FACTOR) };
  const s = significance(lm, alpha);
  const choice = branch(lm, alpha);
  // borderline: at half or twice the level the rule would ask for a model it does not ask for now
  const calls = [branch(lm, close.lower), choice, branch(lm, close.upper)];
  const models = ORDER.filter((m) => calls.some((c) => MODELS_OF[c].includes(m)));
  const borderline = models.length > MODELS_OF[choice].length;
  const notFitted = models.filter((m): m is SpatialModelName => m !== 'ols' && !fitted.has(m));
  const bothKinds = s.robustError && s.robustLag && s.error && s.lag;
  const at = percent(alpha);
  const sentences: string[] = [];

  if (choice === 'ols') {
    sentences.push(`Neither Lagrange-multiplier test is significant at ${at} (${ps(lm, ['error', 'lag'])}): the data give no reason to move beyond the plain regression.`);
  } else if (s.error !== s.lag) {
    const one = s.lag ? 'lag' : 'error';
    sentences.push(`Only the Lagrange-multiplier test for a spatial ${one} is significant at ${at} (${ps(lm, [one, one === 'lag' ? 'error' : 'lag'])}): ${NAME[one]} is the suggested model.`);
  } else {
    const plain = `Both Lagrange-multiplier tests are significant at ${at} (${ps(lm, ['error', 'lag'])})`;
    if (s.robustLag !== s.robustError) {
      const one = s.robustLag ? 'lag' : 'error';
      const robust = s.robustLag ? 'robustLag' : 'robustError';
      sentences.push(`${plain}; of their robust forms only the one for a ${one} is (${ps(lm, [robust, robust === 'robustLag' ? 'robustError' : 'robustLag'])}), so ${NAME[one]} is the suggested model.`);
    } else if (bothKinds) {
      const larger = choice === 'lag' ? lm.robustLag.stat : lm.robustError.stat;
      const smaller = choice === 'lag' ? lm.robustError.stat : lm.robustLag.stat;
      sentences.push(
        `${plain}, and so are both robust forms (${ps(lm, ['robustError', 'robustLag'])}); the larger robust statistic (${larger.toPrecision(3)} against ${smaller.toPrecision(3)}) points to ${NAME[choice as SpatialModelName]}, ` +
          'and a model with both a lag and an error term (the lag-and-error model) is worth considering.',
      );
    } else {
      sentences.push(
        `${plain} but neither robust form is (${ps(lm, ['robustError', 'robustLag'])}): the tests do not separate the spatial lag model from the spatial error model. ` +
          'Report both; what is known about the process, not these tests, has to choose between them.',
      );
    }
  }
  if (borderline) {
    const near = (Object.keys(TEST) as (keyof typeof TEST)[]).filter((k) => lm[k].p >= close.lower && lm[k].p < close.upper);
    sentences.push(
      `The call is borderline: it turns on ${near.length === 1 ? 'a p-value' : 'p-values'} close to the ${at} level (${ps(lm, near)}; close means between ${percent(close.lower)} and ${percent(close.upper)}, ` +
        `where halving or doubling the level would change the call), so report ${models.length === 2 ? 'both ' : ''}${and(models.map((m) => NAME[m]))}.`,
    );
  }
  if (notFitted.length) {
    sentences.push(notFitted.length === 2
      ? 'Neither spatial model was fitted in this run: add both to the models and run again to see their estimates.'
      : `${capital(NAME[notFitted[0]])} was not fitted in this run: add it to the models and run again to see its estimates.`);
  }
  return {
    choice, models, borderline, close, significant: s, bothKinds,
    fitted: notFitted.length === 0, notFitted,
    text: sentences.join(' '),
    rule: `${PUBLISHED_RULE} A call is reported as borderline when, had the level been halved or doubled (${percent(close.lower)} or ${percent(close.upper)} here), ` +
      'the rule would ask for a model it does not ask for now; every model either call names is then to be reported.',
    alpha,
  };
}

function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
