import { describe, expect, it } from 'vitest';
import { groupPredictions, responseScaleEstimates } from '../../kernel-lib/fit/rate-and-odds-ratios';
import type { FitResult } from '../../kernel-lib/fit/result';

const row = (term: string, estimate: number, lower: number, upper: number, aliased = false) => ({
  term, estimate, lower, upper, aliased, se: 0.1, df: Infinity, method: 'wald',
});
/** A stand-in fit with only what the functions read. */
const fit = (link: 'log' | 'logit' | undefined, fixed = [row('intercept', -1.1, -1.9, -0.3), row('grazing=ungrazed', 0.35, -0.12, 0.82), row('rain', NaN, NaN, NaN, true)]) =>
  ({
    fixed,
    response: link === undefined ? undefined : { family: link === 'log' ? 'poisson' : 'binomial', link },
    modes: [
      { factor: 'site', level: 'site1', term: 'intercept', mode: 0.4, sd: 0.2 },
      { factor: 'site', level: 'site1', term: 'rain', mode: 0.1, sd: 0.1 },
    ],
  }) as unknown as FitResult;

// exp(β) is a rate ratio under the log link and an odds ratio under the logit link, and the
// interval of a monotone transform is the transformed interval (McCullagh and Nelder 1989, §4.4, §6.2).
// Numbers: Python math.exp and scipy 1.10.1 scipy.special.expit at the same arguments.
describe('responseScaleEstimates', () => {
  it('log link: baseline rate and rate ratios with transformed intervals, aliased rows left out', () => {
    const r = responseScaleEstimates(fit('log'));
    expect(r.map((x) => `${x.term} ${x.quantity}`)).toEqual(['intercept baseline rate', 'grazing=ungrazed rate ratio']);
    expect(r[1].value).toBeCloseTo(1.4190675485932571, 14); // math.exp(0.35)
    expect(r[1].lower).toBeCloseTo(0.8869204367171575, 14); // math.exp(-0.12)
    expect(r[1].upper).toBeCloseTo(2.2704998375324057, 14); // math.exp(0.82)
    expect(r[0].value).toBeCloseTo(Math.exp(-1.1), 15);
  });

  it('logit link: baseline probability by the logistic function, odds ratios by exp', () => {
    const r = responseScaleEstimates(fit('logit'));
    expect(r[0].quantity).toBe('baseline probability');
    expect(r[0].value).toBeCloseTo(0.24973989440488234, 15); // expit(-1.1)
    expect(r[0].lower).toBeCloseTo(0.13010847436299786, 15); // expit(-1.9)
    expect(r[0].upper).toBeCloseTo(0.425557483188341, 15); // expit(-0.3)
    expect(r[1].quantity).toBe('odds ratio');
    expect(r[1].value).toBeCloseTo(1.4190675485932571, 14);
  });

  it('nothing for an identity-link fit', () => {
    expect(responseScaleEstimates(fit(undefined))).toEqual([]);
  });
});

describe('groupPredictions', () => {
  it('predicted rate or probability of each random-intercept level at the intercept', () => {
    // log link: exp(−1.1 + 0.4); logit: scipy 1.10.1 expit(−0.7) = 0.3318122278318339
    const log = groupPredictions(fit('log'));
    expect(log).toHaveLength(1);
    expect(log[0]).toMatchObject({ factor: 'site', level: 'site1', quantity: 'rate' });
    expect(log[0].value).toBeCloseTo(Math.exp(-0.7), 15);
    expect(groupPredictions(fit('logit'))[0].value).toBeCloseTo(0.3318122278318339, 15);
  });

  it('nothing without a usable intercept or for an identity link', () => {
    expect(groupPredictions(fit('log', [row('grazing=ungrazed', 0.35, -0.12, 0.82)]))).toEqual([]);
    expect(groupPredictions(fit('log', [row('intercept', NaN, NaN, NaN, true)]))).toEqual([]);
    expect(groupPredictions(fit(undefined))).toEqual([]);
  });
});
