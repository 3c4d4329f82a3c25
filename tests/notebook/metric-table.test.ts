import { describe, expect, it } from 'vitest';
import type { MetricRow } from '../../kernel-lib/study/metrics';
import { metricTable } from '../../kernel-lib/notebook/metric-table';

const m = (scenario: string, variant: string, parameter: string, metric: MetricRow['metric'], value: number, mcse: number): MetricRow => ({
  scenario, variant, parameter, kind: 'fixed', metric, value, mcse, n: 400,
});
const scenarios = [
  { index: 0, key: 's1', values: { 'factors.site.levels': 6 } },
  { index: 1, key: 's2', values: { 'factors.site.levels': 12 } },
];

// One row per scenario × variant; "value (MCSE)" by the formatting rule of study/format-metric
// (MCSE to one significant digit, value to the same place; strings worked by hand).
describe('metricTable', () => {
  it('one row per scenario and variant with grid values and "value (MCSE)" per metric, other parameters ignored', () => {
    const rows = metricTable([
      m('s1', 'random', 'slope', 'coverage', 0.9432, 0.0071),
      m('s1', 'random', 'slope', 'bias', 0.0123, 0.004),
      m('s1', 'random', 'intercept', 'bias', 5, 1),
      m('s2', 'random', 'slope', 'coverage', 0.951, 0.011),
      m('s1', 'fixed', 'slope', 'sdMean', 1, 0.1),
    ], scenarios, 'slope');
    expect(rows).toEqual([
      { 'site levels': 6, variant: 'random', coverage: '0.943 (0.007)', bias: '0.012 (0.004)', rmse: '', power: '' },
      { 'site levels': 12, variant: 'random', coverage: '0.95 (0.01)', bias: '', rmse: '', power: '' },
    ]);
  });

  it('takes the metric columns asked for, in that order', () => {
    const rows = metricTable([m('s1', 'v', 'x', 'width', 1.234, 0.02)], scenarios, 'x', ['width', 'coverage']);
    expect(Object.keys(rows[0])).toEqual(['site levels', 'variant', 'width', 'coverage']);
    expect(rows[0].width).toBe('1.23 (0.02)');
  });
});
