import { describe, expect, it } from 'vitest';
import { buildZigguratTables, createPolarSampler, millsRatio, zigguratNormal } from '../../kernel-lib/random/normal';
import { createStream } from '../../kernel-lib/random/stream';

/**
 * Normal CDF from the complementary error function of Press et al., Numerical Recipes in C,
 * 2nd ed. (1992), section 6.2 ("erfcc", Chebyshev fit, fractional error below 1.2e-7);
 * checked below against scipy.special.ndtr.
 */
function phi(x: number): number {
  const z = Math.abs(x) / Math.SQRT2;
  const t = 1 / (1 + 0.5 * z);
  const ans =
    t *
    Math.exp(
      -z * z -
        1.26551223 +
        t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 +
          t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  const erfc = x >= 0 ? ans : 2 - ans;
  return 1 - 0.5 * erfc;
}

describe('test helper phi', () => {
  it('agrees with scipy.special.ndtr (scipy 1.10.1) to 1e-7', () => {
    const ref: [number, number][] = [
      [-2.5, 0.006209665325776132],
      [-1, 0.15865525393145707],
      [0, 0.5],
      [0.3, 0.6179114221889526],
      [1.7, 0.955434537241457],
      [3.5, 0.9997673709209645],
    ];
    for (const [x, p] of ref) expect(Math.abs(phi(x) - p)).toBeLessThan(1e-7);
  });
});

describe('buildZigguratTables', () => {
  it('reproduces the 128-layer constants of Marsaglia and Tsang (2000)', () => {
    // Marsaglia and Tsang (2000), J. Stat. Software 5(8), zigset(): dn = 3.442619855899, vn = 9.91256303526217e-3.
    const t = buildZigguratTables(128);
    expect(Math.abs(t.r - 3.442619855899)).toBeLessThan(1e-11);
    // v follows from r, so it agrees to the precision of the published r (about 1e-12 relative).
    expect(Math.abs(t.v - 9.91256303526217e-3)).toBeLessThan(1e-13);
  });

  it('finds the usual tail start for 256 layers', () => {
    // r = 3.6541528853610088 for 256 layers (value from memory; also used by Doornik 2005).
    const t = buildZigguratTables(256);
    expect(Math.abs(t.r - 3.6541528853610088)).toBeLessThan(1e-12);
  });

  it('gives every layer the same area v, the top one included', () => {
    // Defining property of the ziggurat (Marsaglia and Tsang 2000, section 2): x_i (f_{i-1} - f_i) = v.
    const t = buildZigguratTables(256);
    for (let i = 1; i < t.layers; i++) {
      expect(Math.abs(t.x[i] * (t.f[i - 1] - t.f[i]) - t.v) / t.v).toBeLessThan(1e-12);
    }
  });

  it('refuses a layer count that is not a power of two', () => {
    expect(() => buildZigguratTables(100)).toThrow(/power of two/);
  });

  it('uses a Mills ratio that matches scipy at the tail start', () => {
    // scipy: norm.sf(r) / norm.pdf(r) at r = 3.6541528853610088 is 0.2484... ; checked as
    // pdf/sf - r = 0.2428861862874676 (scipy 1.10.1).
    const r = 3.6541528853610088;
    expect(Math.abs(1 / millsRatio(r) - r - 0.2428861862874676)).toBeLessThan(1e-12);
  });
});

describe('zigguratNormal', () => {
  const n = 200000;
  const stream = createStream(42, 'normal-moments');
  const draws = new Float64Array(n);
  for (let i = 0; i < n; i++) draws[i] = stream.normal();

  it('has mean 0, variance 1 and kurtosis 3 within 4 standard errors', () => {
    // Large-sample SEs for normal data: mean 1/sqrt(n), variance sqrt(2/n), kurtosis sqrt(24/n)
    // (Kendall and Stuart, The Advanced Theory of Statistics, vol. 1, moments of sample moments).
    let m1 = 0;
    for (let i = 0; i < n; i++) m1 += draws[i];
    m1 /= n;
    let m2 = 0;
    let m4 = 0;
    for (let i = 0; i < n; i++) {
      const d = draws[i] - m1;
      m2 += d * d;
      m4 += d * d * d * d;
    }
    m2 /= n;
    m4 /= n;
    expect(Math.abs(m1)).toBeLessThan(4 / Math.sqrt(n));
    expect(Math.abs(m2 - 1)).toBeLessThan(4 * Math.sqrt(2 / n));
    expect(Math.abs(m4 / (m2 * m2) - 3)).toBeLessThan(4 * Math.sqrt(24 / n));
  });

  it('passes Kolmogorov-Smirnov at the 1% level', () => {
    // Critical value 1.63/sqrt(n) for alpha = 0.01 (Massey 1951, JASA 46(253), table 1, large n).
    const sorted = Float64Array.from(draws).sort();
    let d = 0;
    for (let i = 0; i < n; i++) {
      const p = phi(sorted[i]);
      d = Math.max(d, (i + 1) / n - p, p - i / n);
    }
    expect(d).toBeLessThan(1.63 / Math.sqrt(n));
  });

  it('puts 2(1 - Phi(3.5)) of draws beyond |3.5| within 4 standard errors', () => {
    // 2 * scipy.stats.norm.sf(3.5) = 4.6525815807105e-4 (scipy 1.10.1).
    const p = 4.6525815807105e-4;
    let count = 0;
    for (let i = 0; i < n; i++) if (Math.abs(draws[i]) > 3.5) count++;
    expect(Math.abs(count / n - p)).toBeLessThan(4 * Math.sqrt((p * (1 - p)) / n));
  });

  it('fills every layer and the tail in proportion (chi-square over the layer edges)', () => {
    // Bins of |z| cut at the ziggurat edges, so a wrong wedge or tail in any one layer shows.
    // Expected counts from the normal CDF; 1% critical value of chi-square with 255 df is
    // 310.457 (scipy.stats.chi2.ppf(0.99, 255)).
    const t = buildZigguratTables(256);
    const edges = [0, ...Array.from(t.x.subarray(1)), Infinity];
    const bins = edges.length - 1;
    const big = 2000000;
    const s = createStream(7, 'normal-layers');
    const counts = new Float64Array(bins);
    for (let i = 0; i < big; i++) {
      const a = Math.abs(s.normal());
      let lo = 0;
      let hi = bins;
      while (hi - lo > 1) {
        const mid = (lo + hi) >> 1;
        if (a >= edges[mid]) lo = mid;
        else hi = mid;
      }
      counts[lo]++;
    }
    let chi2 = 0;
    for (let b = 0; b < bins; b++) {
      const upper = b === bins - 1 ? 1 : phi(edges[b + 1]);
      const e = big * 2 * (upper - phi(edges[b]));
      chi2 += ((counts[b] - e) * (counts[b] - e)) / e;
    }
    expect(bins).toBe(256);
    expect(chi2).toBeLessThan(310.457);
  });

  it('draws the tail beyond r with the right mean excess', () => {
    // E[|Z| - r | |Z| > r] = phi(r)/(1 - Phi(r)) - r = 0.2428861862874676 at r = 3.65415... (scipy 1.10.1);
    // the sampler reaches this region only through its exact tail method.
    const r = buildZigguratTables(256).r;
    const s = createStream(11, 'normal-tail');
    const big = 2000000;
    let k = 0;
    let sum = 0;
    let sq = 0;
    for (let i = 0; i < big; i++) {
      const a = Math.abs(s.normal());
      if (a > r) {
        k++;
        sum += a - r;
        sq += (a - r) * (a - r);
      }
    }
    // Tail probability 2 * norm.sf(r) = 2.5803248765390077e-4 (scipy 1.10.1).
    const p = 2.5803248765390077e-4;
    expect(Math.abs(k / big - p)).toBeLessThan(4 * Math.sqrt((p * (1 - p)) / big));
    const mean = sum / k;
    const sd = Math.sqrt(sq / k - mean * mean);
    expect(Math.abs(mean - 0.2428861862874676)).toBeLessThan((4 * sd) / Math.sqrt(k));
  });

  it('works on any bit source (the function form)', () => {
    const s = createStream(3, 'fn');
    const t = createStream(3, 'fn');
    expect(zigguratNormal(s)).toBe(t.normal());
  });
});

describe('createPolarSampler', () => {
  it('has mean 0 and variance 1 within 4 standard errors', () => {
    // Same large-sample SEs as above (Kendall and Stuart).
    const s = createStream(9, 'polar');
    const draw = createPolarSampler(() => s.uniform());
    const n = 100000;
    let sum = 0;
    let sq = 0;
    for (let i = 0; i < n; i++) {
      const z = draw();
      sum += z;
      sq += z * z;
    }
    expect(Math.abs(sum / n)).toBeLessThan(4 / Math.sqrt(n));
    expect(Math.abs(sq / n - 1)).toBeLessThan(4 * Math.sqrt(2 / n) + 4 / n);
  });
});
