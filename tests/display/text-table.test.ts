import { describe, expect, it } from 'vitest';
import { formatNumber, renderTable } from '../../kernel-lib/display/text-table';

describe('formatNumber', () => {
  // Significant-digit rounding as Number.prototype.toFixed / toExponential (ECMA-262 §21.1.3.3 and
  // §21.1.3.2); the switch to exponent form outside [1e-4, 1e6) is this module's rule (no source).
  it('shows four significant digits by default', () => {
    expect(formatNumber(3.14159265)).toBe('3.142');
    expect(formatNumber(-0.0123456)).toBe('-0.01235');
    expect(formatNumber(12345.678)).toBe('12346');
    expect(formatNumber(2)).toBe('2.000');
    expect(formatNumber(2, 2)).toBe('2.0');
  });

  it('switches to exponent form for very large and very small magnitudes', () => {
    expect(formatNumber(1234567)).toBe('1.235e+6');
    expect(formatNumber(0.00001234)).toBe('1.234e-5');
    expect(formatNumber(0.0001)).toBe('0.0001000');
  });

  it('writes missing and infinite values as symbols, and 0 as "0"', () => {
    expect(formatNumber(0)).toBe('0');
    expect(formatNumber(NaN)).toBe('—');
    expect(formatNumber(null)).toBe('—');
    expect(formatNumber(undefined)).toBe('—');
    expect(formatNumber(Infinity)).toBe('∞');
    expect(formatNumber(-Infinity)).toBe('-∞');
  });
});

describe('renderTable', () => {
  // Layout rule of the module (numbers right, text left, two spaces between columns; no source);
  // the expected lines are written out by hand.
  it('aligns number columns right and text columns left, under a rule of box-drawing dashes', () => {
    const out = renderTable(['site', 'n', 'mean'], [
      ['North', 3, 1.5],
      ['Sedge bed', 12, -0.25],
    ]);
    expect(out.split('\n')).toEqual([
      '  site' + ' '.repeat(11) + 'n' + ' '.repeat(5) + 'mean',
      '  ' + '─'.repeat(9) + '  ' + '─'.repeat(5) + '  ' + '─'.repeat(7),
      '  North      3.000    1.500',
      '  Sedge bed  12.00  -0.2500',
    ]);
  });

  it('right-aligns numbers written as text, leaves empty cells blank and trims line ends', () => {
    const out = renderTable(['df', 'note'], [['6', null], ['4.0', 'boundary'], [undefined, '']], '');
    expect(out.split('\n')).toEqual([' df  note', '───  ────────', '  6', '4.0  boundary', '']);
  });
});
