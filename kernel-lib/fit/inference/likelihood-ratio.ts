/**
 * Likelihood-ratio test between two nested models fitted by maximum likelihood (Wilks 1938,
 * Ann. Math. Statist. 9:60): 2(ℓ_larger − ℓ_smaller) against chi-square with the difference in
 * parameter counts. When the larger model adds one random effect, the null value (variance 0) is
 * on the boundary and the reference distribution is the 50:50 mixture of χ²_c and χ²_{c+1}, c the
 * covariances added with it (Self and Liang 1987, JASA 82:605; Stram and Lee 1994, Biometrics 50:1171);
 * that p-value is reported as well.
 */
import type { FitResult } from '../result';
import { QuadratInputError } from '../../model/errors';
import { chiSquareSurvival } from '../../numeric/distributions';

export interface LikelihoodRatioTest {
  statistic: number;
  df: number;
  /** Chi-square p-value (conservative when variance components are tested). */
  pValue: number;
  /** Boundary-corrected p-value when exactly one random effect is added; NaN otherwise. */
  pValueMixture: number;
  /** Which argument is the smaller (null) model. */
  smaller: 'fitA' | 'fitB';
  notes: string[];
}

const key = (factor: string, term: string) => `${factor}\u0000${term}`;

function components(fit: FitResult): Set<string> {
  return new Set(fit.random.filter((r) => r.factor !== 'residual').map((r) => key(r.factor, r.term)));
}

function correlations(fit: FitResult): Set<string> {
  return new Set(fit.correlations.map((c) => key(c.factor, [...c.terms].sort().join('\u0000'))));
}

function estimable(fit: FitResult): Set<string> {
  return new Set(fit.fixed.filter((r) => !r.aliased).map((r) => r.term));
}

function missingFrom(small: Set<string>, large: Set<string>): string[] {
  // eslint-disable-next-line no-control-regex -- NUL joins the parts of a key, as built above
  return [...small].filter((x) => !large.has(x)).map((x) => x.replace(/\u0000/g, ':'));
}

/** Test the smaller of two nested ML fits of the same response against the larger. */
export function likelihoodRatioTest(fitA: FitResult, fitB: FitResult): LikelihoodRatioTest {
  for (const [name, fit] of [['fitA', fitA], ['fitB', fitB]] as const) {
    if (fit.failure) throw new QuadratInputError(`likelihoodRatioTest: ${name} produced no estimates (${fit.failure})`, { field: name });
    if (fit.estimation === 'REML') {
      throw new QuadratInputError(
        `likelihoodRatioTest: ${name} was fitted by REML; REML criteria of models with different fixed effects are not comparable. ` +
          'Fit both models with model.estimation "ML"', { field: `${name}.estimation` });
    }
  }
  if (fitA.observations !== fitB.observations || (fitA.rowIds.length && fitB.rowIds.length && fitA.rowIds.some((r, i) => r !== fitB.rowIds[i]))) {
    throw new QuadratInputError(`likelihoodRatioTest: the fits use different rows (${fitA.observations} and ${fitB.observations} observations); fit both models to the same complete rows`, { field: 'fitB' });
  }
  if (fitA.fitted.length && fitB.fitted.length) {
    for (let i = 0; i < fitA.fitted.length; i++) {
      const ya = fitA.fitted[i] + fitA.residuals[i];
      const yb = fitB.fitted[i] + fitB.residuals[i];
      if (Math.abs(ya - yb) > 1e-8 * Math.max(1, Math.abs(ya))) {
        throw new QuadratInputError(`likelihoodRatioTest: the fits are of different responses (observation ${i + 1}: ${ya} and ${yb})`, { field: 'fitB' });
      }
    }
  }
  if (fitA.parameters === fitB.parameters) {
    throw new QuadratInputError(`likelihoodRatioTest: both models have ${fitA.parameters} parameters, so neither is nested in the other`, { field: 'fitB' });
  }
  const [small, large, smaller] = fitA.parameters < fitB.parameters ? [fitA, fitB, 'fitA' as const] : [fitB, fitA, 'fitB' as const];
  const larger = smaller === 'fitA' ? 'fitB' : 'fitA';
  const problems = [
    ...missingFrom(estimable(small), estimable(large)).map((t) => `coefficient ${t}`),
    ...missingFrom(components(small), components(large)).map((t) => `random effect ${t}`),
    ...missingFrom(correlations(small), correlations(large)).map((t) => `correlation ${t}`),
  ];
  if (problems.length) {
    throw new QuadratInputError(`likelihoodRatioTest: ${smaller} is not nested in ${larger}: ${larger} lacks ${problems.join(', ')} (compared by name)`, { field: smaller });
  }
  const notes: string[] = [];
  let statistic = 2 * (large.logLik - small.logLik);
  if (statistic < 0) {
    if (statistic < -1e-6) notes.push(`the larger model's log-likelihood is below the smaller's by ${(-statistic / 2).toPrecision(3)}: an optimisation problem; the statistic is set to 0`);
    statistic = 0;
  }
  const df = large.parameters - small.parameters;
  const pValue = chiSquareSurvival(statistic, df);
  const addedEffects = missingFrom(components(large), components(small));
  const addedCorrelations = missingFrom(correlations(large), correlations(small)).length;
  const addedFixed = missingFrom(estimable(large), estimable(small)).length;
  let pValueMixture = NaN;
  if (addedEffects.length === 1 && addedFixed === 0 && df === 1 + addedCorrelations) {
    const c = addedCorrelations;
    pValueMixture = 0.5 * (c === 0 ? (statistic > 0 ? 0 : 1) : chiSquareSurvival(statistic, c)) + 0.5 * chiSquareSurvival(statistic, c + 1);
    notes.push(`a variance of 0 (${addedEffects[0]}) is on the boundary: pValueMixture refers the statistic to the 50:50 mixture of χ²(${c}) and χ²(${c + 1})`);
  } else if (addedEffects.length) {
    notes.push('variance components are tested on the boundary of their range: the chi-square p-value is conservative');
  }
  return { statistic, df, pValue, pValueMixture, smaller, notes };
}
