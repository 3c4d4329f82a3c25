import { describe, expect, it } from 'vitest';
import type { Estimate } from '../../kernel-lib/fit/estimate/types';
import { summarise } from '../../kernel-lib/fit/summarise';
import { handDesign } from '../helpers/simple-design';

// A design of 10 rows with columns intercept, a, b (b aliased) and a site term with intercept and slope.
const rows = Array.from({ length: 10 }, (_, i) => [1, i % 3, 2 * (i % 3)]);
const design = handDesign(rows, ['intercept', 'a', 'b'], Array.from({ length: 10 }, (_, i) => i * 0.5), [
  { factor: 'site', index: [0, 0, 1, 1, 2, 2, 3, 3, 4, 4], slopes: [rows.map((r) => r[1])], slopeNames: ['a'] },
]);

/** A stand-in Estimate with chosen numbers (only the shared summarise step is under test). */
function estimate(over: Partial<Estimate> = {}): Estimate {
  return {
    estimation: 'REML', estimable: [0, 1], aliased: [2], aliasReasons: { b: 'equals 2 × a' }, failure: '', warnings: [],
    converged: true, evaluations: 42, theta: Float64Array.of(0.8, 0.1, 0.3), deviance: 40.5, logLik: -20.25,
    beta: Float64Array.of(2.5, -0.4), betaCov: Float64Array.of(0.09, 0.01, 0.01, 0.04), residualDf: 7, exactT: false,
    dispersion: 1.44,
    terms: [{ term: design.random[0], cov: Float64Array.of(0.64, -0.12, -0.12, 0.25), boundary: false }],
    modes: [], fitted: Float64Array.from({ length: 10 }, (_, i) => i * 0.5 + 0.1),
    ...over,
  };
}

describe('summarise', () => {
  it('Wald intervals β ± z·se with z = Φ⁻¹(0.975), aliased rows kept with NaN and a warning', () => {
    // scipy 1.10.1: scipy.stats.norm.ppf(0.975) = 1.959963984540054
    const r = summarise(design, estimate(), { level: 0.95, interval: 'wald', fitted: false });
    expect(r.fixed.map((f) => f.term)).toEqual(['intercept', 'a', 'b']);
    expect(r.fixed[0].se).toBeCloseTo(0.3, 15);
    expect(r.fixed[0].lower).toBeCloseTo(2.5 - 1.959963984540054 * 0.3, 12);
    expect(r.fixed[1].upper).toBeCloseTo(-0.4 + 1.959963984540054 * 0.2, 12);
    expect(r.fixed[0].df).toBe(Infinity);
    expect(r.fixed[2]).toMatchObject({ aliased: true, method: 'wald' });
    expect(r.fixed[2].estimate).toBeNaN();
    expect(r.aliased).toEqual(['b']);
    expect(r.warnings).toContain('not estimable: b: equals 2 × a');
    // covariance placed at the estimable columns, NaN elsewhere (3 × 3)
    expect(r.fixedCov[0 * 3 + 1]).toBe(0.01);
    expect(r.fixedCov[1 * 3 + 1]).toBe(0.04);
    expect(r.fixedCov[2 * 3 + 2]).toBeNaN();
  });

  it('residual-t intervals on n − rank(X) df, and OLS always residual-t', () => {
    // scipy 1.10.1: scipy.stats.t.ppf(0.975, 7) = 2.3646242510102993
    const r = summarise(design, estimate(), { level: 0.95, interval: 'residual-t', fitted: false });
    expect(r.fixed[0].df).toBe(7);
    expect(r.fixed[0].upper).toBeCloseTo(2.5 + 2.3646242510102993 * 0.3, 9); // studentTQuantile agrees to ~1e-9
    const ols = summarise(design, estimate({ exactT: true, estimation: 'OLS' }), { level: 0.95, interval: 'wald', fitted: false });
    expect(ols.fixed[0].method).toBe('residual-t');
    // 90% level: scipy.stats.norm.ppf(0.95) = 1.6448536269514722
    const r90 = summarise(design, estimate(), { level: 0.9, interval: 'wald', fitted: false });
    expect(r90.fixed[0].upper).toBeCloseTo(2.5 + 1.6448536269514722 * 0.3, 12);
  });

  it('variance rows, the correlation cov/(sd·sd), residual SD, and AIC/BIC with every parameter counted', () => {
    const r = summarise(design, estimate(), { level: 0.95, interval: 'wald', fitted: true });
    expect(r.random.map((x) => [x.factor, x.term])).toEqual([['site', 'intercept'], ['site', 'a'], ['residual', '']]);
    expect(r.random[0].sd).toBeCloseTo(0.8, 15);
    expect(r.random[1].sd).toBeCloseTo(0.5, 15);
    expect(r.correlations).toHaveLength(1);
    expect(r.correlations[0].value).toBeCloseTo(-0.12 / (0.8 * 0.5), 15);
    expect(r.residualSd).toBeCloseTo(1.2, 15);
    // parameters = 2 β + 3 θ + σ² = 6; AIC = −2ℓ + 2k (Akaike 1974), BIC = −2ℓ + k log n (Schwarz 1978)
    expect(r.parameters).toBe(6);
    expect(r.aic).toBeCloseTo(40.5 + 12, 12);
    expect(r.bic).toBeCloseTo(40.5 + 6 * Math.log(10), 12);
    expect(r.residuals[3]).toBeCloseTo(-0.1, 15);
    expect(r.singular).toBe(false);
  });

  it('flags a boundary fit as singular, with a warning', () => {
    const est = estimate({ terms: [{ term: design.random[0], cov: Float64Array.of(0.64, 0, 0, 0), boundary: true }] });
    const r = summarise(design, est, { level: 0.95, interval: 'wald', fitted: false });
    expect(r.singular).toBe(true);
    expect(r.warnings.some((w) => w.startsWith('singular fit'))).toBe(true);
    expect(r.correlations[0].value).toBeNaN(); // undefined correlation with a zero SD, not 0
  });

  it('a failed estimate gives NaN rows with the reason, and no throw', () => {
    const r = summarise(design, estimate({ failure: 'response has no variation' }), { level: 0.95, interval: 'wald', fitted: false });
    expect(r.failure).toBe('response has no variation');
    expect(r.fixed.every((f) => Number.isNaN(f.estimate) && f.method === 'none')).toBe(true);
    expect(r.fixed[2].aliased).toBe(true);
    expect(r.converged).toBe(false);
  });

  it('stops on a small-sample method the estimate step does not offer (an internal guard: fitDesign checks the interval rule first)', () => {
    expect(() => summarise(design, estimate(), { level: 0.95, interval: 'satterthwaite', fitted: false })).toThrow(/no "satterthwaite" intervals/);
  });
});
