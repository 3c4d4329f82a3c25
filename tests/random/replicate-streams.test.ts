import { describe, expect, it } from 'vitest';
import { replicateStreams } from '../../kernel-lib/random/stream';
import { normalCdf } from '../../kernel-lib/numeric/distributions';

describe('replicateStreams: one stream per replicate from one seeding', () => {
  it('is deterministic and gives every index its own sequence', () => {
    const a = replicateStreams(42, 'scenario');
    const b = replicateStreams(42, 'scenario');
    expect([a.stream(7).uniform(), a.stream(7).uniform()]).toEqual([b.stream(7).uniform(), b.stream(7).uniform()]);
    const first = new Set<number>();
    for (let i = 0; i < 5000; i++) first.add(a.stream(i).nextUint32());
    expect(first.size).toBe(5000);
    expect(replicateStreams(42, 'other').stream(7).uniform()).not.toBe(a.stream(7).uniform());
  });

  // Across members, the first draws must behave like independent N(0,1) values: Kolmogorov-Smirnov
  // statistic below the 1% critical value 1.63/√n (Massey 1951, J. Am. Stat. Assoc. 46:68), and the
  // lag-1 correlation between neighbouring members within 4 SE of 0 (SE 1/√n; common practice, no source).
  it('first draws of neighbouring members look independent and normal', () => {
    const streams = replicateStreams(1, 'base');
    const n = 20000;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = streams.stream(i).normal();
    const sorted = Float64Array.from(x).sort();
    let d = 0;
    for (let i = 0; i < n; i++) {
      const f = normalCdf(sorted[i]);
      d = Math.max(d, Math.abs(f - i / n), Math.abs((i + 1) / n - f));
    }
    expect(d).toBeLessThan(1.63 / Math.sqrt(n));
    let sxy = 0;
    let sxx = 0;
    for (let i = 0; i < n - 1; i++) { sxy += x[i] * x[i + 1]; sxx += x[i] * x[i]; }
    expect(Math.abs(sxy / sxx)).toBeLessThan(4 / Math.sqrt(n));
  });

  it('refuses a negative or fractional index', () => {
    expect(() => replicateStreams(1).stream(-1)).toThrow(/replicateStreams\.stream/);
    expect(() => replicateStreams(1).stream(1.5)).toThrow(/replicateStreams\.stream/);
  });
});
