import { describe, expect, it } from 'vitest';
import { fitDesign } from '../../../kernel-lib/fit/fit-design';
import { contextFromFit } from '../../../kernel-lib/fit/inference/context';
import { profileVariance } from '../../../kernel-lib/fit/inference/profile';
import { handDesign, testRandom } from '../../helpers/simple-design';

const CHI2_95 = 3.841458820694124; // scipy 1.10.1: stats.chi2.ppf(0.95, 1)
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
const mean = (v: number[]) => v.reduce((a, b) => a + b, 0) / v.length;

/** Bisection for an increasing (sign = 1) or decreasing (sign = −1) function crossing 0 in [lo, hi]; test-local on purpose. */
function bisect(f: (x: number) => number, lo: number, hi: number): number {
  const up = f(hi) > f(lo);
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if ((f(mid) > 0) === up) hi = mid; else lo = mid;
  }
  return 0.5 * (lo + hi);
}

function oneWay(seed: number, m: number, r: number, sdGroup: number, withCovariate = false) {
  const rng = testRandom(seed);
  const y: number[] = [];
  const g: number[] = [];
  const X: number[][] = [];
  for (let l = 0; l < m; l++) {
    const b = sdGroup * rng.normal();
    for (let j = 0; j < r; j++) {
      const x = rng.normal();
      X.push(withCovariate ? [1, x] : [1]);
      y.push(10 + b + (withCovariate ? 0.5 * x : 0) + rng.normal()); g.push(l);
    }
  }
  const groupMeans = Array.from({ length: m }, (_, l) => mean(y.slice(l * r, (l + 1) * r)));
  const grand = mean(y);
  let ssw = 0;
  for (let l = 0; l < m; l++) for (let j = 0; j < r; j++) ssw += (y[l * r + j] - groupMeans[l]) ** 2;
  const ssb = r * groupMeans.reduce((s, v) => s + (v - grand) ** 2, 0);
  const names = withCovariate ? ['intercept', 'x'] : ['intercept'];
  return { design: handDesign(X, names, y, [{ factor: 'g', index: g }]), ssw, ssb, nu0: m * (r - 1), nu1: m - 1, m, r };
}

/**
 * The balanced one-way REML criterion in the expected mean squares λ₀ = σₑ², λ₁ = σₑ² + rσₐ²
 * (Searle, Casella and McCulloch 1992, §6.6 with ch. 3's canonical form of the balanced one-way model):
 * −2ℓ = ν₀ log λ₀ + SSW/λ₀ + ν₁ log λ₁ + SSB/λ₁ + constant.
 */
function remlCriterion(o: { ssw: number; ssb: number; nu0: number; nu1: number }, l0: number, l1: number): number {
  return o.nu0 * Math.log(l0) + o.ssw / l0 + o.nu1 * Math.log(l1) + o.ssb / l1;
}

describe('profile-likelihood intervals: balanced one-way, against the closed-form REML profile', () => {
  const o = oneWay(21, 10, 6, 2);
  const msw = o.ssw / o.nu0;
  const msb = o.ssb / o.nu1;
  const dHat = remlCriterion(o, msw, msb);
  const fit = fitDesign(o.design, { interval: 'profile' });
  const ctx = contextFromFit(o.design, fit);

  it('precondition: interior REML estimate equal to the ANOVA one', () => {
    expect(msb).toBeGreaterThan(msw);
    expect(rel(fit.residualSd ** 2, msw)).toBeLessThan(1e-6);
  });

  it('residual SD: ends where the closed-form LR statistic is χ²₁(0.95)', () => {
    // profiling σₐ for fixed σₑ² = λ₀: λ₁ = max(MSB, λ₀)
    const lr = (l0: number) => remlCriterion(o, l0, Math.max(msb, l0)) - dHat - CHI2_95;
    const lo = Math.sqrt(bisect(lr, 1e-3 * msw, msw));
    const hi = Math.sqrt(bisect(lr, msw, 10 * msw));
    const row = fit.random.find((r) => r.factor === 'residual')!;
    expect(rel(row.lower!, lo)).toBeLessThan(1e-6);
    expect(rel(row.upper!, hi)).toBeLessThan(1e-6);
    // Literature: the exact interval for σₑ² from SSW/σₑ² ~ χ²_{ν₀} (Searle et al. 1992, §3.5):
    // [SSW/χ²_{ν₀,0.975}, SSW/χ²_{ν₀,0.025}]; chi-square quantiles for ν₀ = 50 from scipy 1.10.1,
    // stats.chi2.ppf(0.975, 50) = 71.42019518750642, stats.chi2.ppf(0.025, 50) = 32.357363695658655.
    // Both are first-order equivalent; at 50 df their SD ends differ by about 1% (here 0.6% and 0.8%).
    expect(o.nu0).toBe(50);
    expect(rel(row.lower!, Math.sqrt(o.ssw / 71.42019518750642))).toBeLessThan(0.015);
    expect(rel(row.upper!, Math.sqrt(o.ssw / 32.357363695658655))).toBeLessThan(0.015);
  });

  it('group SD: ends where the closed-form LR statistic is χ²₁(0.95)', () => {
    // profiling σₑ² for fixed σₐ = s: minimise over λ₀ with λ₁ = λ₀ + r s² (derivative root by bisection)
    const profiled = (s: number) => {
      const dd = (l0: number) => o.nu0 / l0 - o.ssw / l0 ** 2 + o.nu1 / (l0 + o.r * s * s) - o.ssb / (l0 + o.r * s * s) ** 2;
      const l0 = bisect(dd, 1e-6 * msw, 100 * msw);
      return remlCriterion(o, l0, l0 + o.r * s * s) - dHat;
    };
    const sHat = Math.sqrt((msb - msw) / o.r);
    expect(profiled(0)).toBeGreaterThan(CHI2_95); // precondition: the lower end is above 0
    const lo = bisect((s) => profiled(s) - CHI2_95, 1e-9, sHat);
    const hi = bisect((s) => profiled(s) - CHI2_95, sHat, 20 * sHat);
    const row = fit.random.find((r) => r.factor === 'g')!;
    expect(rel(row.sd, sHat)).toBeLessThan(1e-6);
    expect(rel(row.lower!, lo)).toBeLessThan(1e-6);
    expect(rel(row.upper!, hi)).toBeLessThan(1e-6);
  });

  it('relative SD σₐ/σₑ: ends match the closed-form profile and the exact F interval for σₐ²/σₑ² roughly', () => {
    // For fixed τ = σₐ²/σₑ², λ₁ = λ₀(1 + rτ) and λ̂₀ = (SSW + SSB/(1 + rτ))/(ν₀ + ν₁).
    const profiled = (t: number) => {
      const k = 1 + o.r * t * t;
      const l0 = (o.ssw + o.ssb / k) / (o.nu0 + o.nu1);
      return remlCriterion(o, l0, l0 * k) - dHat;
    };
    const tHat = Math.sqrt((msb - msw) / o.r / msw);
    expect(profiled(0)).toBeGreaterThan(CHI2_95);
    const lo = bisect((t) => profiled(t) - CHI2_95, 0, tHat);
    const hi = bisect((t) => profiled(t) - CHI2_95, tHat, 50 * tHat);
    const iv = profileVariance(ctx, { kind: 'ratio', term: 0, effect: 0 }, 0.95, 'g/residual');
    expect(rel(iv.lower, lo)).toBeLessThan(1e-6);
    expect(rel(iv.upper, hi)).toBeLessThan(1e-6);
    expect(Math.abs(iv.statisticAtLower - CHI2_95)).toBeLessThan(1e-6);
    expect(Math.abs(iv.statisticAtUpper - CHI2_95)).toBeLessThan(1e-6);
    // Literature: the exact interval for τ from F = MSB/MSW ~ (1 + rτ) F(ν₁, ν₀) (Searle et al. 1992, §3.5):
    // [(F/F_U − 1)/r, (F/F_L − 1)/r], F_U = F_{0.975}(9, 50), F_L = F_{0.025}(9, 50); scipy 1.10.1
    // stats.f.ppf(0.975, 9, 50) and stats.f.ppf(0.025, 9, 50) (values below).
    const F = msb / msw;
    const exactLo = (F / 2.380820887294252 - 1) / o.r;
    const exactHi = (F / 0.2880246550861478 - 1) / o.r;
    // With only 9 df between groups the likelihood and exact intervals differ noticeably (here by 6% at
    // the lower and 10% at the upper end of τ = (σₐ/σₑ)²); checked within 10% and 15%.
    expect(rel(iv.lower ** 2, exactLo)).toBeLessThan(0.1);
    expect(rel(iv.upper ** 2, exactHi)).toBeLessThan(0.15);
    expect(iv.upper ** 2).toBeLessThan(exactHi); // the likelihood interval is the shorter one here
  });

  it('a small group variance gives a lower limit of 0, flagged, where the profile stays below the cutoff', () => {
    const weak = oneWay(5, 6, 4, 0.15);
    const wfit = fitDesign(weak.design);
    const wctx = contextFromFit(weak.design, wfit);
    const iv = profileVariance(wctx, { kind: 'sd', term: 0, effect: 0 }, 0.95, 'sd(g)');
    expect(iv.lower).toBe(0);
    expect(iv.lowerAtZero).toBe(true);
    // closed form at σₐ = 0: λ₀ = λ₁ = (SSW + SSB)/(ν₀ + ν₁)
    const wmsw = weak.ssw / weak.nu0;
    const wmsb = weak.ssb / weak.nu1;
    const best = wmsb > wmsw ? remlCriterion(weak, wmsw, wmsb) : remlCriterion(weak, (weak.ssw + weak.ssb) / (weak.nu0 + weak.nu1), (weak.ssw + weak.ssb) / (weak.nu0 + weak.nu1));
    const pooled = (weak.ssw + weak.ssb) / (weak.nu0 + weak.nu1);
    expect(remlCriterion(weak, pooled, pooled) - best).toBeLessThan(CHI2_95);
    expect(iv.upper).toBeGreaterThan(wfit.random[0].sd);
  });
});

describe('profile-likelihood intervals for fixed effects', () => {
  it('the ML likelihood-ratio statistic at each end is χ²₁(level), checked by refitting with an offset', () => {
    const o = oneWay(8, 5, 4, 1, true);
    for (const level of [0.95, 0.9]) {
      const fit = fitDesign(o.design, { interval: 'profile', level });
      const ml = fitDesign(o.design, { estimation: 'ML' });
      // χ²₁ quantiles: scipy 1.10.1 stats.chi2.ppf(0.95, 1) and stats.chi2.ppf(0.9, 1) = 2.705543454095404
      const target = level === 0.95 ? CHI2_95 : 2.705543454095404;
      for (let j = 0; j < 2; j++) {
        for (const end of [fit.fixed[j].lower, fit.fixed[j].upper]) {
          // refit without column j and with y − end·xⱼ as the response (an independent ML fit)
          const other = 1 - j;
          const X = Array.from({ length: o.design.n }, (_, i) => [o.design.X[i * 2 + other]]);
          const y = Array.from(o.design.y, (v, i) => v - end * o.design.X[i * 2 + j]);
          const constrained = fitDesign(handDesign(X, [o.design.fixedNames[other]], y, [{ factor: 'g', index: Array.from(o.design.random[0].index) }]), { estimation: 'ML' });
          // Tolerance 1e-6 on the statistic: both optima located to ~1e-9 in the criterion.
          expect(Math.abs(constrained.deviance - ml.deviance - target), `${o.design.fixedNames[j]} ${end}`).toBeLessThan(1e-6);
        }
        // the interval surrounds the ML estimate and is wider than zero
        expect(fit.fixed[j].lower).toBeLessThan(ml.fixed[j].estimate);
        expect(fit.fixed[j].upper).toBeGreaterThan(ml.fixed[j].estimate);
        expect(Number.isNaN(fit.fixed[j].df)).toBe(true);
        expect(fit.fixed[j].method).toBe('profile');
      }
    }
  });

  it('a random slope model gets SD intervals for both effects and the residual', () => {
    const rng = testRandom(4);
    const X: number[][] = [], y: number[] = [], g: number[] = [], xs: number[] = [];
    for (let l = 0; l < 10; l++) {
      const b0 = rng.normal(), b1 = 0.4 * b0 + 0.5 * rng.normal();
      for (let k = 0; k < 8; k++) { const x = rng.normal(); X.push([1, x]); y.push(3 + b0 + (1 + b1) * x + 0.7 * rng.normal()); g.push(l); xs.push(x); }
    }
    const d = handDesign(X, ['intercept', 'x'], y, [{ factor: 'g', index: g, slopes: [xs], slopeNames: ['x'] }]);
    const fit = fitDesign(d, { interval: 'profile' });
    const ctx = contextFromFit(d, fit);
    fit.random.forEach((row, i) => {
      expect(row.lower!, `${row.factor} ${row.term}`).toBeLessThan(row.sd);
      expect(row.upper!, `${row.factor} ${row.term}`).toBeGreaterThan(row.sd);
      const target = i === 2 ? { kind: 'residual' as const } : { kind: 'sd' as const, term: 0, effect: i };
      const iv = profileVariance(ctx, target, 0.95, 'check');
      // the statistic at both ends equals the cutoff (Nelder-Mead re-optimisation, 1e-5)
      if (!iv.lowerAtZero) expect(Math.abs(iv.statisticAtLower - CHI2_95)).toBeLessThan(1e-5);
      expect(Math.abs(iv.statisticAtUpper - CHI2_95)).toBeLessThan(1e-5);
    });
  });
});
