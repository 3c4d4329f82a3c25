/**
 * Studies of count and detection surveys: simulation from the count families and fitting of
 * variants of any family, with metrics on the link scale.
 */
import { describe, expect, it } from 'vitest';
import { ReplicateRunner } from '../../kernel-lib/study/replicate-runner';
import { resolveStudyDesign } from '../../kernel-lib/study/run-study';
import { summarise } from '../../kernel-lib/study/metrics';
import { inputError } from '../helpers/input-error';

const site = { factor: 'site', as: 'random' as const };

function countDesign(extra: Record<string, unknown> = {}) {
  return {
    seed: 31, replicates: 150,
    factors: [{ name: 'site', levels: 30 }], perCell: 6,
    covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } }],
    family: 'poisson',
    truth: { fixed: { intercept: 0.5, x: 0.3 }, sd: { site: 0.5 } },
    variants: [
      { name: 'poisson mixed', model: { response: 'y', family: 'poisson', fixed: ['x'], groups: [site] } },
      { name: 'counts as normal', model: { response: 'y', fixed: ['x'], groups: [site] } },
    ],
    ...extra,
  };
}

describe('count studies', () => {
  it('a Poisson study with 30 sites: Wald coverage of the slope near 0.95 and the site SD recovered', () => {
    const { design } = resolveStudyDesign(countDesign());
    // the normal variant is on another scale than the truth, and the design says so
    expect(design.warnings.some((w) => /counts as normal/.test(w) && /not meaningful/.test(w))).toBe(true);
    const runner = new ReplicateRunner(design);
    const rows = runner.runBatch(0, 0, 150);
    const metrics = summarise(rows, { level: 0.95 });
    const get = (variant: string, parameter: string, metric: string) => metrics.find((m) => m.variant === variant && m.parameter === parameter && m.metric === metric)!;
    const coverage = get('poisson mixed', 'x', 'coverage');
    // nominal 0.95 within 3 Monte Carlo SEs (Morris, White and Crowther 2019, Table 6)
    expect(Math.abs(coverage.value - 0.95)).toBeLessThan(3 * Math.sqrt((0.95 * 0.05) / coverage.n));
    const sdMean = get('poisson mixed', 'sd(site)', 'sdMean');
    // ML of a variance with 30 groups is biased low by about SD²/(2·30) relative (common practice, no source): allow 0.06
    expect(Math.abs(sdMean.value - 0.5)).toBeLessThan(0.06);
    expect(get('poisson mixed', 'x', 'power').value).toBeGreaterThan(0.9);
    // a count model has no residual SD row
    expect(rows.some((r) => r.variant === 'poisson mixed' && r.parameter === 'sd(residual)')).toBe(false);
  });

  it('simulated data are the same for the same replicate and respect trials and aggregation', () => {
    const nb = resolveStudyDesign(countDesign({
      family: 'negative-binomial', truth: { fixed: { intercept: 1, x: 0.3 }, sd: { site: 0.3 }, aggregation: 2 },
      variants: [{ name: 'nb', model: { response: 'y', family: 'negative-binomial', fixed: ['x'], groups: [site] } }],
    })).design;
    const a = new ReplicateRunner(nb).simulate(0, 7).columns.y as Float64Array;
    const b = new ReplicateRunner(nb).simulate(0, 7).columns.y as Float64Array;
    expect(Array.from(a)).toEqual(Array.from(b));
    expect(a.every((v) => Number.isInteger(v) && v >= 0)).toBe(true);
    const bin = resolveStudyDesign(countDesign({
      family: 'binomial', trials: 4, truth: { fixed: { intercept: 0, x: 0.5 }, sd: { site: 0.5 } },
      variants: [{ name: 'detections', model: { response: 'y', family: 'binomial', trials: 4, fixed: ['x'], groups: [site] } }],
    })).design;
    const y = new ReplicateRunner(bin).simulate(0, 1).columns.y as Float64Array;
    expect(y.every((v) => Number.isInteger(v) && v >= 0 && v <= 4)).toBe(true);
    expect(y.some((v) => v === 4) && y.some((v) => v === 0)).toBe(true);
  });

  it('refuses a negative binomial design without aggregation and a binomial variant with other trials', () => {
    let e = inputError(() => resolveStudyDesign(countDesign({ family: 'negative-binomial', variants: [{ name: 'nb', model: { response: 'y', family: 'negative-binomial', fixed: ['x'], groups: [site] } }] })));
    expect(e.field).toBe('design.truth.aggregation');
    e = inputError(() => resolveStudyDesign(countDesign({
      family: 'binomial', trials: 4,
      variants: [{ name: 'detections', model: { response: 'y', family: 'binomial', fixed: ['x'], groups: [site] } }],
    })));
    expect(e.field).toBe('design.variants[0].model.trials');
  });
});
