/**
 * The column set every data function takes: one array per column, all the same length.
 * Converters from row records and arquero tables, and a dispatcher that accepts any of them.
 */
import { QuadratInputError, describeValue } from '../model/errors';

export type Columns = Record<string, ArrayLike<unknown>>;

/**
 * What is read from an arquero ColumnTable. Typed by shape so that this module does not load
 * arquero (an ES module) just to check a type.
 */
export interface TableLike {
  columnNames(): string[];
  array(name: string): ArrayLike<unknown>;
}

/** Whether `data` looks like an arquero table. */
function isTableLike(data: unknown): data is TableLike {
  return (
    typeof data === 'object' &&
    data !== null &&
    typeof (data as TableLike).columnNames === 'function' &&
    typeof (data as TableLike).array === 'function'
  );
}

/**
 * Columns from row records. Column order is the order in which keys are first seen; a key
 * absent from a row gives null in that row.
 */
export function columnsFromRecords(rows: readonly object[]): Columns {
  if (!Array.isArray(rows)) throw new QuadratInputError(`data: expected an array of row objects, got ${describeValue(rows)}`);
  const out: Record<string, unknown[]> = {};
  const n = rows.length;
  for (let i = 0; i < n; i++) {
    const row = rows[i] as Record<string, unknown>;
    if (typeof row !== 'object' || row === null || Array.isArray(row)) {
      throw new QuadratInputError(`data row ${i + 1}: expected an object of column values, got ${describeValue(row)}`, {
        row: i + 1,
      });
    }
    for (const key of Object.keys(row)) {
      let col = out[key];
      if (col === undefined) {
        col = new Array<unknown>(n).fill(null);
        out[key] = col;
      }
      const v = row[key];
      col[i] = v === undefined ? null : v;
    }
  }
  return out;
}

/** Columns of an arquero ColumnTable (or anything with `columnNames()` and `array(name)`). */
export function columnsFromTable(table: TableLike): Columns {
  const out: Columns = {};
  for (const name of table.columnNames()) out[name] = table.array(name);
  return out;
}

/**
 * Accept a column set, an array of row records, or an arquero table, and return a column set
 * whose columns all have the same length.
 */
export function toColumns(data: Columns | readonly object[] | TableLike): Columns {
  let cols: Columns;
  if (Array.isArray(data)) cols = columnsFromRecords(data);
  else if (isTableLike(data)) cols = columnsFromTable(data);
  else if (typeof data === 'object' && data !== null) cols = data as Columns;
  else throw new QuadratInputError(`data: expected columns, row records or a table, got ${describeValue(data)}`);
  columnLength(cols);
  return cols;
}

/**
 * The common length of all columns (0 when there are none). Throws when a column is not
 * array-like or lengths differ.
 */
export function columnLength(cols: Columns): number {
  let n = -1;
  let first = '';
  for (const name of Object.keys(cols)) {
    const col = cols[name] as unknown;
    if (typeof col !== 'object' || col === null || typeof (col as ArrayLike<unknown>).length !== 'number') {
      throw new QuadratInputError(`column "${name}": expected an array of values, got ${describeValue(col)}`, { column: name });
    }
    const len = (col as ArrayLike<unknown>).length;
    if (n < 0) {
      n = len;
      first = name;
    } else if (len !== n) {
      throw new QuadratInputError(
        `column "${name}": has ${len} values but column "${first}" has ${n}; all columns must have the same length`,
        { column: name },
      );
    }
  }
  return Math.max(n, 0);
}
