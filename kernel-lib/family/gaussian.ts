/** The normal response: identity link, constant variance σ² (truth key `residual` = σ). */
import type { Stream } from '../random/stream';
import type { FamilyParams, ResponseFamily } from './types';

const LOG_2PI = Math.log(2 * Math.PI);

export const gaussianFamily: ResponseFamily = {
  name: 'gaussian',
  link: 'identity',
  params: ['residual'],
  linkFun: (mu: number) => mu,
  linkInverse: (eta: number) => eta,
  muEta: () => 1,
  variance: (_mu: number, params: FamilyParams) => params.residual * params.residual,
  logDensity(y: number, mu: number, params: FamilyParams): number {
    const s = params.residual;
    const z = (y - mu) / s;
    return -0.5 * (LOG_2PI + z * z) - Math.log(s);
  },
  /** y = mean + residual · z, z standard normal. */
  draw(mean: number, stream: Stream, params: FamilyParams): number {
    return mean + params.residual * stream.normal();
  },
};
