import { describe, expect, it } from 'vitest';
import { checkSurveyColumns, columnOverview, columnRoles, columnsToRecords } from '../../kernel-lib/notebook/survey-columns';
import { inputError } from '../helpers/input-error';

// Invented survey table; every expected cell is tallied by hand.
const data = {
  site: ['ashpool', 'ashpool', 'fen', 'fen', 'moor', 'heath', null],
  plot: ['1', '2', '1', '2', '1', '1', '1'],
  cover: [12.5, null, 20, 22.25, 8, 9, 10],
  visits: new Float64Array([2, 2, 2, 2, 2, 2, 2]),
  notes: [null, '', null, null, null, null, null],
};
const columns = { response: 'cover', factors: ['site', 'plot'], covariates: ['visits'] };

describe('columnOverview and columnRoles', () => {
  it('one row per column: role, type, missing, distinct values, range or first levels', () => {
    const rows = columnOverview(data, columnRoles(columns));
    expect(rows).toEqual([
      { column: 'site', role: 'grouping factor', type: 'text', missing: 1, distinct: 4, values: 'ashpool, fen, heath, moor' },
      { column: 'plot', role: 'grouping factor', type: 'text', missing: 0, distinct: 2, values: '1, 2' },
      { column: 'cover', role: 'response', type: 'number', missing: 1, distinct: 6, values: '8 to 22.3' },
      { column: 'visits', role: 'covariate', type: 'number', missing: 0, distinct: 1, values: '2' },
      { column: 'notes', role: '', type: 'empty', missing: 7, distinct: 0, values: '' },
    ]);
  });

  it('shows at most four levels, then an ellipsis', () => {
    const [row] = columnOverview({ g: ['e', 'd', 'c', 'b', 'a'] });
    expect(row.values).toBe('a, b, c, d, …');
  });
});

describe('checkSurveyColumns', () => {
  it('accepts a usable table', () => {
    expect(() => checkSurveyColumns(data, columns)).not.toThrow();
  });

  it('names the column (and row) that is absent or unusable', () => {
    expect(inputError(() => checkSurveyColumns(data, { ...columns, factors: ['transect'] })).column).toBe('transect');
    const text = inputError(() => checkSurveyColumns({ ...data, cover: [1, 2, '3,5', 4, 5, 6, 7] }, columns));
    expect(text.row).toBe(3);
    expect(text.message).toMatch(/must hold numbers; row 3 holds "3,5"/);
    expect(inputError(() => checkSurveyColumns({ ...data, cover: Array(7).fill(null) }, columns)).message).toMatch(/has no values/);
    expect(inputError(() => checkSurveyColumns(data, { ...columns, factors: ['notes'] })).message).toMatch(/"notes" \(a grouping factor\) has no values/);
  });
});

describe('columnsToRecords', () => {
  it('turns columns (typed arrays too) into rows, nested labels with their outer label in front', () => {
    const rows = columnsToRecords(data, { plot: 'site' });
    expect(rows).toHaveLength(7);
    expect(rows[2]).toEqual({ site: 'fen', plot: 'fen/1', cover: 20, visits: 2, notes: null });
    expect(rows[6].plot).toBeNull(); // missing outer label: the nested label is missing too
    expect(columnsToRecords(data)[2].plot).toBe('1');
  });
});
