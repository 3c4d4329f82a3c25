import { describe, expect, it } from 'vitest';
import { fitDesign } from '../../../kernel-lib/fit/fit-design';
import { bootstrapFit } from '../../../kernel-lib/fit/inference/bootstrap-fit';
import { percentileInterval } from '../../../kernel-lib/fit/inference/bootstrap';
import { handDesign, testRandom } from '../../helpers/simple-design';

/** Random intercept with a group-level covariate and an observation-level one. */
function survey(seed: number, groups: number, perGroup: number) {
  const rng = testRandom(seed);
  const X: number[][] = [];
  const y: number[] = [];
  const g: number[] = [];
  for (let l = 0; l < groups; l++) {
    const b = rng.normal();
    const elevation = l - (groups - 1) / 2;
    for (let k = 0; k < perGroup; k++) {
      const x = rng.normal();
      X.push([1, x, elevation]); y.push(5 + 0.5 * x + 0.3 * elevation + b + rng.normal()); g.push(l);
    }
  }
  return handDesign(X, ['intercept', 'x', 'elevation'], y, [{ factor: 'g', index: g }]);
}

describe('parametric bootstrap', () => {
  it('percentile positions follow Davison and Hinkley (1997, §5.2): the (B+1)α-th order statistic', () => {
    // B = 99, α = 0.05: the 5th and 95th ordered values; between positions it interpolates (common practice, no source)
    const values = Array.from({ length: 99 }, (_, i) => 99 - i); // unsorted on purpose
    expect(percentileInterval(values, 0.9)).toMatchObject({ lower: 5, upper: 95, clipped: false, count: 99 });
    const iv = percentileInterval(values, 0.95);
    expect(iv.lower).toBeCloseTo(2.5, 12);
    expect(iv.upper).toBeCloseTo(97.5, 12);
    expect(percentileInterval([1, 2, 3], 0.95).clipped).toBe(true); // too few resamples: flagged
    expect(percentileInterval([NaN, 1, 2, 3], 0.5).count).toBe(3); // failed refits left out
  });

  it('same seed, same intervals with 1 worker, 2 workers and inside fitDesign; another seed differs', async () => {
    const d = survey(3, 5, 6);
    const settings = { resamples: 240, seed: 42 };
    const inline = fitDesign(d, { interval: 'bootstrap', bootstrap: settings });
    const fit = fitDesign(d);
    const progress: number[] = [];
    const one = await bootstrapFit(d, fit, { ...settings, workers: 1, onProgress: (done) => progress.push(done) });
    const two = await bootstrapFit(d, fit, { ...settings, workers: 2 });
    expect(two.summary.samples).toEqual(one.summary.samples);
    for (const other of [one.fit, two.fit]) {
      other.fixed.forEach((r, j) => {
        expect(r.lower).toBe(inline.fixed[j].lower);
        expect(r.upper).toBe(inline.fixed[j].upper);
        expect(r.method).toBe('bootstrap');
      });
      other.random.forEach((r, j) => {
        expect(r.lower).toBe(inline.random[j].lower);
        expect(r.upper).toBe(inline.random[j].upper);
      });
    }
    expect(progress[progress.length - 1]).toBe(240);
    expect(progress.every((v, i) => i === 0 || v > progress[i - 1])).toBe(true);
    const otherSeed = await bootstrapFit(d, fit, { resamples: 240, seed: 43, workers: 2 });
    expect(otherSeed.fit.fixed[1].lower).not.toBe(one.fit.fixed[1].lower);
  });

  it('balanced one-way: the bootstrap SD of the mean equals the model SE (exact under the fitted model)', async () => {
    // With balanced groups β̂ = ȳ whatever θ̂, so under the fitted model Var(β̂*) = (σ̂ₑ² + rσ̂ₐ²)/(mr) = SE²
    // exactly (Searle et al. 1992, ch. 3); and E(MSW*) = σ̂ₑ². Monte Carlo SE of a bootstrap SD is about
    // SD/√(2B) (Var(s²) = 2σ⁴/(B−1) for normal draws, delta method): 4 MCSE allowed.
    const rng = testRandom(12);
    const y: number[] = [];
    const g: number[] = [];
    for (let l = 0; l < 6; l++) { const b = 2 * rng.normal(); for (let k = 0; k < 5; k++) { y.push(b + rng.normal()); g.push(l); } }
    const d = handDesign(y.map(() => [1]), ['intercept'], y, [{ factor: 'g', index: g }]);
    const fit = fitDesign(d);
    expect(fit.singular).toBe(false);
    const B = 999;
    const { summary } = await bootstrapFit(d, fit, { resamples: B, seed: 7, workers: 2 });
    expect(summary.failed).toBe(0);
    const column = (c: number) => Array.from({ length: B }, (_, b) => summary.samples[b * summary.width + c]);
    const means = column(0);
    const mu = means.reduce((a, b) => a + b, 0) / B;
    const sd = Math.sqrt(means.reduce((a, b) => a + (b - mu) ** 2, 0) / (B - 1));
    const se = fit.fixed[0].se;
    expect(Math.abs(sd - se)).toBeLessThan(4 * se / Math.sqrt(2 * B));
    expect(Math.abs(mu - fit.fixed[0].estimate)).toBeLessThan(4 * se / Math.sqrt(B));
    // residual SD: mean of σ̂*² against σ̂² (Var(MSW*) = 2σ⁴/24 for 24 within-group df)
    const s2 = column(2).map((v) => v * v);
    const meanS2 = s2.reduce((a, b) => a + b, 0) / B;
    const sigma2 = fit.residualSd ** 2;
    expect(Math.abs(meanS2 - sigma2)).toBeLessThan(4 * sigma2 * Math.sqrt(2 / 24 / B) * 1.2);
  });

  it('bad settings are named', () => {
    const d = survey(3, 4, 4);
    expect(() => fitDesign(d, { interval: 'bootstrap', bootstrap: { resamples: 0 } })).toThrow(/bootstrap\.resamples/);
  });
});
