/**
 * The shared second half of every fit: from an Estimate (any family) and its design to the
 * FitResult — coefficient names, aliased rows, intervals and their df, variance-component rows,
 * flags, warnings, information criteria.
 */
import type { DesignMatrices } from '../data/design-matrices';
import type { CorrelationRow, FitResult, FixedEffectRow, VarianceComponentRow } from './result';
import type { Estimate } from './estimate/types';
import type { IntervalMethod } from '../model/interval-rule';
import { SMALL_SAMPLE_METHODS, type BootstrapSettings, type SmallSampleMethod } from './inference/intervals';
import { applyDfFloor } from './df-floor';
import { normalQuantile, studentTQuantile } from '../numeric/distributions';

export interface SummariseOptions {
  level: number;
  interval: IntervalMethod;
  bootstrap?: BootstrapSettings;
  /** Keep fitted values and residuals (the estimate step computed them when asked). */
  fitted: boolean;
}

export function summarise(design: DesignMatrices, est: Estimate, options: SummariseOptions): FitResult {
  const warnings = [...design.warnings];
  const aliasedNames = est.aliased.map((j) => design.fixedNames[j]);
  for (const name of aliasedNames) warnings.push(`not estimable: ${name}: ${est.aliasReasons[name]}`);
  warnings.push(...est.warnings);
  if (est.failure) return failedResult(design, est, warnings, aliasedNames);

  const { level } = options;
  const n = design.n;
  const p = est.estimable.length;
  const fullP = design.p;
  const fixedCov = new Float64Array(fullP * fullP).fill(NaN);
  const placeCovariance = (cov: Float64Array): void => {
    for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) fixedCov[est.estimable[a] * fullP + est.estimable[b]] = cov[a * p + b];
  };
  placeCovariance(est.betaCov);

  const method: IntervalMethod = est.exactT ? 'residual-t' : options.interval;
  // residual-t: exact for OLS (any regression text); for mixed models the simple small-sample correction
  const df = method === 'residual-t' ? est.residualDf : Infinity;
  const crit = method === 'residual-t' ? studentTQuantile(0.5 + level / 2, df) : normalQuantile(0.5 + level / 2);
  const fixed: FixedEffectRow[] = design.fixedNames.map((term) => ({
    term, estimate: NaN, se: NaN, df, lower: NaN, upper: NaN, method, aliased: true,
  }));
  est.estimable.forEach((j, a) => {
    const se = Math.sqrt(est.betaCov[a * p + a]);
    const row = fixed[j];
    row.estimate = est.beta[a];
    row.se = se;
    row.lower = est.beta[a] - crit * se;
    row.upper = est.beta[a] + crit * se;
    row.aliased = false;
  });
  let varianceIntervals: { lower: number; upper: number }[] | undefined;
  if ((SMALL_SAMPLE_METHODS as readonly string[]).includes(method)) {
    if (!est.smallSample) {
      // fitDesign checked the method against model/interval-rule: a step that the rule allows to use it must provide it
      throw new Error(`the estimate step gives no "${method}" intervals, which model/interval-rule.ts allows for this fit`);
    }
    const outcome = est.smallSample(method as SmallSampleMethod, level, options.bootstrap);
    est.estimable.forEach((j, a) => Object.assign(fixed[j], outcome.fixed[a]));
    if (outcome.fixedCov) placeCovariance(outcome.fixedCov);
    warnings.push(...outcome.warnings);
    varianceIntervals = outcome.variance;
  }
  warnings.push(...applyDfFloor(fixed));

  const random: VarianceComponentRow[] = [];
  const correlations: CorrelationRow[] = [];
  let singular = false;
  for (const { term, cov, boundary } of est.terms) {
    const k = term.terms.length;
    if (boundary) singular = true;
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
  const sigma2 = est.dispersion ?? NaN;
  if (est.dispersion !== undefined) random.push({ factor: 'residual', term: '', sd: Math.sqrt(sigma2), variance: sigma2 });
  if (varianceIntervals) random.forEach((r, i) => { r.lower = varianceIntervals![i].lower; r.upper = varianceIntervals![i].upper; });

  let residuals = new Float64Array(0);
  if (options.fitted) {
    residuals = new Float64Array(n);
    for (let i = 0; i < n; i++) residuals[i] = design.y[i] - est.fitted[i];
  }

  const parameters = p + est.theta.length + (est.dispersion === undefined ? 0 : 1) + (est.extraParameters ?? 0);
  const { logLik } = est;
  return {
    ...(est.response ? { response: est.response } : {}),
    estimation: est.estimation, observations: n, droppedRows: design.droppedRows.length, levels: { ...design.levelCounts }, fixed, fixedCov,
    random, correlations, residualSd: Math.sqrt(sigma2), logLik,
    aic: -2 * logLik + 2 * parameters, bic: -2 * logLik + Math.log(n) * parameters, parameters,
    theta: Array.from(est.theta), deviance: est.deviance, converged: est.converged, singular, failure: '', aliased: aliasedNames, aliasReasons: est.aliasReasons, warnings,
    evaluations: est.evaluations, modes: est.modes, fitted: options.fitted ? est.fitted : new Float64Array(0), residuals, rowIds: design.rowIds,
  };
}

function failedResult(design: DesignMatrices, est: Estimate, warnings: string[], aliased: string[]): FitResult {
  return {
    estimation: est.estimation, observations: design.n, droppedRows: design.droppedRows.length, levels: { ...design.levelCounts },
    fixed: design.fixedNames.map((term) => ({
      term, estimate: NaN, se: NaN, df: NaN, lower: NaN, upper: NaN, method: 'none', aliased: aliased.includes(term),
    })),
    fixedCov: new Float64Array(design.p * design.p).fill(NaN), random: [], correlations: [], residualSd: NaN,
    logLik: NaN, aic: NaN, bic: NaN, parameters: 0, theta: Array.from(est.theta), deviance: NaN, converged: false,
    singular: false, failure: est.failure, aliased, aliasReasons: est.aliasReasons, warnings, evaluations: est.evaluations, modes: [], fitted: new Float64Array(0),
    residuals: new Float64Array(0), rowIds: design.rowIds,
  };
}
