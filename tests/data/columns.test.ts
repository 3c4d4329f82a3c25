import { describe, expect, it } from 'vitest';
import * as aq from 'arquero';
import { columnLength, columnsFromRecords, columnsFromTable, toColumns } from '../../kernel-lib/data/columns';
import { inputError } from '../helpers/input-error';

// The three input shapes (column set, row records, arquero table) give the same column set
// (module contract; arquero 7 `table()`/`from()` as the general-purpose reference for tables).
describe('columnsFromRecords', () => {
  it('collects columns in order of first appearance, absent keys as null', () => {
    const cols = columnsFromRecords([{ site: 'A', y: 1 }, { y: 2, x: 0.5 }, { site: 'B', y: undefined }]);
    expect(Object.keys(cols)).toEqual(['site', 'y', 'x']);
    expect(cols.site).toEqual(['A', null, 'B']);
    expect(cols.y).toEqual([1, 2, null]);
    expect(cols.x).toEqual([null, 0.5, null]);
  });

  it('refuses rows that are not objects, naming the row', () => {
    expect(inputError(() => columnsFromRecords([{ a: 1 }, [1, 2] as unknown as object])).row).toBe(2);
    expect(inputError(() => columnsFromRecords([null as unknown as object])).message).toMatch(/data row 1/);
  });
});

describe('columnsFromTable and toColumns', () => {
  it('reads an arquero table column by column, the same as its records', () => {
    const records = [{ site: 'A', y: 1.5 }, { site: 'B', y: 2.5 }];
    const t = aq.from(records);
    const fromTable = columnsFromTable(t);
    expect(Array.from(fromTable.site)).toEqual(['A', 'B']);
    expect(Array.from(fromTable.y)).toEqual([1.5, 2.5]);
    const viaDispatch = toColumns(t);
    expect(Object.keys(viaDispatch)).toEqual(['site', 'y']);
    expect(toColumns(records)).toEqual(columnsFromRecords(records));
    const set = { a: [1, 2] };
    expect(toColumns(set)).toBe(set);
  });

  it('refuses what is not data, and columns of unequal length, naming the column', () => {
    expect(inputError(() => toColumns(42 as never)).message).toMatch(/expected columns, row records or a table/);
    const e = inputError(() => toColumns({ a: [1, 2], b: [1, 2, 3] }));
    expect(e.column).toBe('b');
    expect(e.message).toMatch(/has 3 values but column "a" has 2/);
    expect(inputError(() => toColumns({ a: 5 } as never)).column).toBe('a');
  });
});

describe('columnLength', () => {
  it('is the common length, 0 for no columns, and accepts typed arrays', () => {
    expect(columnLength({ a: new Float64Array(4), b: ['w', 'x', 'y', 'z'] })).toBe(4);
    expect(columnLength({})).toBe(0);
  });
});
