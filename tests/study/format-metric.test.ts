import { describe, expect, it } from 'vitest';
import { formatMetric } from '../../kernel-lib/study/format-metric';

// Rule: the Monte Carlo SE is shown to one significant digit and the value rounded to the same
// decimal place, so no digit is printed that the simulation cannot support (common practice,
// no source). Expected strings below are worked by hand from that rule.
describe('formatMetric', () => {
  it('rounds the MCSE to one significant digit and the value to the same place', () => {
    expect(formatMetric(0.9432, 0.0071)).toBe('0.943 (0.007)');
    expect(formatMetric(12.345, 0.26)).toBe('12.3 (0.3)');
    expect(formatMetric(0.04, 0.0123)).toBe('0.04 (0.01)');
    expect(formatMetric(-2.71828, 0.05)).toBe('-2.72 (0.05)');
  });

  it('carries an MCSE that rounds up to the next power of ten (0.0096 → 0.01, 96 → 100)', () => {
    expect(formatMetric(0.5, 0.0096)).toBe('0.50 (0.01)');
    expect(formatMetric(0.123456, 0.00096)).toBe('0.123 (0.001)');
    expect(formatMetric(1234.5, 96)).toBe('1200 (100)');
  });

  it('rounds the value left of the decimal point when the MCSE is 10 or more', () => {
    expect(formatMetric(1234.5, 23)).toBe('1230 (20)');
    expect(formatMetric(1234.5, 4)).toBe('1235 (4)');
    expect(formatMetric(98765, 2500)).toBe('99000 (3000)');
  });

  it('drops the sign of a value that rounds to zero', () => {
    expect(formatMetric(-0.0001, 0.004)).toBe('0.000 (0.004)');
    expect(formatMetric(-3, 200)).toBe('0 (200)');
  });

  it('prints degenerate values as NA, Inf or a bare value', () => {
    expect(formatMetric(1, 0)).toBe('1.000 (0)');
    expect(formatMetric(0.25, NaN)).toBe('0.2500 (NA)');
    expect(formatMetric(0.25, -0.1)).toBe('0.2500 (NA)');
    expect(formatMetric(0.25, Infinity)).toBe('0.2500 (NA)');
    expect(formatMetric(NaN, 0.1)).toBe('NA');
    expect(formatMetric(Infinity, 0.1)).toBe('Inf');
    expect(formatMetric(-Infinity, 0.1)).toBe('-Inf');
  });
});
