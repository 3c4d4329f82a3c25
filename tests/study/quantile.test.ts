import { describe, expect, it } from 'vitest';
import { normalQuantile } from '../../kernel-lib/numeric/distributions';
import { medianOfSorted, medianStandardError, sortedCopy } from '../../kernel-lib/study/quantile';

/**
 * Exact coverage of the order-statistic interval [x_(c), x_(n−c+1)] for the median of any
 * continuous distribution: P(c ≤ B ≤ n − c) with B ~ Binomial(n, 1/2) (Conover 1999, Practical
 * Nonparametric Statistics, §3.2), summed here in log space.
 */
function rankIntervalCoverage(n: number, c: number): number {
  const logChoose = (k: number) => {
    let s = 0;
    for (let i = 1; i <= k; i++) s += Math.log(n - k + i) - Math.log(i);
    return s;
  };
  let p = 0;
  for (let k = c; k <= n - c; k++) p += Math.exp(logChoose(k) - n * Math.LN2);
  return p;
}

describe('sortedCopy and medianOfSorted', () => {
  it('sorts numerically (not as text) and copies only the first n values', () => {
    const x = new Float64Array([10, 9, -2, 100, 3]);
    // numeric order (a text sort would put 100 before 9; common practice, no source)
    expect(Array.from(sortedCopy(x))).toEqual([-2, 3, 9, 10, 100]);
    expect(Array.from(sortedCopy(x, 3))).toEqual([-2, 9, 10]);
    expect(Array.from(x)).toEqual([10, 9, -2, 100, 3]); // input untouched
  });

  it('median as numpy.median (Hyndman and Fan 1996 types 2 and 5-9 agree at p = 1/2)', () => {
    // numpy 1.24.2: np.median([4, 1, 3, 2]) = 2.5, np.median([5.5, -1, 2, 8, 3]) = 3.0
    expect(medianOfSorted(sortedCopy(new Float64Array([4, 1, 3, 2])))).toBe(2.5);
    expect(medianOfSorted(sortedCopy(new Float64Array([5.5, -1, 2, 8, 3])))).toBe(3);
    expect(medianOfSorted(new Float64Array([7]))).toBe(7);
    expect(medianOfSorted(new Float64Array(0))).toBeNaN();
  });
});

describe('medianStandardError', () => {
  it('uses ranks whose interval covers the median with probability close to 0.95', () => {
    // Check of the summation: scipy 1.10.1, binom.cdf(59, 100, .5) - binom.cdf(40, 100, .5) = 0.9431120663590191
    expect(rankIntervalCoverage(100, 41)).toBeCloseTo(0.9431120663590191, 12);
    for (const n of [20, 50, 100, 101, 1000, 5000]) {
      const r = medianStandardError(new Float64Array(n).map((_, i) => i));
      expect(r.upperRank).toBe(n - r.lowerRank + 1); // symmetric ranks (Conover 1999, §3.2)
      // the discrete binomial cannot hit 0.95 exactly; the nearest ranks stay within 0.02 for n ≥ 20
      expect(Math.abs(rankIntervalCoverage(n, r.lowerRank) - 0.95)).toBeLessThan(0.02);
    }
  });

  it('is half the interval length divided by z: sqrt(π/2)/√n on ideal normal data', () => {
    // Sample of normal quantiles Φ⁻¹((i − ½)/n); asymptotic SE of the median of N(0, 1) data is
    // sqrt(π/2)/√n (Serfling 1980, Approximation Theorems of Mathematical Statistics, §2.3.3).
    // scipy 1.10.1 on the same ideal sample with the same ranks gives 0.01247066748409663.
    const n = 10000;
    const x = new Float64Array(n).map((_, i) => normalQuantile((i + 0.5) / n));
    const r = medianStandardError(x);
    expect(r.lowerRank).toBe(4903);
    expect(r.se).toBeCloseTo(0.01247066748409663, 9);
    expect(r.se / (Math.sqrt(Math.PI / 2) / Math.sqrt(n))).toBeCloseTo(1, 1);
    expect(r.tied).toBe(false);
  });

  it('scales with the data and ignores a shift (equivariance; common practice, no source)', () => {
    const x = new Float64Array(101).map((_, i) => Math.sin(i) ** 3);
    const s = sortedCopy(x);
    const t = sortedCopy(x.map((v) => 5 + 3 * v));
    expect(medianStandardError(t).se).toBeCloseTo(3 * medianStandardError(s).se, 12);
  });

  it('flags ties as a lower bound and gives NaN below two values', () => {
    const tiedSample = new Float64Array(30).fill(0);
    tiedSample[29] = 4;
    const r = medianStandardError(tiedSample);
    expect(r.se).toBe(0);
    expect(r.tied).toBe(true);
    expect(medianStandardError(new Float64Array([1])).se).toBeNaN();
    expect(medianStandardError(new Float64Array(0)).se).toBeNaN();
    // n = 2: the only ranks are 1 and 2
    const two = medianStandardError(new Float64Array([1, 3]));
    expect([two.lowerRank, two.upperRank]).toEqual([1, 2]);
    expect(two.se).toBeCloseTo(2 / (2 * 1.959963984540054), 12);
  });
});
