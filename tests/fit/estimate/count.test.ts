/**
 * Count and detection models through the whole path (model description → design → estimate step
 * → summarise → FitResult → text and JSON), against statsmodels GLM and the scipy marginal
 * maximum (data/reference/counts, make_count_reference.py).
 */
import { describe, expect, it } from 'vitest';
import { join } from 'path';
import { readCsvFile } from '../../../kernel-lib/data/csv';
import { fitModel } from '../../../kernel-lib/analyse/fit-model';
import { fitToJson, formatFit } from '../../../kernel-lib/cli/format-fit';
import { groupPredictions, responseScaleEstimates } from '../../../kernel-lib/fit/rate-and-odds-ratios';
import type { ModelSpec } from '../../../kernel-lib/model/types';
import { COUNT_REFERENCE_DIR, countReference } from '../../helpers/count-reference';

function table(name: string): Record<string, unknown[]> {
  const t = readCsvFile(join(COUNT_REFERENCE_DIR, `${name}.csv`)) as unknown as Record<string, unknown[]>;
  if (t.effort) t.log_effort = (t.effort as number[]).map((e) => Math.log(e));
  return t;
}

const poissonModel: ModelSpec = { response: 'y', family: 'poisson', offset: 'log_effort', fixed: ['x'], groups: [{ factor: 'g', as: 'random' }] };

describe('fitModel with a count family', () => {
  it('a GLM (no grouping factor) equals statsmodels GLM Poisson with offset, with AIC on 2 parameters and the overdispersion warning', () => {
    // statsmodels GLM(y, [1, x], family=Poisson, offset=log(effort)): estimates, bse, llf, pearson_chi2 / df_resid
    const ref = countReference('poisson-groups').glm;
    const fit = fitModel(table('poisson-groups'), { ...poissonModel, groups: [] });
    expect(fit.estimation).toBe('ML');
    fit.fixed.forEach((r, a) => {
      expect(Math.abs(r.estimate - ref.fixed[a].estimate)).toBeLessThan(1e-9);
      expect(Math.abs(r.se - ref.fixed[a].se)).toBeLessThan(1e-9);
      // Wald z interval (common practice, no source): estimate ± 1.959964 SE
      expect(Math.abs(r.upper - (r.estimate + 1.959963984540054 * r.se))).toBeLessThan(1e-9);
    });
    expect(Math.abs(fit.logLik - ref.llf)).toBeLessThan(1e-8);
    expect(Math.abs(fit.aic - (-2 * ref.llf + 4))).toBeLessThan(1e-7);
    expect(fit.response!.overdispersion).toBeCloseTo(ref.pearson_chi2 / ref.df_resid, 9);
    expect(fit.warnings.some((w) => /overdispersion/.test(w) && /negative-binomial/.test(w) && /one level per row/.test(w))).toBe(true);
    expect(fit.random.some((r) => r.factor === 'residual')).toBe(false);
  });

  it('a random intercept by quadrature reaches the scipy marginal maximum; SD, modes and predictions are reported', () => {
    const ref = countReference('poisson-groups').marginal_ml;
    const fit = fitModel(table('poisson-groups'), { ...poissonModel, integration: 'quadrature', nodes: 25 });
    expect(Math.abs(fit.logLik - ref.llf)).toBeLessThan(1e-7);
    expect(Math.abs(fit.random[0].sd - ref.sd)).toBeLessThan(2e-5);
    expect(fit.parameters).toBe(3);
    expect(fit.modes).toHaveLength(12);
    // rate ratio = exp(β) (McCullagh and Nelder 1989, §6.2)
    const rr = responseScaleEstimates(fit).find((r) => r.term === 'x')!;
    expect(rr.quantity).toBe('rate ratio');
    expect(Math.abs(rr.value - Math.exp(ref.fixed[1].estimate))).toBeLessThan(1e-4);
    const pred = groupPredictions(fit);
    expect(pred).toHaveLength(12);
    expect(pred[0].value).toBeCloseTo(Math.exp(fit.fixed[0].estimate + fit.modes[0].mode), 12);
    const text = formatFit(fit, 0.95);
    expect(text).toMatch(/poisson response, log link · adaptive Gauss-Hermite quadrature \(25 nodes\)/);
    expect(text).toMatch(/rate ratio/);
    expect(text).toMatch(/approximate/);
    const json = fitToJson(fit, 0.95) as Record<string, unknown>;
    expect(json).toMatchObject({ family: 'poisson', link: 'log', integration: 'quadrature', nodes: 25 });
  });

  it('negative binomial: aggregation k by ML equals statsmodels (1/alpha) and counts as a parameter', () => {
    // statsmodels NegativeBinomial(y, [1, x], loglike_method='nb2') ML
    const ref = countReference('nb-groups').nb_ml;
    const fit = fitModel(table('nb-groups'), { response: 'y', family: 'negative-binomial', fixed: ['x'] });
    expect(Math.abs(fit.response!.aggregation! - ref.aggregation) / ref.aggregation).toBeLessThan(1e-4);
    expect(Math.abs(fit.logLik - ref.llf)).toBeLessThan(1e-7);
    expect(fit.parameters).toBe(3);
    expect(fitToJson(fit, 0.95)).toMatchObject({ family: 'negative-binomial', aggregation: expect.any(Number) });
  });

  it('binomial with a trials column equals statsmodels GLM Binomial; grouping factors as fixed give an exact GLM', () => {
    const ref = countReference('binomial-groups').glm;
    const fit = fitModel(table('binomial-groups'), { response: 'y', family: 'binomial', trials: 'm', fixed: ['x'] });
    fit.fixed.forEach((r, a) => expect(Math.abs(r.estimate - ref.fixed[a].estimate)).toBeLessThan(1e-9));
    expect(Math.abs(fit.logLik - ref.llf)).toBeLessThan(1e-8);
    expect(responseScaleEstimates(fit).find((r) => r.term === 'x')!.quantity).toBe('odds ratio');
    const fixedGroups = fitModel(table('binomial-groups'), { response: 'y', family: 'binomial', trials: 'm', fixed: ['x'], groups: [{ factor: 'g', as: 'fixed' }] });
    expect(fixedGroups.response!.integration).toBe('exact');
    expect(fixedGroups.fixed).toHaveLength(11);
    expect(fixedGroups.logLik).toBeGreaterThan(fit.logLik);
  });
});
