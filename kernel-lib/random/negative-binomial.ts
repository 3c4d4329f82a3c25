/**
 * Negative binomial (NB2) variates as a gamma-Poisson mixture: λ ~ Gamma(k, mean/k), y ~ Poisson(λ),
 * so E y = mean and var y = mean + mean²/k (Greenwood and Yule 1920, J. R. Stat. Soc. 83:255;
 * Devroye 1986, §X.4.7).
 */
import { drawGamma } from './gamma';
import { drawPoisson } from './poisson';
import type { Stream } from './stream';

/** One NB2 variate with the given mean and aggregation k (k = Infinity gives Poisson). */
export function drawNegativeBinomial(stream: Stream, mean: number, aggregation: number): number {
  if (!(aggregation > 0)) throw new RangeError(`drawNegativeBinomial: aggregation must be positive, got ${aggregation}`);
  if (!(mean >= 0) || !Number.isFinite(mean)) throw new RangeError(`drawNegativeBinomial: mean must be finite and ≥ 0, got ${mean}`);
  if (mean === 0) return 0;
  if (aggregation === Infinity) return drawPoisson(stream, mean);
  return drawPoisson(stream, drawGamma(stream, aggregation, mean / aggregation));
}
