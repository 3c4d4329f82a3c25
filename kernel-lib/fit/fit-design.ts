import type { DesignMatrices } from './design';
import type { ConditionalModeRow, CorrelationRow, FitResult, FixedEffectRow, VarianceComponentRow } from './result';
import { aliasingFromCrossProducts, restrictColumns } from './aliasing';
import { aliasReasons } from './alias-reasons';
import { checkFitOptions } from './check-fit-options';
import type { IntervalMethod } from './interval-methods';
import { degenerateReason } from './degenerate';
import { applyDfFloor } from './df-floor';
import { responseScale, scaledResponse, unscaleFit } from './response-scale';
import { ProfiledDeviance } from './profiled-deviance';
import { optimiseTheta, BOUNDARY_TOLERANCE } from './optimise-theta';
import { normalQuantile, studentTQuantile } from '../numeric/distributions';
import { SMALL_SAMPLE_METHODS, smallSampleIntervals, type BootstrapSettings, type SmallSampleMethod } from './inference/intervals';

export { INTERVAL_METHODS, type IntervalMethod } from './interval-methods';

export interface FitOptions {
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
  /** Column visiting order for aliasing detection (earlier columns are kept). Default: column order. */
  aliasPriority?: number[];
  /** Starting θ for the optimiser (length must match). */
  start?: ArrayLike<number>;
}

/**
 * Fit a linear mixed model (or, with no random terms, ordinary least squares) to design matrices.
 * Never throws for numerical trouble: problems come back as `converged`, `singular`, `aliased`
 * and `warnings`.
 */
export function fitDesign(design: DesignMatrices, options: FitOptions = {}): FitResult {
  checkFitOptions(options);
  const level = options.level ?? 0.95;
  const requested = options.interval ?? 'wald';
  const scale = responseScale(design.y);
  if (scale !== 1) return unscaleFit(fitDesign(scaledResponse(design, scale), options), scale);
  const warnings = [...design.warnings];
  const ols = design.random.length === 0;
  const estimation = ols ? 'OLS' : options.estimation ?? 'REML';
  const degenerate = degenerateReason(design);
  if (degenerate) return emptyResult(design, estimation, [...warnings, degenerate], [], new Float64Array(0), 0, degenerate);
  let dev = new ProfiledDeviance(design, estimation === 'REML');
  const alias = aliasingFromCrossProducts(dev.crossProducts(), design.p, design.p + 1, options.aliasPriority);
  const aliasedNames = alias.aliased.map((j) => design.fixedNames[j]);
  const reasons = aliasReasons(design, dev.crossProducts(), design.p + 1, alias.estimable, alias.aliased);
  for (const name of aliasedNames) warnings.push(`not estimable: ${name}: ${reasons[name]}`);
  const reduced = restrictColumns(design, alias.estimable);
  if (reduced !== design) dev = new ProfiledDeviance(reduced, estimation === 'REML');
  const { n } = reduced;
  const p = reduced.p;

  let theta = new Float64Array(0);
  let deviance: number;
  let evaluations = 1;
  let converged = true;
  if (ols) {
    deviance = dev.evaluate(theta);
  } else {
    const opt = optimiseTheta(dev, options.start);
    theta = opt.theta;
    deviance = opt.deviance;
    evaluations = opt.evaluations;
    converged = opt.converged;
    if (!opt.converged) warnings.push(`did not converge: ${opt.reason}`);
  }
  const ok = Number.isFinite(deviance) && dev.factor(theta);
  if (!ok) {
    converged = false;
    const why = dev.lastFailure || 'the criterion could not be evaluated';
    if (!warnings.some((w) => w.includes(why))) warnings.push(`fit failed: ${why}`);
    return emptyResult(design, estimation, warnings, aliasedNames, theta, evaluations, why, reasons);
  }

  // σ²: REML and OLS divide by n − p, ML by n
  const r2 = dev.penalisedRss();
  const sigma2 = r2 / (estimation === 'ML' ? n : n - p);
  const beta = dev.beta();
  const unscaled = dev.unscaledFixedCovariance();
  const fullP = design.p;
  const fixedCov = new Float64Array(fullP * fullP).fill(NaN);
  for (let a = 0; a < p; a++) {
    for (let b = 0; b < p; b++) fixedCov[alias.estimable[a] * fullP + alias.estimable[b]] = sigma2 * unscaled[a * p + b];
  }
  const method: IntervalMethod = ols ? 'residual-t' : requested;
  // residual-t: exact for OLS (any regression text); for mixed models the simple small-sample correction
  const df = method === 'residual-t' ? n - p : Infinity;
  const crit = method === 'residual-t' ? studentTQuantile(0.5 + level / 2, df) : normalQuantile(0.5 + level / 2);
  const fixed: FixedEffectRow[] = design.fixedNames.map((term) => ({
    term, estimate: NaN, se: NaN, df, lower: NaN, upper: NaN, method, aliased: true,
  }));
  alias.estimable.forEach((j, a) => {
    const se = Math.sqrt(sigma2 * unscaled[a * p + a]);
    const row = fixed[j];
    row.estimate = beta[a];
    row.se = se;
    row.lower = beta[a] - crit * se;
    row.upper = beta[a] + crit * se;
    row.aliased = false;
  });
  let varianceIntervals: { lower: number; upper: number }[] | undefined;
  if ((SMALL_SAMPLE_METHODS as readonly string[]).includes(method)) {
    const ctx = { design: reduced, dev, estimation: estimation as 'REML' | 'ML', theta, sigma2, beta, columns: alias.estimable };
    const outcome = smallSampleIntervals(ctx, method as SmallSampleMethod, level, options.bootstrap);
    alias.estimable.forEach((j, a) => Object.assign(fixed[j], outcome.fixed[a]));
    const cov = outcome.fixedCov;
    if (cov) {
      for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) fixedCov[alias.estimable[a] * fullP + alias.estimable[b]] = cov[a * p + b];
    }
    warnings.push(...outcome.warnings);
    varianceIntervals = outcome.variance;
  }
  warnings.push(...applyDfFloor(fixed));

  // variance components Σ = σ² T Tᵀ per term, reported in the design's term order
  const random: VarianceComponentRow[] = [];
  const correlations: CorrelationRow[] = [];
  let singular = false;
  for (const term of design.random) {
    const s = dev.termIndex.get(term)!;
    const t = dev.terms[s];
    const T = dev.templates[s];
    const k = t.k;
    const cov = new Float64Array(k * k);
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let sum = 0;
        for (let c = 0; c <= Math.min(i, j); c++) sum += T[i * k + c] * T[j * k + c];
        cov[i * k + j] = sigma2 * sum;
      }
      if (T[i * k + i] < BOUNDARY_TOLERANCE) singular = true;
    }
    for (let i = 0; i < k; i++) {
      random.push({ factor: term.factor, term: term.terms[i], sd: Math.sqrt(cov[i * k + i]), variance: cov[i * k + i] });
    }
    if (term.correlated) {
      for (let i = 0; i < k; i++) {
        for (let j = i + 1; j < k; j++) {
          const denom = Math.sqrt(cov[i * k + i] * cov[j * k + j]);
          correlations.push({ factor: term.factor, terms: [term.terms[i], term.terms[j]], value: denom > 0 ? cov[i * k + j] / denom : NaN });
        }
      }
    }
  }
  if (singular) warnings.push('singular fit: a variance component (or a correlation) is estimated on the boundary of its range');
  random.push({ factor: 'residual', term: '', sd: Math.sqrt(sigma2), variance: sigma2 });
  if (varianceIntervals) random.forEach((r, i) => { r.lower = varianceIntervals![i].lower; r.upper = varianceIntervals![i].upper; });

  const wantModes = options.modes ?? true;
  const wantFitted = options.fitted ?? true;
  let modes: ConditionalModeRow[] = [];
  let fitted = new Float64Array(0);
  let residuals = new Float64Array(0);
  if ((wantModes || wantFitted) && !ols) {
    const { b } = dev.randomEffects(beta);
    if (wantModes) modes = conditionalModes(dev, b, sigma2, design);
    if (wantFitted) {
      fitted = linearPredictor(reduced, beta);
      for (const t of dev.terms) {
        const { index, values } = t.term;
        for (let i = 0; i < n; i++) {
          const base = t.start + index[i] * t.k;
          let s = 0;
          for (let j = 0; j < t.k; j++) s += values[i * t.k + j] * b[base + j];
          fitted[i] += s;
        }
      }
    }
  } else if (wantFitted) {
    fitted = linearPredictor(reduced, beta);
  }
  if (wantFitted) {
    residuals = new Float64Array(n);
    for (let i = 0; i < n; i++) residuals[i] = reduced.y[i] - fitted[i];
  }

  const parameters = p + theta.length + 1;
  const logLik = -deviance / 2;
  const levels: Record<string, number> = { ...design.levelCounts };
  return {
    estimation, observations: n, droppedRows: design.droppedRows.length, levels, fixed, fixedCov,
    random, correlations, residualSd: Math.sqrt(sigma2), logLik,
    aic: -2 * logLik + 2 * parameters, bic: -2 * logLik + Math.log(n) * parameters, parameters,
    theta: Array.from(theta), deviance, converged, singular, failure: '', aliased: aliasedNames, aliasReasons: reasons, warnings, evaluations,
    modes, fitted, residuals, rowIds: design.rowIds,
  };
}

function linearPredictor(design: DesignMatrices, beta: Float64Array): Float64Array {
  const { n, p, X } = design;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let a = 0; a < p; a++) s += X[i * p + a] * beta[a];
    out[i] = s;
  }
  return out;
}

/** Conditional modes b and their conditional SDs sqrt(diag σ² T A⁻¹ Tᵀ) per level (Bates et al. 2015, §3.5). */
function conditionalModes(dev: ProfiledDeviance, b: Float64Array, sigma2: number, design: DesignMatrices): ConditionalModeRow[] {
  const blocks = dev.inverseDiagonalBlocks();
  const rows: ConditionalModeRow[] = [];
  for (const term of design.random) {
    const s = dev.termIndex.get(term)!;
    const t = dev.terms[s];
    const T = dev.templates[s];
    const k = t.k;
    const blk = blocks[s];
    for (let l = 0; l < t.m; l++) {
      for (let i = 0; i < k; i++) {
        // (T A⁻¹ Tᵀ)[i,i] = Σ_a Σ_c T[i,a] A⁻¹[a,c] T[i,c]
        let v = 0;
        for (let a = 0; a <= i; a++) for (let c = 0; c <= i; c++) v += T[i * k + a] * blk[l * k * k + a * k + c] * T[i * k + c];
        rows.push({ factor: term.factor, level: term.levels[l], term: term.terms[i], mode: b[t.start + l * k + i], sd: Math.sqrt(sigma2 * v) });
      }
    }
  }
  return rows;
}

function emptyResult(
  design: DesignMatrices, estimation: FitResult['estimation'], warnings: string[], aliased: string[],
  theta: Float64Array, evaluations: number, failure: string, aliasReasons: Record<string, string> = {},
): FitResult {
  return {
    estimation, observations: design.n, droppedRows: design.droppedRows.length, levels: { ...design.levelCounts },
    fixed: design.fixedNames.map((term) => ({
      term, estimate: NaN, se: NaN, df: NaN, lower: NaN, upper: NaN, method: 'none', aliased: aliased.includes(term),
    })),
    fixedCov: new Float64Array(design.p * design.p).fill(NaN), random: [], correlations: [], residualSd: NaN,
    logLik: NaN, aic: NaN, bic: NaN, parameters: 0, theta: Array.from(theta), deviance: NaN, converged: false,
    singular: false, failure, aliased, aliasReasons, warnings, evaluations, modes: [], fitted: new Float64Array(0), residuals: new Float64Array(0),
    rowIds: design.rowIds,
  };
}
