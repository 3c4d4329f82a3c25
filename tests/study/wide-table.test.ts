import { describe, expect, it } from 'vitest';
import type { MetricRow } from '../../kernel-lib/study/metrics';
import { toWideTable } from '../../kernel-lib/study/wide-table';

const m = (scenario: string, parameter: string, metric: MetricRow['metric'], value: number, mcse = 0.01, n = 100): MetricRow => ({
  scenario, variant: 'v', parameter, kind: 'fixed', metric, value, mcse, n,
});

// Long-to-wide pivot (one row per scenario × variant × parameter; common practice, no source).
describe('toWideTable', () => {
  it('one row per scenario × variant × parameter in first-seen order, value, MCSE and n per metric', () => {
    const wide = toWideTable([
      m('s2', 'x', 'bias', 0.02),
      m('s1', 'x', 'bias', -0.01),
      m('s2', 'x', 'coverage', 0.94, 0.007, 400),
      m('s2', 'intercept', 'rmse', 0.3),
    ]);
    expect(wide.map((w) => `${w.scenario}/${w.parameter}`)).toEqual(['s2/x', 's1/x', 's2/intercept']);
    expect(wide[0]).toEqual({
      scenario: 's2', variant: 'v', parameter: 'x', kind: 'fixed',
      bias: 0.02, biasMcse: 0.01, biasN: 100, coverage: 0.94, coverageMcse: 0.007, coverageN: 400,
    });
    expect('coverage' in wide[1]).toBe(false);
  });

  it('refuses the same metric twice for one row instead of overwriting it', () => {
    expect(() => toWideTable([m('s', 'x', 'bias', 1), m('s', 'x', 'bias', 2)])).toThrow(/metric 'bias' appears twice/);
  });

  it('keeps names that contain separators apart', () => {
    const wide = toWideTable([m('a', 'b:c', 'bias', 1), m('a:b', 'c', 'bias', 2)]);
    expect(wide).toHaveLength(2);
  });
});
