/**
 * Confounding that confounds: a covariate whose between-site part is correlated with the sites'
 * random intercepts (design: covariates[].between.correlation). The random-intercept slope is then
 * biased by a known amount, while the fixed-site slope and the within-between split are not.
 *
 * Closed form (balanced: m sites × n observations). Write x_ij = σx(√s a_g + √(1−s) e_ij) with
 * a_g = ρ z_g + √(1−ρ²) f_g and site effect u_g = σu z_g. Per site, as m → ∞:
 *   within sum of squares of x   w = (n−1) σx² (1−s),
 *   variance of site means of x  v = σx² (s + (1−s)/n),   between sum of squares  n v,
 *   cov(x̄_g, u_g)               c = σx √s ρ σu.
 * The within estimator is unbiased; the between estimator has limit β + c/v. For given variance
 * components the random-intercept (GLS) slope is the weighted combination
 *   β̂ = (W_xx β̂_W + θ B_xx β̂_B) / (W_xx + θ B_xx),  θ = σe² / (σe² + n σu²)
 * (Maddala 1971, Econometrica 39:341; Hausman 1978, Econometrica 46:1251, §3), so its bias is
 *   δ = θ n c / (w + θ n v).
 * The fitted variance components are themselves pulled by the misspecification: the balanced
 * likelihood factorises into a within part (σe²) and a between part (τ² = σu² + σe²/n), whose
 * estimates at slope β + δ converge to
 *   σe*² = σe² + δ² σx² (1−s),   τ*² = σu² + σe²/n − 2 δ c + δ² v,   θ* = σe*² / (n τ*²),
 * and δ = θ* n c / (w + θ* n v) at the joint limit (the pseudo-true value of a misspecified
 * likelihood; White 1982, Econometrica 50:1). The fixed point is found by iteration below.
 * With the site mean added as a column (Mundlak 1978, Econometrica 46:69; Bell and Jones 2015,
 * Political Science Research and Methods 3:133) the slope of x is the within estimator exactly.
 */
import { describe, expect, it } from 'vitest';
import { buildDesign } from '../../kernel-lib/data/build-design';
import type { Columns } from '../../kernel-lib/data/columns';
import { parseDesign } from '../../kernel-lib/design/parse';
import { simulateColumns } from '../../kernel-lib/design/simulate';
import { fitDesign } from '../../kernel-lib/fit/fit-design';
import { parseModel } from '../../kernel-lib/model/parse';
import type { ModelSpec } from '../../kernel-lib/model/types';
import { createStream } from '../../kernel-lib/random/stream';

const m = 100, n = 4, sx = 1, s = 0.5, rho = 0.6, su = 1, se = 1, beta = 0.5;

function closedFormBias(): { naive: number; limit: number } {
  const w = (n - 1) * sx * sx * (1 - s);
  const v = sx * sx * (s + (1 - s) / n);
  const c = sx * Math.sqrt(s) * rho * su;
  const bias = (theta: number) => (theta * n * c) / (w + theta * n * v);
  const naive = bias((se * se) / (se * se + n * su * su));
  let d = naive;
  for (let it = 0; it < 200; it++) {
    const e2 = se * se + d * d * sx * sx * (1 - s);
    const tau2 = su * su + (se * se) / n - 2 * d * c + d * d * v;
    d = bias(e2 / (n * tau2));
  }
  return { naive, limit: d };
}

function surveyDesign(correlation: number) {
  return parseDesign({
    seed: 1,
    replicates: 1,
    factors: [{ name: 'site', levels: m }],
    perCell: n,
    covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: sx }, between: { factor: 'site', share: s, correlation } }],
    truth: { fixed: { intercept: 2, x: beta }, sd: { site: su, residual: se } },
    variants: [{ name: 'random', model: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }] } }],
  });
}

const variants: Record<string, ModelSpec> = {
  random: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }] },
  fixed: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'fixed' }] },
  split: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random', split: ['x'] }] },
};

function meanAndMcse(v: number[]): [number, number] {
  const mean = v.reduce((a, b) => a + b, 0) / v.length;
  const sd = Math.sqrt(v.reduce((a, b) => a + (b - mean) ** 2, 0) / (v.length - 1));
  return [mean, sd / Math.sqrt(v.length)]; // MCSE of a mean (Morris, White and Crowther 2019, Table 6)
}

/** Slopes of x from R replicates; the fixed-site fit (100 dummies) only in the first `withFixed`. */
function slopes(correlation: number, R: number, withFixed: number): Record<string, number[]> {
  const design = surveyDesign(correlation);
  const estimates: Record<string, number[]> = { random: [], fixed: [], split: [] };
  for (let r = 0; r < R; r++) {
    const data = simulateColumns(design, createStream(5, 'between', r));
    for (const [name, spec] of Object.entries(variants)) {
      if (name === 'fixed' && r >= withFixed) continue;
      const fit = fitDesign(buildDesign(data.columns as Columns, parseModel(spec)), { modes: false, fitted: false });
      estimates[name].push(fit.fixed.find((f) => f.term === 'x')!.estimate);
    }
  }
  return estimates;
}

describe('a covariate correlated with the site effects', () => {
  it('biases the random-intercept slope by the closed form; site fixed and the within-between split are unbiased', () => {
    const estimates = slopes(rho, 600, 30);
    // balanced: the split's slope is the within estimator, the same number as with site fixed (Mundlak 1978),
    // so the split's unbiasedness below is also the fixed fit's
    estimates.fixed.forEach((b, r) => expect(Math.abs(b - estimates.split[r])).toBeLessThan(1e-8));
    const { naive, limit } = closedFormBias();
    expect(limit).toBeCloseTo(0.1872, 4); // the fixed point for these settings (iteration above)
    const [ri, riSe] = meanAndMcse(estimates.random);
    // 3.5 MCSE, plus 2% of δ for the O(1/m) remainder of the large-m limit with m = 100 (common practice, no source)
    expect(Math.abs(ri - beta - limit)).toBeLessThan(3.5 * riSe + 0.02 * limit);
    expect(ri - beta).toBeGreaterThan(0.1); // clearly biased: a test that the correlation reaches the data
    const [wb, wbSe] = meanAndMcse(estimates.split);
    expect(Math.abs(wb - beta)).toBeLessThan(3.5 * wbSe);
    // with the true θ instead of the pseudo-true one the bias would be `naive` (0.170), 9% smaller
    expect(naive).toBeLessThan(limit);
  });

  it('scores a split variant\'s group-mean slope against the covariate\'s own slope, with no warning', () => {
    // y = β x + u = β (x − x̄_g) + β x̄_g + u: without confounding the between slope is β too (Bell and Jones 2015)
    const design = parseDesign({
      seed: 1, replicates: 1, factors: [{ name: 'site', levels: 5 }], perCell: 2,
      covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } }],
      truth: { fixed: { intercept: 2, x: beta }, sd: { site: su, residual: se } },
      variants: [{ name: 'split', model: variants.split }],
    });
    expect(design.variants[0].coefficients).toEqual(['intercept', 'x', 'x_mean_site']);
    expect(design.variants[0].truth).toEqual({ intercept: 2, x: beta, x_mean_site: beta });
    expect(design.warnings.filter((w) => w.includes('no truth'))).toEqual([]);
  });

  it('leaves the random-intercept slope unbiased without the correlation', () => {
    const estimates = slopes(0, 200, 0);
    for (const name of ['random', 'split']) {
      const [mean, mcse] = meanAndMcse(estimates[name]);
      expect(Math.abs(mean - beta), name).toBeLessThan(3.5 * mcse);
    }
  });
});
