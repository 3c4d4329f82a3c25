import { describe, expect, it } from 'vitest';
import { selectCompleteRows } from '../../kernel-lib/data/complete-rows';
import { inputError } from '../helpers/input-error';

// Listwise deletion over the columns the model uses (complete-case analysis: Little and Rubin 2019,
// Statistical Analysis with Missing Data, 3rd ed., §3.2). Expected rows counted by hand.
const data = {
  y: [1, null, 3, 4, NaN, 6],
  x: [0.1, 0.2, '', 0.4, 0.5, 0.6],
  unused: [null, null, null, null, null, null],
};
const used = [
  { column: 'y', field: 'response' },
  { column: 'x', field: 'fixed[0]' },
];

describe('selectCompleteRows', () => {
  it('drops rows missing in any used column and reports which columns caused it', () => {
    const r = selectCompleteRows(data, used, 6, 'drop');
    expect(Array.from(r.rowIds)).toEqual([0, 3, 5]);
    expect(r.droppedRows).toEqual([1, 2, 4]);
    expect(r.missingColumns).toEqual(['y', 'x']);
  });

  it('ignores columns the model does not use', () => {
    const r = selectCompleteRows(data, [{ column: 'x', field: 'fixed[0]' }], 6, 'drop');
    expect(Array.from(r.rowIds)).toEqual([0, 1, 3, 4, 5]);
    expect(r.missingColumns).toEqual(['x']);
  });

  it('under "reject" names the first missing cell: lowest row, then first column in model order', () => {
    const e = inputError(() => selectCompleteRows(data, used, 6, 'reject'));
    expect(e.row).toBe(2);
    expect(e.column).toBe('y');
    expect(e.message).toMatch(/row 2: column "y" \(response\) is missing/);
  });

  it('refuses a used column with no value at all', () => {
    const e = inputError(() => selectCompleteRows(data, [{ column: 'unused', field: 'offset' }], 6, 'drop'));
    expect(e.message).toMatch(/column "unused" \(offset\): all values are missing/);
    expect(e.column).toBe('unused');
    // under "reject" the first missing cell already stops it
    expect(inputError(() => selectCompleteRows(data, [{ column: 'unused', field: 'offset' }], 6, 'reject')).row).toBe(1);
  });

  it('keeps everything when nothing is missing, and handles zero rows', () => {
    expect(Array.from(selectCompleteRows({ a: [1, 2] }, [{ column: 'a', field: 'response' }], 2, 'reject').rowIds)).toEqual([0, 1]);
    const empty = selectCompleteRows({ a: [] }, [{ column: 'a', field: 'response' }], 0, 'drop');
    expect(empty.rowIds).toHaveLength(0);
    expect(empty.droppedRows).toEqual([]);
  });
});
