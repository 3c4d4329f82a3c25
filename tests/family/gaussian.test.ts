import { describe, expect, it } from 'vitest';
import { gaussianFamily } from '../../kernel-lib/family/gaussian';
import { createStream } from '../../kernel-lib/random/stream';

describe('gaussian family', () => {
  it('log-density equals the normal log pdf with all constants', () => {
    // scipy 1.10 (Debian): scipy.stats.norm.logpdf(1.3, loc=0.4, scale=2.5), norm.logpdf(-7, loc=2, scale=0.3)
    expect(gaussianFamily.logDensity(1.3, 0.4, { residual: 2.5 }, 1)).toBeCloseTo(-1.9000292650788277, 12);
    expect(gaussianFamily.logDensity(-7, 2, { residual: 0.3 }, 1)).toBeCloseTo(-449.7149657288787, 9);
  });

  it('identity link: g, its inverse and dμ/dη; variance is σ² whatever the mean', () => {
    // identity link and constant variance (McCullagh and Nelder 1989, Table 2.1)
    for (const v of [-3.5, 0, 2.25]) {
      expect(gaussianFamily.linkFun(v)).toBe(v);
      expect(gaussianFamily.linkInverse(v)).toBe(v);
      expect(gaussianFamily.muEta(v)).toBe(1);
      expect(gaussianFamily.variance(v, { residual: 1.5 })).toBe(2.25);
    }
  });

  it('draws mean + σ·z from the stream: the same stream gives the same values', () => {
    const a = createStream(7, 'family');
    const b = createStream(7, 'family');
    const z = b.normal();
    expect(gaussianFamily.draw(10, a, { residual: 2 }, 1)).toBe(10 + 2 * z);
  });
});
