/** Reads fitted values, residuals and row ids from a fit-like object for the diagnostic plots. */
import { describeValue, fail } from './plot-input';

export interface ResidualInput {
  fitted?: ArrayLike<number>;
  residuals: ArrayLike<number>;
  rowIds?: ArrayLike<number>;
}

function isNumberArray(value: unknown): value is ArrayLike<number> {
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return true;
  return Array.isArray(value) && value.every((v) => typeof v === 'number');
}

export function readResidualInput(fit: unknown, builder: string, needFitted: boolean): ResidualInput {
  if (fit === null || typeof fit !== 'object') fail(builder, `expected a fit with residuals, got ${describeValue(fit)}`);
  const f = fit as Record<string, unknown>;
  const names = needFitted ? ['fitted', 'residuals'] : ['residuals'];
  for (const name of names) {
    if (!isNumberArray(f[name])) {
      fail(builder, `field '${name}' must be an array of numbers or a Float64Array, got ${describeValue(f[name])}`);
    }
  }
  const residuals = f.residuals as ArrayLike<number>;
  const fitted = needFitted ? (f.fitted as ArrayLike<number>) : undefined;
  if (fitted !== undefined && fitted.length !== residuals.length) {
    fail(builder, `'fitted' has ${fitted.length} values but 'residuals' has ${residuals.length}; expected equal lengths`);
  }
  let rowIds: ArrayLike<number> | undefined;
  if (f.rowIds !== undefined) {
    if (!isNumberArray(f.rowIds) || f.rowIds.length !== residuals.length) {
      fail(builder, `field 'rowIds', when given, must be an array of ${residuals.length} numbers (one per residual)`);
    }
    rowIds = f.rowIds;
  }
  return { fitted, residuals, rowIds };
}
