/**
 * Bootstrap intervals for a fit already made, on worker threads: the same resamples (and so the
 * same intervals) as fitDesign with interval 'bootstrap' and the same seed, whatever the number of
 * workers.
 */
import type { DesignMatrices } from '../../data/design-matrices';
import type { FitResult } from '../result';
import { QuadratInputError } from '../../model/errors';
import { checkLevel, expectInteger } from '../../model/option-checks';
import { contextFromFit } from './context';
import { BOOTSTRAP_DEFAULTS, modelBootstrapWidth, summariseBootstrap, type BootstrapSummary } from './bootstrap';
import { countBootstrapModel, countContextFromFit } from './count-intervals';
import { runBootstrapParallel } from './bootstrap-pool';
import { bootstrapModel, type BootstrapSettings } from './intervals';

export interface BootstrapFitOptions extends BootstrapSettings {
  /** Interval level. Default 0.95. */
  level?: number;
  /** Worker threads. Default: all cores (in this thread below 200 resamples). */
  workers?: number;
}

/** The fit with bootstrap percentile intervals for the fixed effects and the variance components. */
export async function bootstrapFit(
  design: DesignMatrices, fit: FitResult, options: BootstrapFitOptions = {},
): Promise<{ fit: FitResult; summary: BootstrapSummary }> {
  const level = checkLevel(options.level ?? 0.95, 'bootstrap.level');
  const resamples = expectInteger(options.resamples ?? BOOTSTRAP_DEFAULTS.resamples, 'bootstrap.resamples', 1);
  if (fit.failure) throw new QuadratInputError(`fit: the fit produced no estimates (${fit.failure}); nothing to resample`, { field: 'fit' });
  const seed = options.seed ?? BOOTSTRAP_DEFAULTS.seed;
  let model;
  let columns: number[];
  if (fit.response) {
    // count and detection fits: the estimates are read back from the result
    const ctx = countContextFromFit(design, fit);
    model = countBootstrapModel(ctx, seed);
    columns = ctx.estimate.estimable;
  } else {
    const ctx = contextFromFit(design, fit);
    model = bootstrapModel(ctx, seed);
    columns = ctx.columns;
  }
  const samples = await runBootstrapParallel(model, resamples, { workers: options.workers, onProgress: options.onProgress });
  const summary = summariseBootstrap(samples, modelBootstrapWidth(model), level);
  const p = model.design.p;
  const fixed = fit.fixed.map((r) => ({ ...r }));
  columns.forEach((j, a) => Object.assign(fixed[j], { df: NaN, method: 'bootstrap', ...summary.intervals[a] }));
  const random = fit.random.map((r, i) => ({ ...r, ...summary.intervals[p + i] }));
  return { fit: { ...fit, fixed, random, warnings: [...fit.warnings, ...summary.warnings] }, summary };
}
