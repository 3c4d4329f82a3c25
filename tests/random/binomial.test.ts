import { describe, expect, it } from 'vitest';
import { drawBinomial } from '../../kernel-lib/random/binomial';
import { createStream } from '../../kernel-lib/random/stream';
import { countReference } from '../helpers/count-reference';
import { chiSquareFit, moments } from '../helpers/goodness-of-fit';

const tables = countReference<{ binomial: { trials: number; probability: number; pmf: number[] }[] }>('pmf').binomial;

describe('drawBinomial', () => {
  // Inversion (n·p < 10), BTRS (n·p ≥ 10) and the p > ½ reflection are all covered by the cases.
  for (const { trials, probability, pmf } of tables) {
    it(`matches scipy.stats.binom.pmf at n = ${trials}, p = ${probability} (chi-square at 0.999)`, () => {
      const s = createStream('binomial-test', trials, probability);
      const draws = Array.from({ length: 20000 }, () => drawBinomial(s, trials, probability));
      expect(Math.max(...draws)).toBeLessThanOrEqual(trials);
      expect(Math.min(...draws)).toBeGreaterThanOrEqual(0);
      const fit = chiSquareFit(draws, pmf);
      expect(fit.statistic).toBeLessThan(fit.critical);
      // mean np and variance np(1 − p) (textbook identity), within 4 Monte Carlo SEs
      const m = moments(draws);
      expect(Math.abs(m.mean - trials * probability)).toBeLessThan(4 * m.meanSe);
      expect(Math.abs(m.variance - trials * probability * (1 - probability))).toBeLessThan(4 * m.varianceSe + 1e-12);
    });
  }

  it('handles the edges and rejects bad arguments', () => {
    const s = createStream('edges');
    expect(drawBinomial(s, 0, 0.4)).toBe(0);
    expect(drawBinomial(s, 7, 0)).toBe(0);
    expect(drawBinomial(s, 7, 1)).toBe(7);
    expect(() => drawBinomial(s, 2.5, 0.3)).toThrow(RangeError);
    expect(() => drawBinomial(s, 3, 1.2)).toThrow(RangeError);
  });
});
