/** Counts: Poisson with log link, variance μ (McCullagh and Nelder 1989, §6.2). No family parameter. */
import { logGamma } from '../numeric/special';
import { drawPoisson } from '../random/poisson';
import type { Stream } from '../random/stream';
import type { ResponseFamily } from './types';

export const poissonFamily: ResponseFamily = {
  name: 'poisson',
  link: 'log',
  params: [],
  linkFun: (mu: number) => Math.log(mu),
  linkInverse: (eta: number) => Math.exp(eta),
  muEta: (eta: number) => Math.exp(eta),
  variance: (mu: number) => mu,
  logDensity: (y: number, mu: number) => (mu > 0 ? y * Math.log(mu) - mu : y === 0 ? 0 : -Infinity) - logGamma(y + 1),
  draw: (mean: number, stream: Stream) => drawPoisson(stream, mean),
};
