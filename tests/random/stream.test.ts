import { describe, expect, it } from 'vitest';
import { createStream, streamKey } from '../../kernel-lib/random/stream';

describe('createStream', () => {
  it('gives the same sequence for the same key', () => {
    const a = createStream(42, 'year.levels=3', 7);
    const b = createStream(42, 'year.levels=3', 7);
    for (let i = 0; i < 1000; i++) {
      expect(b.uniform()).toBe(a.uniform());
      expect(b.normal()).toBe(a.normal());
      expect(b.int(10)).toBe(a.int(10));
    }
  });

  it('gives unrelated sequences for neighbouring replicates', () => {
    const a = createStream(42, 's', 1);
    const b = createStream(42, 's', 2);
    const n = 20000;
    let same = 0;
    let sxy = 0;
    for (let i = 0; i < n; i++) {
      const x = a.uniform();
      const y = b.uniform();
      if (x === y) same++;
      sxy += (x - 0.5) * (y - 0.5);
    }
    expect(same).toBe(0);
    // Correlation of independent uniforms has SE 1/sqrt(n); 4 SE (common practice, no source).
    const corr = sxy / n / (1 / 12);
    expect(Math.abs(corr)).toBeLessThan(4 / Math.sqrt(n));
  });

  it('keeps key parts apart: ("a|b") differs from ("a", "b")', () => {
    expect(streamKey('a|b')).not.toBe(streamKey('a', 'b'));
    expect(createStream('a|b').uniform()).not.toBe(createStream('a', 'b').uniform());
    expect(streamKey(42, 'x', 3)).toBe('42|x|3');
  });

  it('refuses an empty key and non-finite parts with a message naming the part', () => {
    expect(() => createStream()).toThrow(/at least one key part/);
    expect(() => createStream(1, Number.NaN)).toThrow(/key part 1/);
  });

  it('has uniform mean 1/2 and variance 1/12 within 4 standard errors', () => {
    // Moments of U(0,1): mean 1/2, variance 1/12, Var((U-1/2)^2) = 1/80 - 1/144 = 1/180 (textbook).
    const s = createStream(2024, 'uniform-moments');
    const n = 200000;
    let sum = 0;
    let sq = 0;
    let min = 1;
    let max = 0;
    for (let i = 0; i < n; i++) {
      const u = s.uniform();
      sum += u;
      sq += (u - 0.5) * (u - 0.5);
      if (u < min) min = u;
      if (u > max) max = u;
    }
    expect(Math.abs(sum / n - 0.5)).toBeLessThan(4 * Math.sqrt(1 / 12 / n));
    expect(Math.abs(sq / n - 1 / 12)).toBeLessThan(4 * Math.sqrt(1 / 180 / n));
    expect(min).toBeGreaterThan(0);
    expect(max).toBeLessThan(1);
  });

  it('int(n) hits every value equally often (chi-square below the 1% critical value)', () => {
    const s = createStream(5, 'int');
    const k = 7;
    const n = 70000;
    const counts = new Array<number>(k).fill(0);
    for (let i = 0; i < n; i++) counts[s.int(k)]++;
    const e = n / k;
    const chi2 = counts.reduce((acc, c) => acc + ((c - e) * (c - e)) / e, 0);
    // chi-square 0.99 quantile with 6 df = 16.81 (scipy.stats.chi2.ppf(0.99, 6)).
    expect(chi2).toBeLessThan(16.81);
    expect(s.int(1)).toBe(0);
  });

  it('int(n) refuses a non-integer or out-of-range n', () => {
    const s = createStream(5, 'int');
    expect(() => s.int(0)).toThrow(/n must be an integer/);
    expect(() => s.int(2.5)).toThrow(/got 2.5/);
    expect(() => s.int(2 ** 33)).toThrow(/2\^32/);
  });
});
