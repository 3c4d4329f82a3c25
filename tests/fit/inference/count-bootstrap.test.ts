/**
 * Parametric bootstrap of count fits (kernel-lib/fit/inference/count-bootstrap.ts): the resamples
 * follow the fitted model, percentile intervals agree with the normal-theory ones where those are
 * accurate, results do not depend on the worker count, failures are counted.
 */
import { describe, expect, it } from 'vitest';
import { join } from 'path';
import { readCsvFile } from '../../../kernel-lib/data/csv';
import { fitModel } from '../../../kernel-lib/analyse/fit-model';
import { parseModel } from '../../../kernel-lib/model/parse';
import { buildDesign } from '../../../kernel-lib/data/build-design';
import { toColumns, type Columns } from '../../../kernel-lib/data/columns';
import { fitDesign } from '../../../kernel-lib/fit/fit-design';
import { bootstrapFit } from '../../../kernel-lib/fit/inference/bootstrap-fit';
import { summariseBootstrap } from '../../../kernel-lib/fit/inference/bootstrap';
import { CountBootstrapRunner, countBootstrapWidth } from '../../../kernel-lib/fit/inference/count-bootstrap';
import type { ModelSpec } from '../../../kernel-lib/model/types';

const COUNTS = join(__dirname, '..', '..', '..', 'data', 'reference', 'counts');
const reference = (name: string) => JSON.parse(require('fs').readFileSync(join(COUNTS, `${name}.json`), 'utf8'));

function table(name: string): Record<string, unknown[]> {
  const t = readCsvFile(join(COUNTS, `${name}.csv`)) as unknown as Record<string, unknown[]>;
  if (t.effort) t.log_effort = (t.effort as number[]).map((e) => Math.log(e));
  return t;
}

const poisson: ModelSpec = { response: 'y', family: 'poisson', offset: 'log_effort', fixed: ['x'], groups: [{ factor: 'g', as: 'random' }] };

function design(name: string, model: ModelSpec) {
  return buildDesign(toColumns(table(name) as unknown as Columns), parseModel(model));
}

describe('parametric bootstrap for count fits', () => {
  it('Poisson GLM: resampled estimates have the statsmodels SEs, and percentile limits the Wald limits, within Monte Carlo error', () => {
    // statsmodels GLM(y, [1, x], Poisson, offset=log(effort)) (data/reference/counts/poisson-groups.json)
    const ref = reference('poisson-groups').glm;
    const d = design('poisson-groups', { ...poisson, groups: [] });
    const fit = fitDesign(d, { family: 'poisson', interval: 'bootstrap', bootstrap: { resamples: 999, seed: 7 } });
    const B = 999;
    const runner = new CountBootstrapRunner(d, Float64Array.from(fit.fixed, (r) => r.estimate), new Float64Array(0), 7, { options: { family: 'poisson', offset: d.offset }, aggregation: NaN });
    const rows = runner.run(0, B);
    expect(runner.width).toBe(countBootstrapWidth(d));
    for (let j = 0; j < 2; j++) {
      const v = Array.from({ length: B }, (_, b) => rows[b * 2 + j]);
      const mean = v.reduce((a, c) => a + c, 0) / B;
      const sd = Math.sqrt(v.reduce((a, c) => a + (c - mean) ** 2, 0) / (B - 1));
      // SD of B draws has relative MCSE 1/sqrt(2(B − 1)) ≈ 0.022 (common practice, no source): 4 MCSE
      expect(Math.abs(sd / ref.fixed[j].se - 1)).toBeLessThan(0.09);
      // the ML estimate of a GLM is nearly unbiased at n = 120: mean within 4 MCSE (sd/sqrt(B)) plus a small bias allowance
      expect(Math.abs(mean - ref.fixed[j].estimate)).toBeLessThan(4 * sd / Math.sqrt(B) + 0.01 * ref.fixed[j].se);
      // percentile limits (Davison and Hinkley 1997, §5.2) versus estimate ± 1.96 SE: a 2.5% quantile of 999
      // draws has MCSE ≈ 0.085 SE (sqrt(p(1 − p)/B)/φ(1.96)); allow 0.35 SE
      const r = fit.fixed[j];
      expect(r.method).toBe('bootstrap');
      expect(Math.abs(r.lower - (ref.fixed[j].estimate - 1.959964 * ref.fixed[j].se))).toBeLessThan(0.35 * ref.fixed[j].se);
      expect(Math.abs(r.upper - (ref.fixed[j].estimate + 1.959964 * ref.fixed[j].se))).toBeLessThan(0.35 * ref.fixed[j].se);
    }
    // fitDesign's in-thread resamples are the runner's resamples
    const summary = summariseBootstrap(rows, 2, 0.95);
    expect(fit.fixed[1].lower).toBe(summary.intervals[1].lower);
  }, 120_000);

  it('negative binomial GLM: resamples are drawn with the fitted aggregation (their SD matches the statsmodels SE with k fixed)', () => {
    // statsmodels GLM(y, [1, x], NegativeBinomial(alpha = 1/k̂)) SEs: the NB reference case
    const ref = reference('nb-groups');
    const d = design('nb-groups', { response: 'y', family: 'negative-binomial', fixed: ['x'], ...(ref.offset ? { offset: 'log_effort' } : {}) });
    const fit = fitDesign(d, { family: 'negative-binomial' });
    const k = fit.response!.aggregation!;
    const B = 600;
    const runner = new CountBootstrapRunner(d, Float64Array.from(fit.fixed, (r) => r.estimate), new Float64Array(0), 3, { options: { family: 'negative-binomial', offset: d.offset }, aggregation: k });
    const rows = runner.run(0, B);
    const v = Array.from({ length: B }, (_, b) => rows[b * 2 + 1]).filter(Number.isFinite);
    const mean = v.reduce((a, c) => a + c, 0) / v.length;
    const sd = Math.sqrt(v.reduce((a, c) => a + (c - mean) ** 2, 0) / (v.length - 1));
    // the Wald SE of the fit is the statsmodels one (checked in the estimate-step tests); k is re-estimated in each resample, so allow 12%
    expect(Math.abs(sd / fit.fixed[1].se - 1)).toBeLessThan(0.12);
  }, 120_000);

  it('a Poisson random intercept: the same intervals in this thread and on 1 or 2 workers; SD intervals on the link scale', async () => {
    const d = design('poisson-groups', poisson);
    const inThread = fitDesign(d, { family: 'poisson', interval: 'bootstrap', bootstrap: { resamples: 60, seed: 11 } });
    const plain = fitDesign(d, { family: 'poisson' });
    const one = await bootstrapFit(d, plain, { resamples: 60, seed: 11, workers: 1 });
    const two = await bootstrapFit(d, plain, { resamples: 60, seed: 11, workers: 2 });
    expect(Array.from(two.summary.samples)).toEqual(Array.from(one.summary.samples));
    inThread.fixed.forEach((r, j) => {
      expect(one.fit.fixed[j].lower).toBe(r.lower);
      expect(two.fit.fixed[j].upper).toBe(r.upper);
    });
    expect(two.fit.random[0].lower).toBe(inThread.random[0].lower);
    expect(one.summary.width).toBe(3);
    // the SD interval surrounds the estimate and stays positive (common practice, no source)
    const sd = inThread.random[0];
    expect(sd.lower!).toBeGreaterThan(0);
    expect(sd.lower!).toBeLessThan(sd.sd);
    expect(sd.upper!).toBeGreaterThan(sd.sd);
  }, 120_000);

  it('refits that fail are counted and reported, the rest still give intervals', () => {
    // presence/absence separated by x in most draws: the refits without a finite maximum fail
    const x = [-3, -2.5, -2, -1.5, -1, 1, 1.5, 2, 2.5, 3];
    const y = [0, 0, 0, 0, 1, 0, 1, 1, 1, 1];
    const model: ModelSpec = { response: 'y', family: 'binomial', fixed: ['x'], interval: 'bootstrap' };
    const fit = fitModel({ x, y }, model, { bootstrap: { resamples: 200, seed: 5 } });
    const warning = fit.warnings.find((w) => /refits failed/.test(w));
    expect(warning).toBeDefined();
    const failed = Number(/(\d+) of 200 refits failed/.exec(warning!)![1]);
    expect(failed).toBeGreaterThan(0);
    expect(failed).toBeLessThan(200);
    expect(Number.isFinite(fit.fixed[1].lower)).toBe(true);
  });
});
