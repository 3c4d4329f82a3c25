/**
 * The interval methods beyond Wald and residual-t, as fitDesign applies them: one entry point that
 * returns the fixed-effect rows (per estimable column) and, for profile and bootstrap, intervals
 * for every variance component (design term order, then the residual SD).
 */
import { QuadratInputError } from '../../model/errors';
import { INTERVAL_METHODS, type IntervalMethod } from '../../model/interval-rule';
import { expectInteger } from '../../model/option-checks';
import { studentTQuantile } from '../../numeric/distributions';
import { withResidualResponse, type InferenceContext } from './context';
import { satterthwaiteCore, satterthwaiteDf } from './satterthwaite';
import { kenwardRogerCore, kenwardRogerDf, kenwardRogerSizeProblem } from './kenward-roger';
import { profileFixedEffects, profileVariance, varianceTargets } from './profile';
import { BOOTSTRAP_DEFAULTS, bootstrapWidth, runBootstrapInThread, summariseBootstrap } from './bootstrap';

/** The methods computed here: every interval method but Wald and residual-t. */
export type SmallSampleMethod = Exclude<IntervalMethod, 'wald' | 'residual-t'>;
export const SMALL_SAMPLE_METHODS: readonly SmallSampleMethod[] = INTERVAL_METHODS.filter((m): m is SmallSampleMethod => m !== 'wald' && m !== 'residual-t');

export interface BootstrapSettings {
  /** Number of resamples. Default 999. */
  resamples?: number;
  /** Seed of the resample streams createStream(seed, 'bootstrap', b). Default 1. */
  seed?: number | string;
  /** Called after each block of resamples. */
  onProgress?: (done: number, total: number) => void;
}

export interface FixedInterval {
  se: number;
  df: number;
  lower: number;
  upper: number;
}

export interface IntervalOutcome {
  /** One per estimable column. */
  fixed: FixedInterval[];
  /** Covariance to report instead of σ̂²(RXᵀRX)⁻¹ (Kenward-Roger: the adjusted one), estimable columns. */
  fixedCov?: Float64Array;
  /** Variance-component intervals on the SD scale: design term order, then the residual. */
  variance?: { lower: number; upper: number }[];
  warnings: string[];
}

/** Why a method cannot be computed for this fit ('' when it can): Kenward-Roger's dense matrices need a moderate size (which method goes with which fit is model/interval-rule). */
function methodProblem(method: SmallSampleMethod, ctx: InferenceContext): string {
  return method === 'kenward-roger' ? kenwardRogerSizeProblem(ctx.dev) : '';
}

function tInterval(estimate: number, se: number, df: number, level: number): FixedInterval {
  const crit = Number.isNaN(df) ? NaN : studentTQuantile(0.5 + level / 2, df);
  return { se, df, lower: estimate - crit * se, upper: estimate + crit * se };
}

function unitVector(p: number, j: number): Float64Array {
  const c = new Float64Array(p);
  c[j] = 1;
  return c;
}

/** Apply one method. Throws QuadratInputError (naming the model field) when the method does not apply. */
export function smallSampleIntervals(
  ctx: InferenceContext, method: SmallSampleMethod, level: number, bootstrap: BootstrapSettings = {},
): IntervalOutcome {
  const problem = methodProblem(method, ctx);
  if (problem) throw new QuadratInputError(problem, { field: problem.startsWith('model.interval') ? 'model.interval' : 'model.estimation' });
  const { design, beta, sigma2 } = ctx;
  const p = design.p;
  const wald = (j: number) => Math.sqrt(sigma2 * ctx.dev.unscaledFixedCovariance()[j * p + j]);
  const warnings: string[] = [];
  if (method === 'satterthwaite') {
    const core = withResidualResponse(ctx, () => satterthwaiteCore(ctx.dev, ctx.theta, sigma2));
    warnings.push(...core.warnings);
    let df = (j: number) => satterthwaiteDf(core, unitVector(p, j));
    if (!core.covariance && !kenwardRogerSizeProblem(ctx.dev) && ctx.estimation !== 'ML') {
      // fall back on the expected information, which is positive definite where the curvature is not
      const kr = kenwardRogerCore(design, ctx.dev, ctx.theta, sigma2);
      if (kr.covariance) {
        warnings.push('Satterthwaite df computed with the expected instead of the observed information');
        df = (j: number) => kenwardRogerDf(kr, unitVector(p, j));
      }
    }
    return { fixed: Array.from({ length: p }, (_, j) => tInterval(beta[j], Math.sqrt(core.phi[j * p + j]), df(j), level)), warnings };
  }
  if (method === 'kenward-roger') {
    const core = kenwardRogerCore(design, ctx.dev, ctx.theta, sigma2);
    warnings.push(...core.warnings);
    const fixed = Array.from({ length: p }, (_, j) =>
      tInterval(beta[j], Math.sqrt(core.phiAdjusted[j * p + j]), kenwardRogerDf(core, unitVector(p, j)), level));
    return { fixed, fixedCov: core.phiAdjusted, warnings };
  }
  if (method === 'profile') {
    const fixedProfiles = profileFixedEffects(ctx, level);
    const fixed = fixedProfiles.map((iv, j) => {
      warnings.push(...iv.warnings);
      return { se: wald(j), df: NaN, lower: iv.lower, upper: iv.upper };
    });
    const variance = varianceTargets(ctx).map(({ target, label }) => {
      const iv = profileVariance(ctx, target, level, label);
      warnings.push(...iv.warnings);
      return { lower: iv.lower, upper: iv.upper };
    });
    return { fixed, variance, warnings };
  }
  const resamples = expectInteger(bootstrap.resamples ?? BOOTSTRAP_DEFAULTS.resamples, 'bootstrap.resamples', 1);
  const model = bootstrapModel(ctx, bootstrap.seed ?? BOOTSTRAP_DEFAULTS.seed);
  const samples = runBootstrapInThread(model, resamples, bootstrap.onProgress);
  const summary = summariseBootstrap(samples, bootstrapWidth(model.design), level);
  warnings.push(...summary.warnings);
  const fixed = Array.from({ length: p }, (_, j) => ({ se: wald(j), df: NaN, ...summary.intervals[j] }));
  return { fixed, variance: summary.intervals.slice(p), warnings };
}

/** The plain-data model the bootstrap runners simulate from. */
export function bootstrapModel(ctx: InferenceContext, seed: number | string) {
  return { design: ctx.design, reml: ctx.estimation !== 'ML', beta: ctx.beta, theta: ctx.theta, sigma: Math.sqrt(ctx.sigma2), seed };
}
