/**
 * The interval methods and the one rule of which goes with which fit: the model parser, the fit
 * entry points (analyse/fitModel, fit/fitDesign) and the contrast tests all ask `intervalProblem`,
 * so the rule is written once. A method that needs the engine's internals is computed in
 * fit/inference/; its name is listed here.
 */
import { QuadratInputError, describeValue } from './errors';
import { nearestName } from './option-checks';

/** Interval methods the engine provides; all but the first two are computed in fit/inference/. */
export const INTERVAL_METHODS = ['wald', 'residual-t', 'satterthwaite', 'kenward-roger', 'profile', 'bootstrap'] as const;
export type IntervalMethod = (typeof INTERVAL_METHODS)[number];

/** What the rule depends on: the family, the estimation, and whether the model has random terms. */
export interface IntervalSetting {
  /** A ResponseFamilyName ("gaussian", "poisson", ...). */
  family: string;
  /** "REML" or "ML". */
  estimation: string;
  /** False for ordinary least squares (every grouping factor fixed), which always uses exact t intervals. */
  random: boolean;
}

/** Methods open to a family other than the normal one (fitted by ML through the Laplace or quadrature step; fit/inference/count-intervals). */
const NON_NORMAL_METHODS: readonly IntervalMethod[] = ['wald', 'profile', 'bootstrap'];

/**
 * Why `method` cannot be used with this fit, as a message starting with `field` ('' when it can):
 * - the name must be one of INTERVAL_METHODS;
 * - a count or detection family has Wald z, profile and bootstrap intervals (no small-sample t methods);
 * - Kenward-Roger is defined for REML fits of mixed models (Kenward and Roger 1997, Biometrics 53(3));
 *   an ordinary least-squares fit ignores the method and uses exact t intervals.
 */
export function intervalProblem(method: unknown, setting: IntervalSetting, field = 'model.interval', estimationField = 'model.estimation'): string {
  if (!(INTERVAL_METHODS as readonly unknown[]).includes(method)) {
    const near = typeof method === 'string' ? nearestName(method, INTERVAL_METHODS) : undefined;
    return `${field}: interval method ${describeValue(method)} is not available${near ? ` (did you mean "${near}"?)` : ''}; expected one of: ${INTERVAL_METHODS.join(', ')}`;
  }
  const m = method as IntervalMethod;
  if (setting.family !== 'gaussian' && !NON_NORMAL_METHODS.includes(m)) {
    return `${field}: the "${setting.family}" family has ${NON_NORMAL_METHODS.map((x) => `"${x}"`).join(', ')} intervals; ${describeValue(m)} is a small-sample t method for normal responses only`;
  }
  if (m === 'kenward-roger' && setting.estimation === 'ML' && setting.random) {
    return `${field}: "kenward-roger" is defined for REML fits only, but ${estimationField} is "ML"; use estimation "REML" or interval "satterthwaite"`;
  }
  return '';
}

/** The method when the rule allows it; otherwise a QuadratInputError naming `field`. */
export function checkInterval(method: unknown, setting: IntervalSetting, field = 'model.interval', estimationField = 'model.estimation'): IntervalMethod {
  const problem = intervalProblem(method, setting, field, estimationField);
  if (problem) throw new QuadratInputError(problem, { field });
  return method as IntervalMethod;
}
