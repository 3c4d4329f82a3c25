import { describe, expect, it } from 'vitest';
import { inferColumnKind, numericValues } from '../../kernel-lib/data/column-kind';
import { inputError } from '../helpers/input-error';

const all = (n: number) => Int32Array.from({ length: n }, (_, i) => i);

// Behaviour asked by the project rule on bad input (DEVELOPERS.md: a QuadratInputError naming the
// column and row; rows are 1-based data rows). Expected rows are counted by hand.
describe('inferColumnKind', () => {
  it('numeric when every used value is a number, categorical when none is', () => {
    expect(inferColumnKind([1.5, 2, 3n], all(3), 'x')).toBe('numeric');
    expect(inferColumnKind(['wet', 'dry'], all(2), 'habitat')).toBe('categorical');
    expect(inferColumnKind([], all(0), 'empty')).toBe('numeric');
  });

  it('looks only at the used rows', () => {
    // row 2 holds text but is not used
    expect(inferColumnKind([1, 'oops', 3], Int32Array.from([0, 2]), 'x')).toBe('numeric');
  });

  it('refuses a column mixing numbers and text, naming the text row', () => {
    const e = inputError(() => inferColumnKind([1.2, 3.4, '5,6', 7], all(4), 'height'));
    expect(e.message).toMatch(/column "height": mixes numbers \(row 1\) and text \(row 3/);
    expect(e.message).toMatch(/decimal comma/);
    expect(e.row).toBe(3);
    expect(e.column).toBe('height');
    // text first, then a number: the text row is still the one named
    const f = inputError(() => inferColumnKind(['n/a', 2], all(2), 'height'));
    expect(f.row).toBe(1);
    expect(f.message).toMatch(/missing-value markers/);
  });
});

describe('numericValues', () => {
  it('returns the used rows as a Float64Array, converting bigint', () => {
    expect(Array.from(numericValues([10, 20n, 30, 40], Int32Array.from([3, 1, 0]), 'x'))).toEqual([40, 20, 10]);
  });

  it('refuses non-finite values and text, naming the input row', () => {
    const e = inputError(() => numericValues([1, Infinity, 3], all(3), 'rain'));
    expect(e.message).toMatch(/column "rain": expected finite numbers, row 2/);
    expect(e.row).toBe(2);
    const g = inputError(() => numericValues([1, 2, 'x'], Int32Array.from([0, 2]), 'rain', 'offset'));
    expect(g.message).toMatch(/^offset "rain": expected numbers, row 3/);
  });

  it('points at the first cell that is not a number at all when numbers are stored as text', () => {
    // "1" and "2.5" read as numbers; "abc" is the cell to fix
    const e = inputError(() => numericValues(['1', '2.5', 'abc'], all(3), 'y'));
    expect(e.row).toBe(3);
    const f = inputError(() => numericValues(['1', '2.5'], all(2), 'y'));
    expect(f.row).toBe(1);
    expect(f.message).toMatch(/numbers as text/);
  });
});
