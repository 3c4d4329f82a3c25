import { describe, expect, it } from 'vitest';
import type { ModelSpec } from '../../kernel-lib/model/types';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { degenerateReason } from '../../kernel-lib/fit/degenerate';
import { handDesign } from '../helpers/simple-design';

const model: ModelSpec = { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }] };
const rows = (y: (site: number, i: number) => number, x = (i: number) => i) =>
  Array.from({ length: 12 }, (_, k) => ({ site: `s${k % 4}`, x: x(Math.floor(k / 4)) + (k % 3) * 0.25, y: y(k % 4, Math.floor(k / 4)) }));

describe('degenerate data are reported with a reason, not fitted', () => {
  it('a constant response', () => {
    // A variance of a constant is 0: no model of variation can be estimated (common practice, no source).
    const fit = fitModel(rows(() => 7.5), model);
    expect(fit.failure).toBe('degenerate data: the response is constant (every value is 7.5); there is no variation to model');
    expect(fit.converged).toBe(false);
    expect(fit.fixed.every((r) => Number.isNaN(r.estimate))).toBe(true);
  });

  it('a response constant within every level of a grouping factor', () => {
    // Within-level variation is the residual variance; zero in every level leaves it at 0 (common practice, no source).
    const fit = fitModel(rows((s) => 3 + s), model);
    expect(fit.failure).toMatch(/^degenerate data: the response is constant within every level of site/);
    // one level varying is enough to fit
    expect(fitModel(rows((s, i) => 3 + s + (s === 0 ? i * 0.3 + (i % 2) : 0)), model).failure).toBe('');
  });

  it('groups of size one are not "constant within every level"', () => {
    const d = handDesign([[1], [1], [1]], ['intercept'], [1, 2, 3], [{ factor: 'plot', index: [0, 1, 2] }]);
    expect(degenerateReason(d)).toBe('');
  });

  it('a column whose squares overflow is named', () => {
    // Number.MAX_VALUE ≈ 1.8e308 (ECMA-262 §6.1.6.1): (1e200)² overflows to Infinity.
    const fit = fitModel(rows((s, i) => s + i * 0.5 + (i * s) % 3), model);
    expect(fit.failure).toBe('');
    const big = fitModel(rows((s, i) => s + i * 0.5 + (i * s) % 3, (i) => i * 1e200), model);
    expect(big.failure).toMatch(/^values overflow: column x reaches 2\.\d+e\+200/);
  });
});
