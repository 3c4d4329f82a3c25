/**
 * Detections: y successes out of `trials` (1 for presence/absence), logit link; μ is the success
 * probability and the variance per trial μ(1 − μ) (McCullagh and Nelder 1989, §4.2). No family parameter.
 */
import { logGamma } from '../numeric/special';
import { drawBinomial } from '../random/binomial';
import type { Stream } from '../random/stream';
import type { FamilyParams, ResponseFamily } from './types';

export const binomialFamily: ResponseFamily = {
  name: 'binomial',
  link: 'logit',
  params: [],
  linkFun: (mu: number) => Math.log(mu / (1 - mu)),
  linkInverse: (eta: number) => (eta >= 0 ? 1 / (1 + Math.exp(-eta)) : Math.exp(eta) / (1 + Math.exp(eta))),
  muEta(eta: number): number {
    const p = binomialFamily.linkInverse(eta);
    return p * (1 - p);
  },
  variance: (mu: number) => mu * (1 - mu),
  logDensity(y: number, mu: number, _params: FamilyParams, trials: number): number {
    const c = logGamma(trials + 1) - logGamma(y + 1) - logGamma(trials - y + 1);
    const a = y > 0 ? y * Math.log(mu) : 0;
    const b = trials - y > 0 ? (trials - y) * Math.log1p(-mu) : 0;
    return c + a + b;
  },
  draw: (mean: number, stream: Stream, _params: FamilyParams, trials: number) => drawBinomial(stream, trials, mean),
};
