/**
 * Interval methods beyond Wald for count and detection fits: 'profile' (./count-profile) and
 * 'bootstrap' (./count-bootstrap, percentile intervals of ./bootstrap). The small-sample t methods
 * (Satterthwaite, Kenward-Roger, residual-t) are defined for normal responses only.
 */
import type { DesignMatrices } from '../../data/design-matrices';
import type { FitResult } from '../result';
import type { CountEstimate, CountFitOptions } from '../estimate/count-model';
import { restrictColumns } from '../aliasing';
import { checkInterval } from '../../model/interval-rule';
import { expectInteger } from '../../model/option-checks';
import { countProfileFixed, countProfileSds, type CountContext } from './count-profile';
import { BOOTSTRAP_DEFAULTS, runBootstrapInThread, summariseBootstrap, type BootstrapModel } from './bootstrap';
import { countBootstrapWidth } from './count-bootstrap';
import type { BootstrapSettings, IntervalOutcome, SmallSampleMethod } from './intervals';

/** The interval context of a count fit made by estimateCountModel on `full` with `options`. */
export function countContext(full: DesignMatrices, options: CountFitOptions, estimate: CountEstimate): CountContext {
  const design = restrictColumns(full, estimate.estimable);
  const { priority: _ignored, ...rest } = options;
  return { design, options: { ...rest, integration: estimate.integration === 'quadrature' ? 'quadrature' : 'laplace', nodes: estimate.nodes || undefined }, estimate };
}

/** The plain-data model the bootstrap runners draw from. */
export function countBootstrapModel(ctx: CountContext, seed: number | string): BootstrapModel {
  const { estimate } = ctx;
  const { theta: _t, priority: _a, ...options } = ctx.options;
  return {
    design: ctx.design, reml: false, beta: estimate.beta, theta: estimate.theta, sigma: NaN, seed,
    count: { options, aggregation: estimate.aggregation },
  };
}

/**
 * A count context from a design and a count fit already made (for bootstrapFit on workers):
 * the estimates are read back from the result, nothing is refitted.
 */
export function countContextFromFit(full: DesignMatrices, fit: FitResult): CountContext {
  const response = fit.response!;
  const estimable = fit.fixed.flatMap((r, j) => (r.aliased ? [] : [j]));
  const beta = Float64Array.from(estimable, (j) => fit.fixed[j].estimate);
  const P = fit.fixed.length;
  const cov = Float64Array.from({ length: estimable.length ** 2 }, (_, i) => fit.fixedCov[estimable[Math.floor(i / estimable.length)] * P + estimable[i % estimable.length]]);
  const estimate = {
    beta, cov, theta: Float64Array.from(fit.theta), aggregation: response.aggregation ?? NaN, logLik: fit.logLik, estimable,
    integration: response.integration, nodes: response.nodes,
  } as CountEstimate;
  const options: CountFitOptions = { family: response.family, trials: full.trials, offset: full.offset };
  return countContext(full, options, estimate);
}

/** Apply 'profile' or 'bootstrap' to a count fit; other methods are refused by the interval rule, naming model.interval. */
export function countIntervals(ctx: CountContext, method: SmallSampleMethod, level: number, bootstrap: BootstrapSettings = {}): IntervalOutcome {
  const family = ctx.options.family;
  checkInterval(method, { family, estimation: 'ML', random: true });
  const warnings: string[] = [];
  const p = ctx.design.p;
  const se = (j: number) => Math.sqrt(ctx.estimate.cov[j * p + j]);
  if (method === 'profile') {
    const fixed = countProfileFixed(ctx, level).map((iv, j) => {
      warnings.push(...iv.warnings);
      return { se: se(j), df: NaN, lower: iv.lower, upper: iv.upper };
    });
    const variance = countProfileSds(ctx, level).map((iv) => {
      warnings.push(...iv.warnings);
      return { lower: iv.lower, upper: iv.upper };
    });
    return { fixed, variance, warnings };
  }
  const resamples = expectInteger(bootstrap.resamples ?? BOOTSTRAP_DEFAULTS.resamples, 'bootstrap.resamples', 1);
  const model = countBootstrapModel(ctx, bootstrap.seed ?? BOOTSTRAP_DEFAULTS.seed);
  const samples = runBootstrapInThread(model, resamples, bootstrap.onProgress);
  const summary = summariseBootstrap(samples, countBootstrapWidth(ctx.design), level);
  warnings.push(...summary.warnings);
  const fixed = Array.from({ length: p }, (_, j) => ({ se: se(j), df: NaN, ...summary.intervals[j] }));
  return { fixed, variance: summary.intervals.slice(p), warnings };
}
