/**
 * A response family: how a response value relates to its mean. One description serves the
 * simulation (`draw`) and the fit (link, variance, log-density), so a family is added in one place
 * (`family/<name>.ts` plus its entry in `family/index.ts`; the fit adds one estimate step).
 * Generalised linear model terms as in McCullagh and Nelder (1989), Generalized Linear Models, 2nd ed., ch. 2.
 */
import type { Stream } from '../random/stream';

export type FamilyName = 'gaussian' | 'poisson' | 'binomial' | 'negative-binomial';
export type LinkName = 'identity' | 'log' | 'logit';

/** Family parameters by name, taken from the design's truth (`truth.sd.residual` for gaussian). */
export type FamilyParams = Readonly<Record<string, number>>;

export interface ResponseFamily {
  name: FamilyName;
  link: LinkName;
  /** Keys this family reads from the design's truth (gaussian: ['residual']), each required and ≥ 0. */
  params: readonly string[];
  /** η = g(μ). */
  linkFun(mu: number): number;
  /** μ = g⁻¹(η). */
  linkInverse(eta: number): number;
  /** dμ/dη at η. */
  muEta(eta: number): number;
  /** Variance of one observation given its mean μ (per trial for binomial: μ(1 − μ) on the proportion scale). */
  variance(mu: number, params: FamilyParams): number;
  /** Log density (or probability mass) of y given μ, with every constant included; `trials` for binomial (else 1). */
  logDensity(y: number, mu: number, params: FamilyParams, trials: number): number;
  /** One response value given its mean on the response scale; `trials` for binomial (else 1). */
  draw(mean: number, stream: Stream, params: FamilyParams, trials: number): number;
}
