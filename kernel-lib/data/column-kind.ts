/**
 * Whether a column enters the model as numbers or as levels, and its numeric values.
 * Row numbers in messages are 1-based data rows (the first row after a CSV header is row 1).
 */
import { QuadratInputError, describeValue } from '../model/errors';
import { looksLikeDecimalComma } from './csv';

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
      const text = values[textRow];
      throw new QuadratInputError(
        `column "${column}": mixes numbers (row ${numberRow + 1}) and text (row ${textRow + 1} is ${describeValue(text)}); ` +
          `${fixForText(text)}, or list the column in model.categorical to treat every value as a level`,
        { column, row: textRow + 1 },
      );
    }
  }
  return firstIsNumber ? 'numeric' : 'categorical';
}

/** How to repair a text cell in a numeric column: a decimal comma, or a missing-value marker. */
function fixForText(value: unknown): string {
  if (typeof value === 'string' && looksLikeDecimalComma(value)) {
    return `${describeValue(value)} looks like a decimal comma: read the file with decimal "," (--decimal ,) or fix the value`;
  }
  return `if ${describeValue(value)} marks a missing value, add it to the missing-value markers (CSV option missing, --missing), else fix the value`;
}

/** Whether a text cell reads as a plain decimal number ("45.3"). */
function isNumberText(v: unknown): boolean {
  return typeof v === 'string' && v.trim() !== '' && Number.isFinite(Number(v));
}

/** The values of `column` at rows `rowIds` as finite numbers; throws naming the first bad row. */
export function numericValues(values: ArrayLike<unknown>, rowIds: Int32Array, column: string, role = 'column'): Float64Array {
  const n = rowIds.length;
  const out = new Float64Array(n);
  for (let r = 0; r < n; r++) {
    const v = values[rowIds[r]];
    const x = typeof v === 'number' ? v : typeof v === 'bigint' ? Number(v) : NaN;
    if (!Number.isFinite(x)) {
      // numbers stored as text: name the first cell that is not a number at all, the one to fix
      let at = r;
      while (at < n && isNumberText(values[rowIds[at]])) at++;
      if (at === n) at = r;
      const cell = values[rowIds[at]];
      const what = isNumberValue(cell) ? 'finite numbers' : 'numbers';
      const fix = typeof cell === 'string' ? `; ${isNumberText(cell) ? 'the column holds numbers as text: convert them to numbers' : fixForText(cell)}` : '';
      throw new QuadratInputError(`${role} "${column}": expected ${what}, row ${rowIds[at] + 1} has ${describeValue(cell)}${fix}`, {
        column,
        row: rowIds[at] + 1,
      });
    }
    out[r] = x;
  }
  return out;
}
