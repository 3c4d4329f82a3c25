import { describe, expect, it } from 'vitest';
import { checkFactorLevels, checkSurveyRows } from '../../kernel-lib/design/size-limits';
import { inputError } from '../helpers/input-error';

// Sizes are refused before anything is allocated (project rule: bad input gives a clear
// QuadratInputError naming the field). Limits: 1,000,000 levels, 10,000,000 rows (module constants).
describe('checkFactorLevels', () => {
  it('accepts up to the limit and refuses beyond it, naming field, factor and memory', () => {
    expect(() => checkFactorLevels('site', 1_000_000, 'design.factors[0].levels')).not.toThrow();
    const e = inputError(() => checkFactorLevels('site', 1e9, 'design.factors[0].levels'));
    expect(e.field).toBe('design.factors[0].levels');
    // 1e9 levels × 64 bytes = 64 GB (arithmetic by hand)
    expect(e.message).toMatch(/factor "site" would have 1,000,000,000 levels, beyond the limit of 1,000,000; .* about 64 GB/);
  });
});

describe('checkSurveyRows', () => {
  it('multiplies the levels by perCell and refuses more than ten million rows', () => {
    expect(() => checkSurveyRows([100, 100, 10], 100, 'design.perCell')).not.toThrow(); // exactly 10^7
    const e = inputError(() => checkSurveyRows([100, 100, 10], 101, 'design.perCell'));
    expect(e.field).toBe('design.perCell');
    expect(e.message).toMatch(/would have 10,100,000 rows/);
    // 1.01e7 rows × (4·3 + 8·9 = 84 bytes) = 848 MB (arithmetic by hand)
    expect(e.message).toMatch(/about 848 MB in memory/);
  });

  it('gives a size in readable units for very large typos', () => {
    const e = inputError(() => checkSurveyRows([1e9], 1e6, 'design.perCell'));
    // 1e15 rows × (4 + 56 = 60 bytes) = 6e16 bytes = 60 PB
    expect(e.message).toMatch(/about 60 PB/);
  });
});
