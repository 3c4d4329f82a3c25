import { describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runStudy } from '../../kernel-lib/study/run-study';
import type { MetricRow } from '../../kernel-lib/study/metrics';

const out = () => mkdtempSync(join(tmpdir(), 'quadrat-theory-'));
const pick = (m: MetricRow[], variant: string, parameter: string, metric: string, scenario?: string) => {
  const r = m.find((x) => x.variant === variant && x.parameter === parameter && x.metric === metric && (!scenario || x.scenario === scenario));
  if (!r) throw new Error(`no ${metric} for ${variant}/${parameter}/${scenario ?? ''}`);
  return r;
};

describe('studies where theory gives the answer', () => {
  // Ordinary least squares with normal errors: the t interval has exact coverage (any regression
  // text, e.g. Weisberg, Applied Linear Regression, 4th ed. 2014, §2.6). Check: within 3 MCSE.
  it('OLS t intervals cover at the nominal level', async () => {
    const design = {
      seed: 11, replicates: 2000,
      factors: [{ name: 'site', levels: 4 }], perCell: 5,
      covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } }],
      truth: { fixed: { intercept: 2, x: 0.3 }, sd: { residual: 1 } },
      variants: [{ name: 'site fixed', model: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'fixed' }] } }],
    };
    const r = await runStudy(design, { out: out(), workers: 1 });
    for (const parameter of ['intercept', 'x', 'site=site2']) {
      const c = pick(r.metrics!, 'site fixed', parameter, 'coverage');
      expect(Math.abs(c.value - 0.95)).toBeLessThan(3 * Math.sqrt((0.95 * 0.05) / c.n));
    }
  });

  // A covariate assigned at random to observations is independent of the grouping, so both
  // parameterizations estimate its slope without bias (common practice, no source). Check: |bias| < 3 MCSE.
  it('the slope of a randomly assigned covariate is unbiased with site random and with site fixed', async () => {
    const design = {
      seed: 12, replicates: 1500,
      factors: [{ name: 'site', levels: 5 }], perCell: 6,
      covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } }],
      truth: { fixed: { intercept: 1, x: 0.5 }, sd: { site: 1.5, residual: 1 } },
      variants: [
        { name: 'site random', model: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }] } },
        { name: 'site fixed', model: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'fixed' }] } },
      ],
    };
    const r = await runStudy(design, { out: out(), workers: 1 });
    for (const variant of ['site random', 'site fixed']) {
      const b = pick(r.metrics!, variant, 'x', 'bias');
      expect(Math.abs(b.value)).toBeLessThan(3 * b.mcse);
    }
  });

  // The rule of thumb that a random-effect variance needs at least five levels is common practice
  // (no source): the SD estimate's RMSE and its share of zero (singular) estimates shrink as levels grow.
  it('SD recovery improves from 3 to 10 levels', async () => {
    const design = {
      seed: 13, replicates: 600,
      factors: [{ name: 'site', levels: 3 }], perCell: 4,
      truth: { fixed: { intercept: 0 }, sd: { site: 1, residual: 1 } },
      variants: [{ name: 'site random', model: { response: 'y', groups: [{ factor: 'site', as: 'random' }] } }],
      grid: { 'factors.site.levels': [3, 5, 10] },
    };
    const r = await runStudy(design, { out: out(), workers: 1 });
    const rmse = [3, 5, 10].map((k) => pick(r.metrics!, 'site random', 'sd(site)', 'sdRMSE', `factors.site.levels=${k}`));
    const singular = [3, 5, 10].map((k) => pick(r.metrics!, 'site random', '*', 'singularShare', `factors.site.levels=${k}`));
    expect(rmse[1].value + 2 * rmse[1].mcse).toBeLessThan(rmse[0].value);
    expect(rmse[2].value + 2 * rmse[2].mcse).toBeLessThan(rmse[1].value);
    expect(singular[2].value).toBeLessThan(singular[0].value);
    // with 3 levels the SD is underestimated on average (REML truncation at zero), less so with 10
    const bias3 = pick(r.metrics!, 'site random', 'sd(site)', 'bias', 'factors.site.levels=3');
    const bias10 = pick(r.metrics!, 'site random', 'sd(site)', 'bias', 'factors.site.levels=10');
    expect(Math.abs(bias10.value)).toBeLessThan(Math.abs(bias3.value));
  });
});
