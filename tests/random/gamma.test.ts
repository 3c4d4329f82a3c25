import { describe, expect, it } from 'vitest';
import { drawGamma } from '../../kernel-lib/random/gamma';
import { createStream } from '../../kernel-lib/random/stream';
import { regularizedGamma } from '../../kernel-lib/numeric/special';
import { moments } from '../helpers/goodness-of-fit';

describe('drawGamma (Marsaglia and Tsang 2000)', () => {
  for (const [shape, scale] of [[0.4, 2], [1, 1], [3.7, 0.5], [50, 0.1]]) {
    it(`has mean shape·scale and variance shape·scale² at shape ${shape} (within 4 Monte Carlo SEs)`, () => {
      const s = createStream('gamma-test', shape);
      const draws = Array.from({ length: 40000 }, () => drawGamma(s, shape, scale));
      const m = moments(draws);
      // Gamma moments: textbook identity (Johnson, Kotz and Balakrishnan 1994, ch. 17)
      expect(Math.abs(m.mean - shape * scale)).toBeLessThan(4 * m.meanSe);
      expect(Math.abs(m.variance - shape * scale * scale)).toBeLessThan(4 * m.varianceSe);
      // distribution: share below the median-ish point shape·scale equals P(shape, shape) (regularised gamma)
      const below = draws.filter((d) => d < shape * scale).length / draws.length;
      const expected = regularizedGamma(shape, shape).p;
      expect(Math.abs(below - expected)).toBeLessThan(4 * Math.sqrt((expected * (1 - expected)) / draws.length));
    });
  }

  it('rejects a non-positive shape', () => {
    expect(() => drawGamma(createStream('g'), 0, 1)).toThrow(RangeError);
  });
});
