import { describe, expect, it } from 'vitest';
import { levelName } from '../../kernel-lib/model/terms';
import { parsePlan } from '../../kernel-lib/study/plan-spec';
import { inputError } from '../helpers/input-error';

const coef = levelName('treatment', 'unburned');
function design(plan: Record<string, unknown>, extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    seed: 1, replicates: 10, factors: [{ name: 'site', levels: 8 }], perCell: 4,
    covariates: [{ name: 'treatment', varies: 'site', categories: { burned: 0.5, unburned: 0.5 }, allocation: 'balanced' }],
    truth: { fixed: { intercept: 10, [coef]: 1 }, sd: { site: 1, residual: 1 } },
    variants: [{ name: 'site random', model: { response: 'y', fixed: ['treatment'], groups: [{ factor: 'site', as: 'random' }] } }],
    plan, ...extra,
  };
}
const goal = { variant: 'site random', parameter: coef, metric: 'power', atLeast: 0.8 };

describe('parsePlan', () => {
  it('reads values or from/to/step, one goal or several, with defaults', () => {
    const { plan, design: rest } = parsePlan(design({ vary: 'factors.site.levels', from: 4, to: 10, step: 2, ...goal }));
    expect(plan.values).toEqual([4, 6, 8, 10]);
    expect(plan.goals).toEqual([{ variant: 'site random', parameter: coef, metric: 'power', direction: 'atLeast', threshold: 0.8 }]);
    expect(plan.firstReplicates).toBe(100);
    expect(rest.plan).toBeUndefined();
    const two = parsePlan(design({
      vary: 'truth.sd.site', values: [0.2, 0.5, 1], replicates: 50, maxReplicates: 400,
      goals: [goal, { variant: 'site random', metric: 'singularShare', atMost: 0.1 }, { variant: 'site random', parameter: 'sd(site)', metric: 'sdRMSE', atMost: 0.3 }],
    })).plan;
    expect(two.goals.map((g) => [g.parameter, g.metric, g.direction])).toEqual([
      [coef, 'power', 'atLeast'], ['*', 'singularShare', 'atMost'], ['sd(site)', 'sdRMSE', 'atMost'],
    ]);
    expect([two.firstReplicates, two.maxReplicates]).toEqual([50, 400]);
    // 0.1-steps give 0.3, not 0.30000000000000004
    expect(parsePlan(design({ vary: 'truth.sd.site', from: 0.1, to: 0.3, step: 0.1, ...goal })).plan.values).toEqual([0.1, 0.2, 0.3]);
  });

  it('names the field of every bad plan block', () => {
    const field = (plan: Record<string, unknown>, extra?: Record<string, unknown>) => inputError(() => parsePlan(design(plan, extra))).field;
    expect(field({ vary: 'factors.plot.levels', values: [2, 3], ...goal })).toBe('plan.vary');
    expect(inputError(() => parsePlan(design({ vary: 'factors.plot.levels', values: [2, 3], ...goal }))).message).toMatch(/nothing at "factors.plot"/);
    expect(field({ vary: 'factors.site.levels', values: [4, 8], ...goal, variant: 'site fixed' })).toBe('plan.variant');
    expect(field({ vary: 'factors.site.levels', values: [4, 8], ...goal, parameter: 'treatment=grazed' })).toBe('plan.parameter');
    // power does not exist for an SD; sdMean does not exist for a fixed effect
    const sdPower = inputError(() => parsePlan(design({ vary: 'factors.site.levels', values: [4, 8], ...goal, parameter: 'sd(site)' })));
    expect(sdPower.field).toBe('plan.metric');
    expect(sdPower.message).toMatch(/"power" does not exist for an SD parameter \("sd\(site\)"\)/);
    expect(field({ vary: 'factors.site.levels', values: [4, 8], ...goal, metric: 'sdMean' })).toBe('plan.metric');
    expect(field({ vary: 'factors.site.levels', values: [4, 8], ...goal, metric: 'speed' })).toBe('plan.metric');
    // a coefficient whose truth is 0 has a type I error rate, not power
    expect(field({ vary: 'factors.site.levels', values: [4, 8], ...goal }, { truth: { fixed: { intercept: 10 }, sd: { site: 1, residual: 1 } } })).toBe('plan.metric');
    expect(field({ vary: 'factors.site.levels', values: [4, 8, 8], ...goal })).toBe('plan.values[2]');
    expect(field({ vary: 'factors.site.levels', values: [8, 4], ...goal })).toBe('plan.values[1]');
    expect(field({ vary: 'factors.site.levels', values: [4], ...goal })).toBe('plan.values');
    expect(field({ vary: 'factors.site.levels', from: 10, to: 4, step: 2, ...goal })).toBe('plan.to');
    expect(field({ vary: 'factors.site.levels', values: [4, 8], from: 4, ...goal })).toBe('plan.values');
    expect(field({ vary: 'factors.site.levels', values: [4, 8], ...goal, atMost: 0.9 })).toBe('plan.atLeast');
    expect(field({ vary: 'factors.site.levels', values: [4, 8], ...goal, atLeast: 80 })).toBe('plan.atLeast');
    expect(field({ vary: 'factors.site.levels', values: [4, 8], goals: [goal, { ...goal, metric: 'sdMedian' }] })).toBe('plan.goals[1].metric');
    expect(field({ vary: 'factors.site.levels', values: [4, 8], goals: [goal], ...goal })).toBe('plan.goals');
    expect(field({ vary: 'factors.site.levels', values: [4, 8], ...goal, seed: 3 })).toBe('plan.seed');
    expect(field({ vary: 'factors.site.levels', values: [4, 8], ...goal }, { grid: { perCell: [1, 2] } })).toBe('design.grid');
    expect(inputError(() => parsePlan({ ...design({}), plan: undefined })).field).toBe('plan');
  });
});
