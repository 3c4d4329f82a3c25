import { describe, expect, it } from 'vitest';
import { binomialFamily } from '../../kernel-lib/family/binomial';
import { drawBinomial } from '../../kernel-lib/random/binomial';
import { createStream } from '../../kernel-lib/random/stream';

describe('binomial family', () => {
  it('log-density equals the binomial log pmf with all constants', () => {
    // scipy 1.10.1 (Debian): scipy.stats.binom.logpmf(3, 10, 0.27), logpmf(0, 1, 0.9),
    // logpmf(1, 1, 0.9), logpmf(17, 40, 0.5)
    expect(binomialFamily.logDensity(3, 0.27, {}, 10)).toBeCloseTo(-1.343483431047142, 12);
    expect(binomialFamily.logDensity(0, 0.9, {}, 1)).toBeCloseTo(-2.302585092994046, 13);
    expect(binomialFamily.logDensity(1, 0.9, {}, 1)).toBeCloseTo(-0.10536051565782628, 14);
    expect(binomialFamily.logDensity(17, 0.5, {}, 40)).toBeCloseTo(-2.516996525541696, 11);
  });

  it('probabilities of 0 and 1 give finite certainties, not NaN', () => {
    // scipy 1.10.1: binom.logpmf(5, 5, 1.0) = 0.0, binom.logpmf(0, 5, 0.0) = 0.0
    expect(binomialFamily.logDensity(5, 1, {}, 5)).toBeCloseTo(0, 14);
    expect(binomialFamily.logDensity(0, 0, {}, 5)).toBeCloseTo(0, 14);
    expect(binomialFamily.logDensity(4, 1, {}, 5)).toBe(-Infinity);
  });

  it('logit link and a stable inverse in both tails', () => {
    // scipy 1.10.1: scipy.special.expit(2.3), expit(-40.0), expit(-800.0), logit(0.27)
    expect(binomialFamily.linkInverse(2.3)).toBeCloseTo(0.9088770389851438, 15);
    expect(binomialFamily.linkInverse(-40) / 4.248354255291589e-18).toBeCloseTo(1, 12);
    expect(binomialFamily.linkInverse(-800)).toBe(0);
    expect(binomialFamily.linkInverse(800)).toBe(1);
    expect(binomialFamily.linkFun(0.27)).toBeCloseTo(-0.9946225751440619, 14);
  });

  it('dμ/dη = μ(1 − μ) and variance per trial μ(1 − μ) (McCullagh and Nelder 1989, Table 2.1)', () => {
    for (const eta of [-3, 0, 1.7]) {
      const mu = binomialFamily.linkInverse(eta);
      expect(binomialFamily.muEta(eta)).toBeCloseTo(mu * (1 - mu), 15);
      // derivative by central difference (identity check)
      const h = 1e-5;
      expect(binomialFamily.muEta(eta)).toBeCloseTo((binomialFamily.linkInverse(eta + h) - binomialFamily.linkInverse(eta - h)) / (2 * h), 9);
    }
    expect(binomialFamily.variance(0.27, {})).toBeCloseTo(0.27 * 0.73, 15);
    expect(binomialFamily.muEta(0)).toBe(0.25);
  });

  it('draws with the binomial sampler from the given stream, out of `trials`', () => {
    const a = createStream(5, 'family-binomial');
    const b = createStream(5, 'family-binomial');
    for (const [p, n] of [[0.2, 1], [0.6, 12], [0.05, 300]]) expect(binomialFamily.draw(p, a, {}, n)).toBe(drawBinomial(b, n, p));
  });
});
