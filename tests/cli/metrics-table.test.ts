import { describe, expect, it } from 'vitest';
import { formatMetricsTable } from '../../kernel-lib/cli/metrics-table';
import type { MetricRow } from '../../kernel-lib/study/metrics';

const m = (variant: string, parameter: string, metric: MetricRow['metric'], value: number, mcse: number): MetricRow => ({
  scenario: 'base', variant, parameter, kind: 'fixed', metric, value, mcse, n: 200,
});

// The study summary table of the command line: "value (MCSE)" cells by the rounding rule of
// study/format-metric (worked by hand), columns only for metrics present, in the default order.
describe('formatMetricsTable', () => {
  it('one line per scenario × variant × parameter, only the metrics present, in the default order', () => {
    const text = formatMetricsTable([
      m('random', 'slope', 'bias', 0.0123, 0.004),
      m('random', 'slope', 'coverage', 0.9432, 0.0071),
      m('fixed', 'slope', 'coverage', 0.912, 0.02),
    ]);
    const lines = text.split('\n');
    expect(lines[0].trim().split(/\s{2,}/)).toEqual(['scenario', 'variant', 'parameter', 'truth', 'coverage', 'bias']);
    expect(lines[2]).toMatch(/^\s+base\s+random\s+slope\s+0\.943 \(0\.007\)\s+0\.012 \(0\.004\)$/);
    expect(lines[3]).toMatch(/^\s+base\s+fixed\s+slope\s+0\.91 \(0\.02\)$/);
  });

  it('says "not estimable" in every cell of a coefficient aliased in all replicates', () => {
    const text = formatMetricsTable([
      m('fixed', 'elevation', 'notEstimableShare', 1, 0),
      m('random', 'elevation', 'coverage', 0.95, 0.01),
      m('random', 'elevation', 'notEstimableShare', 0, 0),
    ]);
    const fixedLine = text.split('\n').find((l) => l.includes('fixed'))!;
    expect(fixedLine).toMatch(/elevation\s+not estimable\s+1\.000 \(0\)$/);
  });

  it('takes the metrics asked for', () => {
    const text = formatMetricsTable([m('v', 'x', 'rmse', 0.31, 0.02), m('v', 'x', 'bias', 0.1, 0.02)], ['rmse']);
    expect(text).not.toContain('bias');
    expect(text).toContain('0.31 (0.02)');
  });

  it('shows the true value beside each parameter: mean estimate − bias', () => {
    const text = formatMetricsTable([m('v', 'x', 'mean', 2.5123, 0.004), m('v', 'x', 'bias', 0.0123, 0.004)], ['bias']);
    expect(text.split('\n')[2]).toMatch(/\sx\s+2\.5\s+0\.012 \(0\.004\)$/);
  });
});
