/**
 * Estimate step of normal responses: the profiled REML/ML criterion through penalised least
 * squares (Bates et al. 2015, J. Stat. Softw. 67(1), §3), or ordinary least squares when the
 * design has no random terms. Never throws for numerical trouble.
 */
import type { DesignMatrices } from '../../data/design-matrices';
import type { ConditionalModeRow } from '../result';
import { aliasReasons } from '../alias-reasons';
import { degenerateReason } from '../degenerate';
import { ProfiledDeviance, conditionalVarianceFactor } from '../profiled-deviance';
import { optimiseTheta, BOUNDARY_TOLERANCE } from '../optimise-theta';
import { smallSampleIntervals } from '../inference/intervals';
import type { Estimate, EstimateOptions, TermCovariance } from './types';

export function estimateNormal(design: DesignMatrices, options: EstimateOptions): Estimate {
  const warnings: string[] = [];
  const ols = design.random.length === 0;
  const estimation = ols ? 'OLS' : options.estimation;
  const degenerate = degenerateReason(design);
  if (degenerate) {
    return {
      estimation, estimable: [], aliased: [], aliasReasons: {}, warnings: [degenerate], evaluations: 0, theta: new Float64Array(0),
      residualDf: NaN, exactT: ols, failure: degenerate, converged: false, deviance: NaN, logLik: NaN, beta: new Float64Array(0),
      betaCov: new Float64Array(0), dispersion: undefined, terms: [], modes: [], fitted: new Float64Array(0),
    };
  }
  // the engine kept for this design object: X and Z products, estimable columns and workspaces are reused
  const reml = estimation === 'REML';
  let dev = ProfiledDeviance.acquire(design, reml);
  const { alias, reduced } = dev.estimableColumns(options.priority);
  const reasons = aliasReasons(design, dev.crossProducts(), design.p + 1, alias.estimable, alias.aliased);
  if (reduced !== design) {
    dev.release();
    dev = ProfiledDeviance.acquire(reduced, reml);
  }
  const { n, p } = reduced;

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
  const base = {
    estimation, estimable: alias.estimable, aliased: alias.aliased, aliasReasons: reasons, warnings, evaluations, theta,
    residualDf: n - p, exactT: ols,
  } as const;
  const ok = Number.isFinite(deviance) && dev.factor(theta);
  if (!ok) {
    const why = dev.lastFailure || 'the criterion could not be evaluated';
    if (!warnings.some((w) => w.includes(why))) warnings.push(`fit failed: ${why}`);
    dev.release();
    return {
      ...base, failure: why, converged: false, deviance: NaN, logLik: NaN, beta: new Float64Array(0), betaCov: new Float64Array(0),
      dispersion: undefined, terms: [], modes: [], fitted: new Float64Array(0),
    };
  }

  // σ²: REML and OLS divide by n − p, ML by n
  const sigma2 = dev.penalisedRss() / (estimation === 'ML' ? n : n - p);
  const beta = dev.beta();
  const betaCov = dev.unscaledFixedCovariance();
  for (let a = 0; a < p * p; a++) betaCov[a] = sigma2 * betaCov[a];
  const generation = dev.generation;
  const smallSample: Estimate['smallSample'] = ols
    ? undefined
    : (method, level, bootstrap) => {
        // the summarise step calls this after the engine went back: use it only if no other fit took it since
        let engine = dev;
        if (engine.inUse || engine.generation !== generation) {
          engine = new ProfiledDeviance(reduced, reml);
          engine.factor(theta);
        }
        engine.inUse = true;
        try {
          return smallSampleIntervals({ design: reduced, dev: engine, estimation: estimation as 'REML' | 'ML', theta, sigma2, beta, columns: alias.estimable }, method, level, bootstrap);
        } finally {
          engine.inUse = false;
        }
      };

  let modes: ConditionalModeRow[] = [];
  let fitted = new Float64Array(0);
  if ((options.modes || options.fitted) && !ols) {
    const { b } = dev.randomEffects(beta);
    if (options.modes) modes = conditionalModes(dev, b, sigma2, design);
    if (options.fitted) {
      fitted = linearPredictor(reduced, beta);
      for (const t of dev.terms) {
        const { index, values } = t.term;
        for (let i = 0; i < n; i++) {
          const start = t.start + index[i] * t.k;
          let s = 0;
          for (let j = 0; j < t.k; j++) s += values[i * t.k + j] * b[start + j];
          fitted[i] += s;
        }
      }
    }
  } else if (options.fitted) {
    fitted = linearPredictor(reduced, beta);
  }

  const terms = termCovariances(dev, design, sigma2);
  dev.release();
  return {
    ...base, failure: '', converged, deviance, logLik: -deviance / 2, beta, betaCov, dispersion: sigma2, terms, modes, fitted, smallSample,
  };
}

/** Σ = σ² T Tᵀ per random term, in the design's term order (count families: σ² = 1, Σ on the link scale). */
export function termCovariances(dev: ProfiledDeviance, design: DesignMatrices, sigma2: number): TermCovariance[] {
  return design.random.map((term) => {
    const s = dev.termIndex.get(term)!;
    const T = dev.templates[s];
    const k = dev.terms[s].k;
    const cov = new Float64Array(k * k);
    let boundary = false;
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let sum = 0;
        for (let c = 0; c <= Math.min(i, j); c++) sum += T[i * k + c] * T[j * k + c];
        cov[i * k + j] = sigma2 * sum;
      }
      if (T[i * k + i] < BOUNDARY_TOLERANCE) boundary = true;
    }
    return { term, cov, boundary };
  });
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
        const v = conditionalVarianceFactor(T, blk, l, k, i);
        rows.push({ factor: term.factor, level: term.levels[l], term: term.terms[i], mode: b[t.start + l * k + i], sd: Math.sqrt(sigma2 * v) });
      }
    }
  }
  return rows;
}
