/**
 * Estimate step of the count and detection families (Poisson, binomial, negative binomial):
 * ./count-model.ts does the numbers; this turns them into the shared Estimate, adds the
 * overdispersion check and the family's own summary (link, integration, aggregation k).
 */
import type { DesignMatrices } from '../../data/design-matrices';
import type { ConditionalModeRow, ResponseSummary } from '../result';
import { estimateCountModel } from './count-model';
import { termCovariances } from './normal';
import { aliasReasons } from '../alias-reasons';
import { unboundedCoefficients } from './no-finite-maximum';
import type { CountFamily } from './glm-response';
import { countContext, countIntervals } from '../inference/count-intervals';
import type { Estimate, EstimateStep, TermCovariance } from './types';

/** Pearson χ²/df above this is reported as overdispersion (a rule of thumb: common practice, no source). */
const OVERDISPERSION_WARNING = 1.5;

export function countEstimateStep(family: CountFamily): EstimateStep {
  return (design: DesignMatrices, options): Estimate => {
    const fitOptions = {
      family, trials: design.trials, offset: design.offset, integration: options.integration, nodes: options.nodes,
      priority: options.priority, start: options.start,
    };
    const est = estimateCountModel(design, fitOptions);
    const warnings: string[] = [];
    if (!est.converged) warnings.push(`did not converge: ${est.reason || 'the optimiser stopped early'}`);
    warnings.push(...est.warnings);
    const failure = Number.isFinite(est.logLik) ? '' : est.reason || 'the likelihood could not be evaluated';
    // overdispersion: Poisson, and binomial with more than one trial (0/1 data carry no information on it)
    const applies = family === 'poisson' || (family === 'binomial' && design.trials !== undefined && design.trials.some((m) => m > 1));
    const ratio = applies && est.residualDf > 0 ? est.pearsonChi2 / est.residualDf : NaN;
    if (ratio > OVERDISPERSION_WARNING) {
      warnings.push(
        `overdispersion: Pearson χ²/df = ${ratio.toFixed(2)} (above ${OVERDISPERSION_WARNING}); the ${family} variance is too small for these data, so SEs are too small. ` +
          `Consider "family": "negative-binomial"${family === 'binomial' ? ' (counts) or' : ' or'} an observation-level random effect (a grouping factor with one level per row, as "random").`,
      );
    }
    const unbounded = unboundedCoefficients(est.cov, est.estimable.length).map((a) => design.fixedNames[est.estimable[a]]);
    if (unbounded.length > 0) {
      warnings.push(
        `no finite estimate for ${unbounded.join(', ')}: the likelihood keeps rising as ${unbounded.length === 1 ? 'it runs' : 'they run'} towards ±∞ ` +
          `(separation: a level or covariate range with only ${family === 'binomial' ? 'detections or only non-detections' : 'zero counts'}), so ${unbounded.length === 1 ? 'its' : 'their'} estimate, SE and interval are meaningless. ` +
          'Merge sparse levels, drop the term, or treat the factor as random.',
      );
    }
    const response: ResponseSummary = {
      family, link: est.link, integration: est.integration, nodes: est.nodes,
      aggregation: family === 'negative-binomial' ? est.aggregation : undefined,
      pearsonChi2: est.pearsonChi2, residualDf: est.residualDf, overdispersion: ratio,
    };
    return {
      estimation: 'ML', estimable: est.estimable, aliased: est.aliased, failure,
      aliasReasons: aliasReasons(design, est.xtx, design.p, est.estimable, est.aliased), warnings, converged: est.converged,
      evaluations: est.evaluations, theta: est.theta, deviance: -2 * est.logLik, logLik: est.logLik,
      beta: est.beta, betaCov: est.cov, residualDf: design.n - est.estimable.length, exactT: false, dispersion: undefined,
      terms: linkScaleCovariances(design, est), modes: options.modes ? modeRows(design, est) : [],
      fitted: options.fitted ? est.mu : new Float64Array(0), response,
      extraParameters: family === 'negative-binomial' ? 1 : 0,
      smallSample: (method, level, bootstrap) => countIntervals(countContext(design, fitOptions, est), method, level, bootstrap),
    };
  };
}

/** Σ = T Tᵀ per random term on the link scale (no residual variance in these families). */
function linkScaleCovariances(design: DesignMatrices, est: ReturnType<typeof estimateCountModel>): TermCovariance[] {
  if (design.random.length === 0) return [];
  if (oneIntercept(design)) {
    // the SD is theta[0]; the layout is not needed
    const sd = est.theta[0];
    return [{ term: design.random[0], cov: Float64Array.of(sd * sd), boundary: est.singular }];
  }
  if (!est.layout) return [];
  est.layout.setTheta(est.theta);
  return termCovariances(est.layout, design, 1);
}

function modeRows(design: DesignMatrices, est: ReturnType<typeof estimateCountModel>): ConditionalModeRow[] {
  if (design.random.length === 0) return [];
  if (oneIntercept(design)) {
    const term = design.random[0];
    return term.levels.map((level, l) => ({ factor: term.factor, level, term: term.terms[0], mode: est.modes[l], sd: est.modeSds[l] }));
  }
  const layout = est.layout;
  if (!layout) return [];
  const rows: ConditionalModeRow[] = [];
  for (const term of design.random) {
    const t = layout.terms[layout.termIndex.get(term)!];
    for (let l = 0; l < t.m; l++) {
      for (let i = 0; i < t.k; i++) {
        const at = t.start + l * t.k + i;
        rows.push({ factor: term.factor, level: term.levels[l], term: term.terms[i], mode: est.modes[at], sd: est.modeSds[at] });
      }
    }
  }
  return rows;
}

function oneIntercept(design: DesignMatrices): boolean {
  return design.random.length === 1 && design.random[0].terms.length === 1;
}
