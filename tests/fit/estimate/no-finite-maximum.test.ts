/**
 * Coefficients with no finite maximum (separation) are named in a warning, not reported silently as
 * ordinary estimates. Separated data are recognised by statsmodels' own separation check (Debian's
 * statsmodels 0.13, Logit raises PerfectSeparationError), run live on the same data.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'child_process';
import { fitModel } from '../../../kernel-lib/analyse/fit-model';
import { unboundedCoefficients } from '../../../kernel-lib/fit/estimate/no-finite-maximum';

// x below 0 is never detected, above 0 always (complete separation); `overlap` swaps two rows.
const x = [-2.1, -1.7, -1.4, -1.1, -0.9, -0.6, -0.4, -0.2, 0.3, 0.5, 0.8, 1.0, 1.3, 1.6, 1.9, 2.2];
const separated = x.map((v) => (v > 0 ? 1 : 0));
const overlap = separated.map((v, i) => (i === 6 ? 1 : i === 9 ? 0 : v));

function statsmodelsSeparates(y: number[]): boolean {
  const script = [
    'import json, sys, numpy as np, statsmodels.api as sm',
    'from statsmodels.tools.sm_exceptions import PerfectSeparationError',
    'd = json.loads(sys.argv[1]); X = sm.add_constant(np.array(d["x"]))',
    'try:\n    sm.Logit(np.array(d["y"]), X).fit(disp=0); print("no")\nexcept PerfectSeparationError:\n    print("yes")',
  ].join('\n');
  return execFileSync('/usr/bin/python3', ['-c', script, JSON.stringify({ x, y })], { encoding: 'utf8' }).trim() === 'yes';
}

describe('unboundedCoefficients', () => {
  it('flags link-scale SEs above 100 and non-finite ones (common practice, no source)', () => {
    // diagonal covariance: SEs 5, 150, NaN
    const cov = Float64Array.of(25, 0, 0, 0, 22500, 0, 0, 0, NaN);
    expect(unboundedCoefficients(cov, 3)).toEqual([1, 2]);
    expect(unboundedCoefficients(Float64Array.of(4), 1)).toEqual([]);
  });
});

describe('a detection fit under separation', () => {
  it('names the coefficient with no finite estimate when statsmodels finds perfect separation', () => {
    expect(statsmodelsSeparates(separated)).toBe(true);
    const fit = fitModel({ y: separated, x }, { response: 'y', family: 'binomial', fixed: ['x'] });
    const warning = fit.warnings.find((w) => /no finite estimate/.test(w));
    expect(warning).toMatch(/for (intercept, )?x:/);
  }, 60_000);

  it('gives no such warning when the classes overlap and statsmodels fits normally', () => {
    expect(statsmodelsSeparates(overlap)).toBe(false);
    const fit = fitModel({ y: overlap, x }, { response: 'y', family: 'binomial', fixed: ['x'] });
    expect(fit.warnings.some((w) => /no finite estimate/.test(w))).toBe(false);
    expect(Number.isFinite(fit.fixed[1].se) && fit.fixed[1].se < 10).toBe(true);
  }, 60_000);
});
