import { describe, expect, it } from 'vitest';
import type { ModelSpec } from '../../kernel-lib/model/types';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { responseScale } from '../../kernel-lib/fit/response-scale';
import { testRandom } from '../helpers/simple-design';

function survey(seed: number, scale: number) {
  const rng = testRandom(seed);
  const out: { site: string; x: number; y: number }[] = [];
  for (let s = 0; s < 6; s++) {
    const b = rng.normal();
    for (let i = 0; i < 4; i++) {
      const x = rng.normal();
      out.push({ site: `s${s}`, x, y: (5 + 2 * x + b + 0.7 * rng.normal()) * scale });
    }
  }
  return out;
}
const model: ModelSpec = { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }], interval: 'satterthwaite' };

describe('responses of extreme magnitude', () => {
  it('scales only beyond 2^±200, by a power of two', () => {
    expect(responseScale(Float64Array.of(1, -3e5))).toBe(1);
    expect(responseScale(Float64Array.of(1e300))).toBe(2 ** -997);
    expect(responseScale(Float64Array.of(0, 1e-300))).toBe(2 ** 997);
  });

  for (const c of [1e300, 1e-300]) {
    it(`a response ×${c} gives the fit of the unscaled response ×${c}`, () => {
      // Identity: Gaussian (RE)ML is scale-equivariant: estimates, SEs, bounds and SDs scale by c, the df
      // are unchanged, and the log-likelihood moves by −(n − p)·ln c for REML (density of n − p error
      // contrasts; Harville 1974).
      const ref = fitModel(survey(3, 1), model);
      const fit = fitModel(survey(3, c), model);
      expect(fit.failure).toBe('');
      fit.fixed.forEach((r, j) => {
        for (const k of ['estimate', 'se', 'lower', 'upper'] as const) expect(r[k] / c).toBeCloseTo(ref.fixed[j][k], 6);
        expect(r.df).toBeCloseTo(ref.fixed[j].df, 4);
      });
      fit.random.forEach((r, j) => expect(r.sd / c).toBeCloseTo(ref.random[j].sd, 6));
      expect(fit.logLik).toBeCloseTo(ref.logLik - (24 - 2) * Math.log(c), 5);
      expect(fit.aic).toBeCloseTo(-2 * fit.logLik + 2 * fit.parameters, 6);
    });
  }
});
