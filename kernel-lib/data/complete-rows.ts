/**
 * The missing-value policy: which input rows a model can use.
 * A row is incomplete when any column the model uses is missing there (see ./missing).
 */
import { QuadratInputError } from '../model/errors';
import type { MissingPolicy } from '../model/types';
import type { Columns } from './columns';
import { isMissing } from './missing';

/** A column the model reads, with the model field that asks for it (for messages). */
export interface UsedColumn {
  column: string;
  field: string;
}

export interface CompleteRows {
  /** 0-based input rows kept, ascending. */
  rowIds: Int32Array;
  /** 0-based input rows dropped, ascending. */
  droppedRows: number[];
  /** Used columns with at least one missing value among the dropped rows, in model order. */
  missingColumns: string[];
}

/**
 * Rows complete in every used column. Policy "drop" removes the others; "reject" throws on the
 * first one (lowest row, then first column in model order). A used column with no value at all
 * is an error under both policies.
 */
export function selectCompleteRows(data: Columns, used: readonly UsedColumn[], nRows: number, policy: MissingPolicy): CompleteRows {
  const m = used.length;
  const cols = used.map((u) => data[u.column]);
  const missingCount = new Int32Array(m);
  const keep = new Uint8Array(nRows);
  let kept = 0;
  for (let i = 0; i < nRows; i++) {
    let complete = 1;
    for (let j = 0; j < m; j++) {
      if (isMissing(cols[j][i])) {
        if (policy === 'reject') {
          const { column, field } = used[j];
          throw new QuadratInputError(
            `row ${i + 1}: column "${column}" (${field}) is missing and model.missing is "reject"; ` +
              `fill the value or use missing: "drop"`,
            { column, row: i + 1, field },
          );
        }
        missingCount[j]++;
        complete = 0;
      }
    }
    keep[i] = complete;
    kept += complete;
  }
  for (let j = 0; j < m; j++) {
    if (nRows > 0 && missingCount[j] === nRows) {
      const { column, field } = used[j];
      throw new QuadratInputError(`column "${column}" (${field}): all values are missing`, { column, field });
    }
  }
  const rowIds = new Int32Array(kept);
  const droppedRows: number[] = [];
  for (let i = 0, k = 0; i < nRows; i++) {
    if (keep[i]) rowIds[k++] = i;
    else droppedRows.push(i);
  }
  const missingColumns = used.filter((_, j) => missingCount[j] > 0).map((u) => u.column);
  return { rowIds, droppedRows, missingColumns };
}
