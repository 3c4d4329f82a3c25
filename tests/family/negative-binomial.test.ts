import { describe, expect, it } from 'vitest';
import { negativeBinomialFamily as nb } from '../../kernel-lib/family/negative-binomial';
import { drawNegativeBinomial } from '../../kernel-lib/random/negative-binomial';
import { createStream } from '../../kernel-lib/random/stream';

// NB2 with mean μ and aggregation k is scipy's nbinom(n = k, p = k/(k + μ)) (Hilbe 2011, §8.2).
describe('negative binomial family', () => {
  it('log-density equals the negative binomial log pmf with all constants', () => {
    // scipy 1.10.1 (Debian): stats.nbinom.logpmf(y, k, k/(k+mu)) at (y, μ, k) =
    // (0, 3.2, 0.7), (5, 3.2, 0.7), (12, 4.0, 50.0), (2, 0.5, 2.5)
    expect(nb.logDensity(0, 3.2, { aggregation: 0.7 }, 1)).toBeCloseTo(-1.2023560479520332, 12);
    expect(nb.logDensity(5, 3.2, { aggregation: 0.7 }, 1)).toBeCloseTo(-2.955876098883765, 12);
    expect(nb.logDensity(12, 4.0, { aggregation: 50 }, 1)).toBeCloseTo(-6.894239436300836, 11);
    expect(nb.logDensity(2, 0.5, { aggregation: 2.5 }, 1)).toBeCloseTo(-2.563416310631419, 12);
  });

  it('approaches the Poisson as k grows (Hilbe 2011, §8.2)', () => {
    // scipy 1.10.1: stats.nbinom.logpmf(3, k, k/(k+2.5)) for k = 1e3 and 1e5; poisson.logpmf(3, 2.5) = -1.5428872736055896
    expect(nb.logDensity(3, 2.5, { aggregation: 1e3 }, 1)).toBeCloseTo(-1.544260609792662, 11);
    expect(nb.logDensity(3, 2.5, { aggregation: 1e5 }, 1)).toBeCloseTo(-1.5429010235106055, 9);
    expect(Math.abs(nb.logDensity(3, 2.5, { aggregation: 1e5 }, 1) - -1.5428872736055896)).toBeLessThan(1e-4);
  });

  it('variance μ + μ²/k, log link', () => {
    // scipy 1.10.1: stats.nbinom.var(2.5, 2.5/(2.5+4.0)) = 10.4 (μ = 4, k = 2.5)
    expect(nb.variance(4, { aggregation: 2.5 })).toBeCloseTo(10.4, 13);
    expect(nb.linkInverse(nb.linkFun(4))).toBeCloseTo(4, 14);
    expect(nb.muEta(Math.log(4))).toBeCloseTo(4, 14);
    expect(nb.params).toEqual(['aggregation']);
    // mean 0 puts all mass on 0
    expect(nb.logDensity(0, 0, { aggregation: 1.5 }, 1)).toBeCloseTo(0, 14);
    expect(nb.logDensity(1, 0, { aggregation: 1.5 }, 1)).toBe(-Infinity);
  });

  it('draws with the negative binomial sampler from the given stream', () => {
    const a = createStream(3, 'family-nb');
    const b = createStream(3, 'family-nb');
    for (const [mu, k] of [[0.4, 0.5], [6, 2], [30, 80]]) expect(nb.draw(mu, a, { aggregation: k }, 1)).toBe(drawNegativeBinomial(b, mu, k));
  });
});
