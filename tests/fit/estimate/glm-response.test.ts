import { describe, expect, it } from 'vitest';
import { GlmResponse, type CountFamily } from '../../../kernel-lib/fit/estimate/glm-response';
import { countReference } from '../../helpers/count-reference';

describe('GlmResponse', () => {
  it('log-likelihood with every constant equals the log of the scipy pmf tables', () => {
    // scipy.stats.{poisson,binom,nbinom}.pmf (data/reference/counts/pmf.json)
    const t = countReference('pmf');
    const pois = t.poisson[1];
    const r = new GlmResponse('poisson', 3);
    r.setResponse([0, 3, 7]);
    const eta = new Float64Array(3).fill(Math.log(pois.mean));
    expect(Math.abs(r.logLik(eta, 1) - (Math.log(pois.pmf[0]) + Math.log(pois.pmf[3]) + Math.log(pois.pmf[7])))).toBeLessThan(1e-12);
    const bin = t.binomial[2]; // n = 20, p = 0.45
    const b = new GlmResponse('binomial', 2, Float64Array.of(bin.trials, bin.trials));
    b.setResponse([4, 13]);
    const logit = Math.log(bin.probability / (1 - bin.probability));
    expect(Math.abs(b.logLik(Float64Array.of(logit, logit), 1) - Math.log(bin.pmf[4] * bin.pmf[13]))).toBeLessThan(1e-11);
    const nb = t.negative_binomial[1]; // μ = 5, k = 2
    const g = new GlmResponse('negative-binomial', 2);
    g.setResponse([0, 11]);
    const e = Math.log(nb.mean);
    expect(Math.abs(g.logLik(Float64Array.of(e, e), nb.aggregation) - Math.log(nb.pmf[0] * nb.pmf[11]))).toBeLessThan(1e-11);
  });

  it('score and observed weight are the first and minus second derivatives in η (central differences)', () => {
    // identity: s = ∂ℓ/∂η, w = −∂²ℓ/∂η² (McCullagh and Nelder 1989, §2.5), checked numerically
    const cases: [CountFamily, number, number][] = [['poisson', 4, 0.7], ['binomial', 3, -0.4], ['negative-binomial', 9, 1.6]];
    for (const [family, y, eta0] of cases) {
      const r = new GlmResponse(family, 1, Float64Array.of(5));
      r.setResponse([y]);
      const ll = (e: number) => r.logLik(Float64Array.of(e), 2.5);
      const h = 1e-4;
      const s = new Float64Array(1);
      const w = new Float64Array(1);
      r.kernel(Float64Array.of(eta0), 2.5, 0, 1, null, s, w, null);
      expect(Math.abs(s[0] - (ll(eta0 + h) - ll(eta0 - h)) / (2 * h))).toBeLessThan(1e-7);
      expect(Math.abs(w[0] + (ll(eta0 + h) - 2 * ll(eta0) + ll(eta0 - h)) / (h * h))).toBeLessThan(1e-5);
    }
  });

  it('weightSlope is the derivative of the observed weight in η (central differences)', () => {
    // identity: d w/dη with w = −∂²ℓ/∂η², checked numerically (common practice, no source)
    const cases: [CountFamily, number, number][] = [['poisson', 4, 0.7], ['binomial', 3, -0.4], ['binomial', 1, 1.3], ['negative-binomial', 9, 1.6], ['negative-binomial', 0, -0.5]];
    for (const [family, y, eta0] of cases) {
      const r = new GlmResponse(family, 1, Float64Array.of(5));
      r.setResponse([y]);
      const w = new Float64Array(1);
      const weight = (e: number) => { r.kernel(Float64Array.of(e), 2.5, 0, 1, null, null, w, null); return w[0]; };
      const slope = new Float64Array(1);
      r.weightSlope(Float64Array.of(eta0), 2.5, 0, 1, slope);
      const h = 1e-5;
      expect(Math.abs(slope[0] - (weight(eta0 + h) - weight(eta0 - h)) / (2 * h))).toBeLessThan(1e-7);
    }
  });
});
