import { describe, expect, it } from 'vitest';
import { checkReplicateRow, isUnusableStatus, type ReplicateRow } from '../../kernel-lib/study/replicate-row';

const good: ReplicateRow = {
  scenario: 'A', variant: 'siteRandom', replicate: 3, parameter: 'grazing=ungrazed', kind: 'fixed', truth: 0.4,
  estimate: 0.38, se: 0.1, lower: 0.18, upper: 0.58, df: 11.2, status: 'ok', reason: '',
};

// The tidy row contract of the study table (module contract; checks named by hand).
describe('checkReplicateRow', () => {
  it('accepts a complete row, and NaN for missing estimates and intervals', () => {
    expect(() => checkReplicateRow(good, 0)).not.toThrow();
    const failed = { ...good, estimate: NaN, se: NaN, lower: NaN, upper: NaN, df: NaN, status: 'failed', reason: 'no convergence' };
    expect(() => checkReplicateRow(failed, 1)).not.toThrow();
  });

  it('names the row index and the field of the first problem', () => {
    const cases: [unknown, RegExp][] = [
      [null, /replicate row 7: expected an object, got null/],
      [{ ...good, variant: 4 }, /row 7: field 'variant' must be a string, got 4/],
      [{ ...good, se: '0.1' }, /field 'se' must be a number \(NaN when missing\), got '0.1'/],
      [{ ...good, df: undefined }, /field 'df' must be a number .* got undefined \(missing\)/],
      [{ ...good, replicate: NaN }, /field 'replicate' must be a finite number/],
      [{ ...good, truth: NaN }, /field 'truth' must be finite \(use 0 when absent\)/],
      [{ ...good, kind: 'variance' }, /field 'kind' must be one of fixed, sd, correlation, got 'variance'/],
      [{ ...good, status: 'boundary' }, /field 'status' must be one of ok, singular, nonconverged, failed, aliased/],
      [{ ...good, se: -0.1 }, /field 'se' must be >= 0 or NaN, got -0.1/],
      [{ ...good, lower: 1, upper: 0.5 }, /field 'lower' \(1\) exceeds 'upper' \(0.5\)/],
    ];
    for (const [row, message] of cases) expect(() => checkReplicateRow(row, 7)).toThrow(message);
  });
});

describe('isUnusableStatus', () => {
  it('failed and aliased rows carry no estimate; singular and nonconverged ones do', () => {
    expect(isUnusableStatus('failed')).toBe(true);
    expect(isUnusableStatus('aliased')).toBe(true);
    expect(isUnusableStatus('ok')).toBe(false);
    expect(isUnusableStatus('singular')).toBe(false);
    expect(isUnusableStatus('nonconverged')).toBe(false);
  });
});
