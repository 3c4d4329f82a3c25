/**
 * Overdispersed counts: negative binomial NB2 with log link, variance μ + μ²/k, where k is the
 * aggregation parameter (truth key `aggregation`; small k = strongly clumped counts). Hilbe 2011,
 * Negative Binomial Regression, 2nd ed., §8.2.
 */
import { logGamma } from '../numeric/special';
import { drawNegativeBinomial } from '../random/negative-binomial';
import type { Stream } from '../random/stream';
import type { FamilyParams, ResponseFamily } from './types';

export const negativeBinomialFamily: ResponseFamily = {
  name: 'negative-binomial',
  link: 'log',
  params: ['aggregation'],
  linkFun: (mu: number) => Math.log(mu),
  linkInverse: (eta: number) => Math.exp(eta),
  muEta: (eta: number) => Math.exp(eta),
  variance: (mu: number, params: FamilyParams) => mu + (mu * mu) / params.aggregation,
  logDensity(y: number, mu: number, params: FamilyParams): number {
    const k = params.aggregation;
    return logGamma(y + k) - logGamma(k) - logGamma(y + 1) - k * Math.log1p(mu / k) + (y > 0 ? y * Math.log(mu / (k + mu)) : 0);
  },
  draw: (mean: number, stream: Stream, params: FamilyParams) => drawNegativeBinomial(stream, mean, params.aggregation),
};
