import { describe, expect, it } from 'vitest';
import { poissonFamily } from '../../kernel-lib/family/poisson';
import { drawPoisson } from '../../kernel-lib/random/poisson';
import { createStream } from '../../kernel-lib/random/stream';

describe('poisson family', () => {
  it('log-density equals the Poisson log pmf with all constants', () => {
    // scipy 1.10.1 (Debian): scipy.stats.poisson.logpmf(3, 2.5), logpmf(0, 0.01), logpmf(40, 25.3)
    expect(poissonFamily.logDensity(3, 2.5, {}, 1)).toBeCloseTo(-1.5428872736055896, 12);
    expect(poissonFamily.logDensity(0, 0.01, {}, 1)).toBeCloseTo(-0.01, 14);
    expect(poissonFamily.logDensity(40, 25.3, {}, 1)).toBeCloseTo(-6.388463885418407, 11);
  });

  it('a mean of 0 puts all mass on 0', () => {
    // scipy 1.10.1: poisson.logpmf(0, 0.0) = 0.0, poisson.logpmf(2, 0.0) = -inf
    expect(poissonFamily.logDensity(0, 0, {}, 1)).toBeCloseTo(0, 14);
    expect(poissonFamily.logDensity(2, 0, {}, 1)).toBe(-Infinity);
  });

  it('log link, its inverse, dμ/dη = μ and variance μ (McCullagh and Nelder 1989, Table 2.1)', () => {
    for (const mu of [0.05, 1, 7.5]) {
      const eta = poissonFamily.linkFun(mu);
      expect(eta).toBeCloseTo(Math.log(mu), 15);
      expect(poissonFamily.linkInverse(eta)).toBeCloseTo(mu, 13);
      expect(poissonFamily.muEta(eta)).toBeCloseTo(mu, 13);
      expect(poissonFamily.variance(mu, {})).toBe(mu);
    }
    expect(poissonFamily.params).toEqual([]);
  });

  it('draws with the Poisson sampler from the given stream', () => {
    const a = createStream(11, 'family-poisson');
    const b = createStream(11, 'family-poisson');
    for (const mean of [0.3, 4, 60]) expect(poissonFamily.draw(mean, a, {}, 1)).toBe(drawPoisson(b, mean));
  });
});
