/**
 * A fit of design matrices: the family's estimate step, then the shared summarise step.
 *   design (X, roles, y, random terms) ─> ESTIMATE_STEPS[family] ─> Estimate ─> summarise ─> FitResult
 */
import type { DesignMatrices } from '../data/design-matrices';
import type { FamilyName } from '../family/index';
import type { FitResult } from './result';
import type { BootstrapSettings } from './inference/intervals';
import { checkInterval, type IntervalMethod } from '../model/interval-rule';
import { estimabilityOrder } from './aliasing';
import { checkFitOptions } from './check-fit-options';
import { ESTIMATE_STEPS } from './estimate/index';
import { responseScale, scaledResponse, unscaleFit } from './response-scale';
import { summarise } from './summarise';
import { QuadratInputError } from '../model/errors';

export { INTERVAL_METHODS, type IntervalMethod } from '../model/interval-rule';

export interface FitOptions {
  /** Response family. Default 'gaussian'. */
  family?: FamilyName;
  /** Non-normal families: 'laplace' (default) or 'quadrature' (one random intercept), and its nodes (9). */
  integration?: 'laplace' | 'quadrature';
  nodes?: number;
  /** Default 'REML'. Ignored when the model has no random terms (ordinary least squares). */
  estimation?: 'REML' | 'ML';
  /** Interval level. Default 0.95. */
  level?: number;
  /**
   * Interval method for fixed effects in a mixed model: 'wald' (normal quantiles), 'residual-t'
   * (t quantiles with n − rank(X) df), 'satterthwaite' or 'kenward-roger' (t quantiles with
   * small-sample df; Kenward-Roger also adjusts the SEs, REML only), 'profile' (profile likelihood)
   * or 'bootstrap' (parametric bootstrap percentiles); the last two also give intervals for the
   * variance components. Default here 'wald', the fastest; model descriptions default to
   * 'satterthwaite' (MODEL_DEFAULTS). Ordinary least squares always uses exact t intervals.
   */
  interval?: IntervalMethod;
  /** Settings of the 'bootstrap' method (resamples, seed, progress). */
  bootstrap?: BootstrapSettings;
  /** Compute conditional modes and their SDs. Default true. */
  modes?: boolean;
  /** Compute fitted values and residuals. Default true. */
  fitted?: boolean;
  /** Starting θ for the optimiser (length must match). */
  start?: ArrayLike<number>;
}

/**
 * Fit a mixed model (or, with no random terms, a fixed-effects model) to design matrices. Never
 * throws for numerical trouble: problems come back as `converged`, `singular`, `aliased` and
 * `warnings`. Column roles (not names) decide which aliased column is reported (fit/aliasing.ts).
 */
export function fitDesign(design: DesignMatrices, options: FitOptions = {}): FitResult {
  checkFitOptions(options);
  const family = options.family ?? 'gaussian';
  const step = ESTIMATE_STEPS[family];
  if (!step) throw new QuadratInputError(`options.family: no estimate step for the "${family}" family`, { field: 'options.family' });
  if (family === 'gaussian') {
    // a normal response far from unit size is fitted on a power-of-two scale (exact in binary), then scaled back
    const scale = responseScale(design.y);
    if (scale !== 1) return unscaleFit(fitDesign(scaledResponse(design, scale), options), scale);
  }
  const estimation = options.estimation ?? 'REML';
  const interval = checkInterval(options.interval ?? 'wald', { family, estimation, random: design.random.length > 0 }, 'options.interval', 'options.estimation');
  const fitted = options.fitted ?? true;
  const estimate = step(design, {
    estimation,
    priority: estimabilityOrder(design.roles),
    start: options.start,
    modes: options.modes ?? true,
    fitted,
    integration: options.integration,
    nodes: options.nodes,
  });
  return summarise(design, estimate, { level: options.level ?? 0.95, interval, bootstrap: options.bootstrap, fitted });
}
