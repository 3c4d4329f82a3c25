import { describe, expect, it } from 'vitest';
import { drawPoisson } from '../../kernel-lib/random/poisson';
import { createStream } from '../../kernel-lib/random/stream';
import { countReference } from '../helpers/count-reference';
import { chiSquareFit, moments } from '../helpers/goodness-of-fit';

const tables = countReference<{ poisson: { mean: number; pmf: number[] }[] }>('pmf').poisson;

describe('drawPoisson', () => {
  // Both branches: inversion below mean 10, PTRS (Hörmann 1993) from 10 on.
  for (const { mean, pmf } of tables) {
    it(`matches scipy.stats.poisson.pmf at mean ${mean} (chi-square at 0.999)`, () => {
      const s = createStream('poisson-test', mean);
      const draws = Array.from({ length: 20000 }, () => drawPoisson(s, mean));
      const fit = chiSquareFit(draws, pmf);
      expect(fit.statistic).toBeLessThan(fit.critical);
      // mean = variance = λ (textbook identity), within 4 Monte Carlo SEs
      const m = moments(draws);
      expect(Math.abs(m.mean - mean)).toBeLessThan(4 * m.meanSe);
      expect(Math.abs(m.variance - mean)).toBeLessThan(4 * m.varianceSe);
    });
  }

  it('gives 0 for mean 0, the same values for the same key, and rejects a negative mean', () => {
    expect(drawPoisson(createStream('p'), 0)).toBe(0);
    const a = createStream('same');
    const b = createStream('same');
    for (let i = 0; i < 50; i++) expect(drawPoisson(a, 25)).toBe(drawPoisson(b, 25));
    expect(() => drawPoisson(createStream('p'), -1)).toThrow(RangeError);
  });
});
