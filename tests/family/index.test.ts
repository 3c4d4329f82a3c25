import { describe, expect, it } from 'vitest';
import { binomialFamily } from '../../kernel-lib/family/binomial';
import { gaussianFamily } from '../../kernel-lib/family/gaussian';
import { RESPONSE_FAMILIES, responseFamily } from '../../kernel-lib/family/index';
import { negativeBinomialFamily } from '../../kernel-lib/family/negative-binomial';
import { poissonFamily } from '../../kernel-lib/family/poisson';

describe('response family registry', () => {
  it('the registry finds families by name and nothing else', () => {
    expect(responseFamily('gaussian')).toBe(gaussianFamily);
    expect(responseFamily('toString')).toBeUndefined();
    expect(responseFamily(3)).toBeUndefined();
    expect(Object.keys(RESPONSE_FAMILIES)).toContain('gaussian');
  });

  it('lists each family under its own name, with the link of its canonical or usual form', () => {
    // canonical links: identity (normal), log (Poisson), logit (binomial); log for NB2
    // (McCullagh and Nelder 1989, Table 2.1; Hilbe 2011, §8.2)
    expect(RESPONSE_FAMILIES).toEqual({
      gaussian: gaussianFamily, poisson: poissonFamily, binomial: binomialFamily, 'negative-binomial': negativeBinomialFamily,
    });
    for (const [name, family] of Object.entries(RESPONSE_FAMILIES)) {
      expect(family!.name).toBe(name);
      expect(responseFamily(name)).toBe(family);
    }
    expect([gaussianFamily, poissonFamily, binomialFamily, negativeBinomialFamily].map((f) => f.link)).toEqual(['identity', 'log', 'logit', 'log']);
  });
});
