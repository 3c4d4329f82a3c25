import { describe, expect, it } from 'vitest';
import { drawNegativeBinomial } from '../../kernel-lib/random/negative-binomial';
import { createStream } from '../../kernel-lib/random/stream';
import { countReference } from '../helpers/count-reference';
import { chiSquareFit, moments } from '../helpers/goodness-of-fit';

const tables = countReference<{ negative_binomial: { mean: number; aggregation: number; pmf: number[] }[] }>('pmf').negative_binomial;

describe('drawNegativeBinomial (gamma-Poisson)', () => {
  for (const { mean, aggregation: k, pmf } of tables) {
    it(`matches scipy.stats.nbinom.pmf(n = k, p = k/(k + μ)) at μ = ${mean}, k = ${k}`, () => {
      const s = createStream('nb-test', mean, k);
      const draws = Array.from({ length: 20000 }, () => drawNegativeBinomial(s, mean, k));
      const fit = chiSquareFit(draws, pmf);
      expect(fit.statistic).toBeLessThan(fit.critical);
      // NB2: variance μ + μ²/k (Hilbe 2011, §8.2); within 4 Monte Carlo SEs
      const m = moments(draws);
      expect(Math.abs(m.mean - mean)).toBeLessThan(4 * m.meanSe);
      expect(Math.abs(m.variance - (mean + (mean * mean) / k))).toBeLessThan(4 * m.varianceSe);
      // and the moment estimate of k, m²/(s² − m), is near k (delta-method SE from the variance SE)
      const kHat = (m.mean * m.mean) / (m.variance - m.mean);
      const kSe = ((m.mean * m.mean) / (m.variance - m.mean) ** 2) * m.varianceSe;
      expect(Math.abs(kHat - k)).toBeLessThan(4 * kSe + 0.05 * k);
    });
  }
});
