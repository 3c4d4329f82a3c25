import { describe, expect, it } from 'vitest';
import { responseBlocks, responseHeader, responseJson } from '../../kernel-lib/cli/format-response';
import type { FitResult } from '../../kernel-lib/fit/result';

const fixedRow = (term: string, estimate: number, lower: number, upper: number) => ({
  term, estimate, lower, upper, se: 0.2, df: Infinity, method: 'wald', aliased: false,
});
/** A stand-in negative binomial fit with a site random intercept (invented numbers). */
const fit = (over: Partial<FitResult> = {}) => ({
  response: { family: 'negative-binomial', link: 'log', integration: 'quadrature', nodes: 9, aggregation: 2.5, pearsonChi2: 45.2, residualDf: 40, overdispersion: 1.13 },
  fixed: [fixedRow('intercept', 1.2, 0.8, 1.6), fixedRow('grazing=ungrazed', 0.35, -0.12, 0.82)],
  random: [{ factor: 'site', term: 'intercept', sd: 0.4, variance: 0.16 }],
  modes: [{ factor: 'site', level: 'site1', term: 'intercept', mode: -0.25, sd: 0.1 }],
  failure: '',
  ...over,
}) as unknown as FitResult;

// What `quadrat fit` adds for a count or detection fit; numbers are exp() of the stand-in
// estimates (McCullagh and Nelder 1989, §6.2: exp of a log-link coefficient is a rate ratio).
describe('count and detection parts of the fit output', () => {
  it('header names family, link and integration with its nodes', () => {
    expect(responseHeader(fit())).toBe('negative-binomial response, log link · adaptive Gauss-Hermite quadrature (9 nodes)');
    expect(responseHeader(fit({ response: { ...fit().response!, integration: 'laplace', nodes: 1 } }))).toBe('negative-binomial response, log link · Laplace approximation');
    expect(responseHeader(fit({ response: undefined }))).toBeUndefined();
  });

  it('JSON carries the response-scale estimates and group predictions', () => {
    const j = responseJson(fit(), (v) => (Number.isFinite(v) ? v : null)) as Record<string, any>;
    expect(j).toMatchObject({ family: 'negative-binomial', link: 'log', integration: 'quadrature', nodes: 9, aggregation: 2.5 });
    expect(j.overdispersion).toEqual({ pearsonChi2: 45.2, df: 40, ratio: 1.13 });
    expect(j.responseScale[1].quantity).toBe('rate ratio');
    expect(j.responseScale[1].value).toBeCloseTo(Math.exp(0.35), 14);
    expect(j.groupPredictions[0]).toMatchObject({ factor: 'site', level: 'site1', quantity: 'rate' });
    expect(j.groupPredictions[0].value).toBeCloseTo(Math.exp(0.95), 14);
    expect(responseJson(fit({ response: undefined }), (v) => v)).toEqual({});
  });

  it('text blocks: response-scale table, aggregation, overdispersion and scale notes, predictions', () => {
    const text = responseBlocks(fit(), 0.95).join('\n');
    expect(text).toContain('On the response scale (95% intervals transformed from the log scale)');
    expect(text).toMatch(/grazing=ungrazed\s+rate ratio\s+1\.419\s+0\.8869\s+2\.270/);
    expect(text).toContain('aggregation k 2.500');
    expect(text).toContain('Pearson χ² 45.20 / 40 df = 1.13');
    expect(text).toContain('random-effect SDs are on the log scale');
    expect(text).toContain('Predicted rate per level at the intercept');
    expect(responseBlocks(fit({ failure: 'no convergence' }), 0.95)).toEqual([]);
  });
});
