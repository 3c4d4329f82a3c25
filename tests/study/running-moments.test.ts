import { describe, expect, it } from 'vitest';
import { RunningMoments } from '../../kernel-lib/study/running-moments';

/** Two-pass mean and sample variance (Chan, Golub and LeVeque 1983, Amer. Statist. 37(3), eq. 1.2). */
function twoPass(x: number[]): { mean: number; variance: number } {
  const mean = x.reduce((a, b) => a + b, 0) / x.length;
  const ss = x.reduce((a, b) => a + (b - mean) ** 2, 0);
  return { mean, variance: ss / (x.length - 1) };
}

describe('RunningMoments', () => {
  it('agrees with the two-pass formulas', () => {
    const x = Array.from({ length: 257 }, (_, i) => Math.cos(i * 0.37) * 4 + (i % 7));
    const m = new RunningMoments();
    for (const v of x) m.add(v);
    const ref = twoPass(x);
    expect(m.n).toBe(257);
    expect(m.mean).toBeCloseTo(ref.mean, 12);
    expect(m.variance()).toBeCloseTo(ref.variance, 11);
    expect(m.standardErrorOfMean()).toBeCloseTo(Math.sqrt(ref.variance / 257), 12);
  });

  it('stays exact with a large common offset, where the one-pass sum-of-squares formula fails', () => {
    // 4, 7, 13, 16 shifted by 1e9: mean 1e9 + 10, squared deviations 36 + 9 + 9 + 36 = 90, variance 30
    // (by hand). Σx² − n x̄² loses every digit here (Chan, Golub and LeVeque 1983, §2).
    const m = new RunningMoments();
    for (const v of [4, 7, 13, 16]) m.add(1e9 + v);
    expect(m.mean).toBe(1e9 + 10);
    expect(m.variance()).toBeCloseTo(30, 9);
  });

  it('gives NaN variance and SE below two values, and mean of one value', () => {
    const m = new RunningMoments();
    expect(m.variance()).toBeNaN();
    m.add(2.5);
    expect(m.mean).toBe(2.5);
    expect(m.variance()).toBeNaN();
    expect(m.standardErrorOfMean()).toBeNaN();
    m.add(2.5);
    expect(m.variance()).toBe(0);
  });
});
