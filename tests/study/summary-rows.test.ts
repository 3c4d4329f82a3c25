import { describe, expect, it } from 'vitest';
import type { MetricRow } from '../../kernel-lib/study/metrics';
import { summaryRows } from '../../kernel-lib/study/summary-rows';

// Invented metric rows (not from any study).
const base = { scenario: 's1', variant: 'year random', kind: 'fixed' as const, n: 400 };
const rows: MetricRow[] = [
  { ...base, parameter: 'soil_moisture', metric: 'mean', value: 4.0312, mcse: 0.012 },
  { ...base, parameter: 'soil_moisture', metric: 'bias', value: 0.0312, mcse: 0.012 },
  { ...base, parameter: 'soil_moisture', metric: 'coverage', value: 0.9432, mcse: 0.0071, nominal: 0.95 },
  { ...base, parameter: 'soil_moisture', metric: 'power', value: 1, mcse: 0 },
  { ...base, parameter: 'sd(year)', kind: 'sd', metric: 'sdMean', value: 2.61, mcse: 0.05 },
  { ...base, parameter: 'sd(year)', kind: 'sd', metric: 'bias', value: -0.39, mcse: 0.05 },
  { ...base, parameter: 'year=2022', metric: 'mean', value: 0.75, mcse: 0.05 },
  { ...base, parameter: 'year=2022', metric: 'bias', value: 0.05, mcse: 0.05, note: 'target varies by replicate (realised effects): bias, EmpSE and coverage use each replicate\'s truth' },
  { ...base, parameter: '*', kind: 'fit', metric: 'singularShare', value: 0.05, mcse: 0.011 },
];

describe('summaryRows', () => {
  const { metrics, rows: out } = summaryRows(rows, ['coverage', 'bias', 'power', 'sdMean', 'width']);
  const row = (p: string) => out.find((r) => r.parameter === p)!;

  it('reads the truth back as mean estimate minus bias (bias = mean of estimate − truth; Morris, White and Crowther 2019, Table 6)', () => {
    expect(row('soil_moisture').truth).toBe('4');
    expect(row('sd(year)').truth).toBe('3');
    // a target that varies by replicate is its mean, marked as such
    expect(row('year=2022').truth).toBe('0.7 (mean)');
  });

  it('formats each cell to the digits its Monte Carlo SE supports (formatMetric rule)', () => {
    expect(row('soil_moisture').cells.coverage).toBe('0.943 (0.007)');
    expect(row('soil_moisture').cells.bias).toBe('0.03 (0.01)');
    expect(row('soil_moisture').cells.power).toBe('1.000 (0)');
  });

  it('keeps every parameter with a wanted metric and drops metrics no row has', () => {
    expect(out.map((r) => r.parameter)).toEqual(['soil_moisture', 'sd(year)', 'year=2022']);
    expect(metrics).toEqual(['coverage', 'bias', 'power', 'sdMean']);
  });
});
