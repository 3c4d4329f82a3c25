import { describe, expect, it } from 'vitest';
import { Matrix, solve } from 'ml-matrix';
import { fitDesign } from '../../../kernel-lib/fit/fit-design';
import { likelihoodRatioTest } from '../../../kernel-lib/fit/inference/likelihood-ratio';
import { QuadratInputError } from '../../../kernel-lib/model/errors';
import { chiSquareSurvival } from '../../../kernel-lib/numeric/distributions';
import { handDesign, testRandom } from '../../helpers/simple-design';

function data(seed: number) {
  const rng = testRandom(seed);
  const X: number[][] = [];
  const y: number[] = [];
  const g: number[] = [];
  const xs: number[] = [];
  for (let l = 0; l < 8; l++) {
    const b0 = rng.normal();
    const b1 = 0.5 * rng.normal();
    for (let k = 0; k < 6; k++) {
      const x = rng.normal();
      const z = rng.normal();
      X.push([1, x, z]); y.push(1 + 0.4 * x + 0.25 * z + b0 + b1 * x + rng.normal()); g.push(l); xs.push(x);
    }
  }
  return { X, y, g, xs };
}

function rss(X: number[][], y: number[]): number {
  const Xm = new Matrix(X);
  const ym = Matrix.columnVector(y);
  const beta = solve(Xm.transpose().mmul(Xm), Xm.transpose().mmul(ym));
  const r = ym.sub(Xm.mmul(beta));
  return r.transpose().mmul(r).get(0, 0);
}

describe('likelihood-ratio test between nested ML fits', () => {
  // Gaussian linear model: the log-likelihood maximised over β and σ² is −(n/2)(log(2π RSS/n) + 1), so
  // 2Δℓ = n log(RSS₀/RSS₁) (any linear-models text, e.g. Weisberg, Applied Linear Regression, 4th ed. 2014, ch. 6).
  it('ordinary least squares: the statistic is n log(RSS₀/RSS₁)', () => {
    const { X, y } = data(1);
    const small = fitDesign(handDesign(X.map((r) => r.slice(0, 2)), ['intercept', 'x'], y));
    const large = fitDesign(handDesign(X, ['intercept', 'x', 'z'], y));
    const t = likelihoodRatioTest(small, large);
    const expected = y.length * Math.log(rss(X.map((r) => r.slice(0, 2)), y) / rss(X, y)); // RSS by ml-matrix
    expect(t.statistic).toBeCloseTo(expected, 9);
    expect(t.df).toBe(1);
    expect(t.smaller).toBe('fitA');
    expect(t.pValue).toBeCloseTo(chiSquareSurvival(expected, 1), 12);
    expect(Number.isNaN(t.pValueMixture)).toBe(true);
    // argument order does not matter
    expect(likelihoodRatioTest(large, small).statistic).toBe(t.statistic);
  });

  it('a random intercept against no random effect: halved p-value on the boundary (Self and Liang 1987)', () => {
    const { X, y, g } = data(2);
    const ols = fitDesign(handDesign(X, ['intercept', 'x', 'z'], y));
    const mixed = fitDesign(handDesign(X, ['intercept', 'x', 'z'], y, [{ factor: 'g', index: g }]), { estimation: 'ML' });
    const t = likelihoodRatioTest(mixed, ols);
    expect(t.smaller).toBe('fitB');
    expect(t.df).toBe(1);
    expect(t.statistic).toBeCloseTo(2 * (mixed.logLik - ols.logLik), 12);
    expect(t.pValueMixture).toBeCloseTo(t.pValue / 2, 14); // 0.5 χ²₀ + 0.5 χ²₁ (Self and Liang 1987, case 5)
    expect(t.notes.join(' ')).toMatch(/boundary/);
  });

  it('adding a correlated random slope: 50:50 mixture of χ²₁ and χ²₂ (Stram and Lee 1994)', () => {
    const { X, y, g, xs } = data(3);
    const d1 = handDesign(X, ['intercept', 'x', 'z'], y, [{ factor: 'g', index: g }]);
    const d2 = handDesign(X, ['intercept', 'x', 'z'], y, [{ factor: 'g', index: g, slopes: [xs], slopeNames: ['x'], correlated: true }]);
    const a = fitDesign(d1, { estimation: 'ML' });
    const b = fitDesign(d2, { estimation: 'ML' });
    const t = likelihoodRatioTest(a, b);
    expect(t.df).toBe(2);
    expect(t.pValueMixture).toBeCloseTo(0.5 * chiSquareSurvival(t.statistic, 1) + 0.5 * chiSquareSurvival(t.statistic, 2), 14);
  });

  it('refuses REML fits, non-nested models and different data with clear messages', () => {
    const { X, y, g } = data(4);
    const d = handDesign(X, ['intercept', 'x', 'z'], y, [{ factor: 'g', index: g }]);
    const reml = fitDesign(d);
    const ml = fitDesign(d, { estimation: 'ML' });
    const olsX = fitDesign(handDesign(X.map((r) => r.slice(0, 2)), ['intercept', 'x'], y));
    const olsZ = fitDesign(handDesign(X.map((r) => [r[0], r[2]]), ['intercept', 'z'], y));
    expect(() => likelihoodRatioTest(reml, olsX)).toThrow(QuadratInputError);
    expect(() => likelihoodRatioTest(reml, olsX)).toThrow(/fitA was fitted by REML.*model\.estimation "ML"/);
    expect(() => likelihoodRatioTest(olsX, olsZ)).toThrow(/both models have 3 parameters/);
    const olsXZ = fitDesign(handDesign(X.map((r) => [r[0], r[2], r[1] * r[2]]), ['intercept', 'z', 'x:z'], y));
    expect(() => likelihoodRatioTest(olsX, olsXZ)).toThrow(/fitA is not nested in fitB: fitB lacks coefficient x/);
    const other = fitDesign(handDesign(X, ['intercept', 'x', 'z'], y.map((v) => v + 1), [{ factor: 'g', index: g }]), { estimation: 'ML' });
    expect(() => likelihoodRatioTest(olsX, other)).toThrow(/different responses/);
    expect(() => likelihoodRatioTest(ml, olsX)).not.toThrow();
  });
});
