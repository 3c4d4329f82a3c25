/**
 * Whether a column enters the model as numbers or as levels, and its numeric values.
 * Row numbers in messages are 1-based data rows (the first row after a CSV header is row 1).
 */
import { QuadratInputError, describeValue } from '../model/errors';

export type ColumnKind = 'numeric' | 'categorical';

function isNumberValue(v: unknown): boolean {
  return typeof v === 'number' || typeof v === 'bigint';
}

/**
 * Numeric when every used value is a number, categorical when none is. A column that mixes
 * numbers and text is an error: silently turning a numeric column with one typo into a
 * many-level factor would change the model.
 */
export function inferColumnKind(values: ArrayLike<unknown>, rowIds: Int32Array, column: string): ColumnKind {
  if (rowIds.length === 0) return 'numeric';
  const firstIsNumber = isNumberValue(values[rowIds[0]]);
  for (let r = 1; r < rowIds.length; r++) {
    const v = values[rowIds[r]];
    if (isNumberValue(v) !== firstIsNumber) {
      const textRow = firstIsNumber ? rowIds[r] : rowIds[0];
      const numberRow = firstIsNumber ? rowIds[0] : rowIds[r];
      throw new QuadratInputError(
        `column "${column}": mixes numbers (row ${numberRow + 1}) and text (row ${textRow + 1} is ${describeValue(values[textRow])}); ` +
          `fix the value or list the column in model.categorical to treat every value as a level`,
        { column, row: textRow + 1 },
      );
    }
  }
  return firstIsNumber ? 'numeric' : 'categorical';
}

/** The values of `column` at rows `rowIds` as finite numbers; throws naming the first bad row. */
export function numericValues(values: ArrayLike<unknown>, rowIds: Int32Array, column: string, role = 'column'): Float64Array {
  const n = rowIds.length;
  const out = new Float64Array(n);
  for (let r = 0; r < n; r++) {
    const v = values[rowIds[r]];
    const x = typeof v === 'number' ? v : typeof v === 'bigint' ? Number(v) : NaN;
    if (!Number.isFinite(x)) {
      const what = isNumberValue(v) ? 'finite numbers' : 'numbers';
      throw new QuadratInputError(`${role} "${column}": expected ${what}, row ${rowIds[r] + 1} has ${describeValue(v)}`, {
        column,
        row: rowIds[r] + 1,
      });
    }
    out[r] = x;
  }
  return out;
}
