/** JSON and headline pieces shared by the models with their own fit shapes (lag-and-error, instruments, moments). */
import { normalTwoSided } from '../stats/index.js';
import { coefficientJson, type ParameterEstimate, type ParameterName } from './model-entry.js';
import type { Coefficient } from './types.js';

/** A spatial parameter's estimate with its z and two-sided normal p. */
export function parameterEstimate(name: ParameterName, estimate: number, se: number): ParameterEstimate {
  const z = estimate / se;
  return { ...name, estimate, se, z, p: normalTwoSided(z) };
}

/**
 * A model's JSON object: each spatial parameter as `rho`, `rhoSe`, `rhoZ`, `rhoP` (or `lambda…`),
 * the coefficients (constant, X, then any WX terms with `lagged: true`), σ², then the model's own
 * fields, then its warnings.
 */
export function familyJson(
  f: { coefficients: Coefficient[]; sigma2: number; warnings: string[] },
  parameters: ParameterEstimate[],
  own: Record<string, unknown>,
): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const e of parameters) {
    const q = e;
    out[q.key] = e.estimate;
    out[`${q.key}Se`] = e.se;
    out[`${q.key}Z`] = e.z;
    out[`${q.key}P`] = e.p;
  }
  return { ...out, coefficients: f.coefficients.map(coefficientJson), sigma2: f.sigma2, ...own, warnings: f.warnings };
}
