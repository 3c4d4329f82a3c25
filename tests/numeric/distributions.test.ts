import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import {
  chiSquareCdf, chiSquareQuantile, chiSquareSurvival, fCdf, fQuantile, fSurvival, normalQuantile, studentTQuantile,
} from '../../kernel-lib/numeric/distributions';
import { symmetricEigen } from '../../kernel-lib/numeric/symmetric-eigen';
import { brentRoot } from '../../kernel-lib/numeric/brent-root';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('chi-square and F distributions', () => {
  // Source: scipy 1.10.1, `from scipy import stats; stats.chi2.ppf(p, k)` (values pasted).
  const chi2Ppf: [number, number, number][] = [
    [0.95, 1, 3.841458820694124],
    [0.975, 10, 20.483177350807388],
    [0.025, 10, 3.2469727802368413],
    [0.5, 3, 2.3659738843753377],
    [0.999, 50, 86.66081519040317],
    [0.05, 2, 0.10258658877510106],
    [0.9, 0.5, 1.5007857444736732],
    [0.995, 200, 255.26415545152312],
    [0.001, 4, 0.09080403553897909],
  ];
  it.each(chi2Ppf)('chiSquareQuantile(%f, %f) matches scipy', (p, k, expected) => {
    expect(rel(chiSquareQuantile(p, k), expected)).toBeLessThan(1e-10);
  });

  // Source: scipy 1.10.1, stats.chi2.cdf(x, k) and stats.chi2.sf(x, k).
  const chi2Cdf: [number, number, number, number][] = [
    [3.841458820694124, 1, 0.9500000000000001, 0.04999999999999989],
    [0.5, 3, 0.08110858834532418, 0.9188914116546758],
    [20, 10, 0.9707473119230389, 0.029252688076961124],
    [150, 120, 0.9669265190886953, 0.03307348091130466],
    [1e-3, 2, 0.0004998750208307296, 0.9995001249791693],
    [7.5, 4.5, 0.8535121515105326, 0.14648784848946736],
  ];
  it.each(chi2Cdf)('chi-square CDF and upper tail at %f on %f df match scipy', (x, k, cdf, sf) => {
    expect(rel(chiSquareCdf(x, k), cdf)).toBeLessThan(1e-12);
    expect(rel(chiSquareSurvival(x, k), sf)).toBeLessThan(1e-11);
  });

  // Source: scipy 1.10.1, stats.f.cdf(x, d1, d2), stats.f.sf(x, d1, d2), stats.f.ppf(p, d1, d2).
  const fValues: [number, number, number, number, number][] = [
    [3.2, 2, 10, 0.9157090866461262, 0.08429091335387398],
    [1.0, 5, 5, 0.5000000000000001, 0.5000000000000001],
    [10.5, 1, 3, 0.9521625004044373, 0.04783749959556276],
    [0.2, 4, 30, 0.06362216318985547, 0.9363778368101445],
    [2.5, 3, 2.5, 0.7374480490746024, 0.26255195092539785],
  ];
  it.each(fValues)('F CDF and upper tail at %f on (%f, %f) df match scipy', (x, d1, d2, cdf, sf) => {
    expect(rel(fCdf(x, d1, d2), cdf)).toBeLessThan(1e-12);
    expect(rel(fSurvival(x, d1, d2), sf)).toBeLessThan(1e-11);
  });
  const fPpf: [number, number, number, number][] = [
    [0.95, 3, 12, 3.490294819497605],
    [0.025, 9, 40, 0.2852681345126696],
    [0.975, 9, 40, 2.4519392170299263],
    [0.95, 1, 2, 18.512820512820497],
    [0.5, 2, 7.3, 0.7633344053028189],
  ];
  it.each(fPpf)('fQuantile(%f, %f, %f) matches scipy', (p, d1, d2, expected) => {
    expect(rel(fQuantile(p, d1, d2), expected)).toBeLessThan(1e-10);
  });

  it('t quantiles for fractional and small df match scipy and the handbook table', () => {
    // scipy 1.10.1 stats.t.ppf(p, df); integer df also in Abramowitz and Stegun (1964), table 26.10.
    expect(rel(studentTQuantile(0.975, 2), 4.302652729911275)).toBeLessThan(1e-10);
    expect(rel(studentTQuantile(0.975, 3), 3.182446305284263)).toBeLessThan(1e-10);
    expect(rel(studentTQuantile(0.975, 2.5), 3.5746548420118773)).toBeLessThan(1e-10);
    expect(rel(studentTQuantile(0.95, 1), 6.313751514800932)).toBeLessThan(1e-10);
    expect(rel(studentTQuantile(0.975, 7.8), 2.31633686817328)).toBeLessThan(1e-10);
    expect(rel(studentTQuantile(0.995, 30), 2.7499956535670305)).toBeLessThan(1e-10);
    // tiny Satterthwaite df and far tails (scipy 1.10.1 stats.t.ppf); where the CDF itself is the limit, 1e-9
    expect(rel(studentTQuantile(0.975, 0.5), 164.55767352096103)).toBeLessThan(1e-9);
    expect(rel(studentTQuantile(0.975, 0.8), 23.327935796004294)).toBeLessThan(1e-10);
    expect(rel(studentTQuantile(0.999, 1.5), 52.184430008992784)).toBeLessThan(1e-10);
    expect(rel(studentTQuantile(0.9, 200), 1.2857987939945954)).toBeLessThan(1e-10);
    expect(rel(studentTQuantile(0.6, 3), 0.27667066230490933)).toBeLessThan(1e-9);
    expect(rel(studentTQuantile(0.025, 7.8), -2.31633686817328)).toBeLessThan(1e-10);
  });

  it('identities: χ²₁ quantile = z², F(1, ν) quantile = t² and F(d1, ∞) = χ²/d1', () => {
    // Standard identities (χ²₁ = Z², F(1, ν) = t²_ν, d1·F(d1, ∞) = χ²_d1): common practice, no source.
    expect(rel(chiSquareQuantile(0.9, 1), normalQuantile(0.95) ** 2)).toBeLessThan(1e-10);
    expect(rel(fQuantile(0.95, 1, 7), studentTQuantile(0.975, 7) ** 2)).toBeLessThan(1e-9);
    expect(rel(fCdf(2, 3, Infinity), chiSquareCdf(6, 3))).toBeLessThan(1e-14);
  });

  it('edge values are explicit, not NaN by accident', () => {
    expect(chiSquareQuantile(0, 3)).toBe(0);
    expect(chiSquareQuantile(1, 3)).toBe(Infinity);
    expect(Number.isNaN(chiSquareQuantile(0.5, 0))).toBe(true);
    expect(fCdf(0, 2, 3)).toBe(0);
    expect(fSurvival(0, 2, 3)).toBe(1);
    expect(fSurvival(Infinity, 2, 3)).toBe(0);
  });
});

describe('small numerical helpers', () => {
  it('symmetricEigen agrees with ml-matrix on random symmetric matrices', () => {
    // Reference: ml-matrix EigenvalueDecomposition (a general-purpose library).
    let seed = 7;
    const next = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) - 0.5;
    for (const n of [1, 2, 3, 5, 8]) {
      const a = new Matrix(n, n);
      for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) { const v = next(); a.set(i, j, v); a.set(j, i, v); }
      const mine = symmetricEigen(a.to1DArray(), n);
      const ref = new EigenvalueDecomposition(a, { assumeSymmetric: true }).realEigenvalues.slice().sort((x, y) => y - x);
      ref.forEach((v, i) => expect(mine.values[i]).toBeCloseTo(v, 12));
      // A v = λ v for every returned pair
      for (let i = 0; i < n; i++) {
        const v = Array.from(mine.vectors.slice(i * n, (i + 1) * n));
        const av = a.mmul(Matrix.columnVector(v)).getColumn(0);
        av.forEach((x, k) => expect(x).toBeCloseTo(mine.values[i] * v[k], 11));
      }
    }
  });

  it('brentRoot finds the fixed point of cos and the root of a cubic as scipy does', () => {
    // Roots from scipy 1.10.1: scipy.optimize.brentq(lambda x: math.cos(x) - x, 0, 1, xtol=1e-15)
    const r = brentRoot((x) => Math.cos(x) - x, 0, 1, { tolerance: 1e-15 });
    expect(r.converged).toBe(true);
    expect(r.x).toBeCloseTo(0.7390851332151607, 14);
    // and brentq(lambda x: x**3 - 2*x - 5, 2, 3, xtol=1e-15) (Wallis's cubic)
    const c = brentRoot((x) => x ** 3 - 2 * x - 5, 2, 3, { tolerance: 1e-15 });
    expect(c.x).toBeCloseTo(2.094551481542327, 13);
    expect(brentRoot((x) => x * x + 1, 0, 1).converged).toBe(false); // no sign change: reported, not thrown
  });
});
