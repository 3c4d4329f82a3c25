/**
 * The extra columns of a count or detection model (binomial trials, offset) and the checks on its
 * response: counts are whole numbers ≥ 0, successes lie between 0 and their trials, trials are
 * whole numbers ≥ 1, offsets are finite. Each error names the column and the first offending row
 * (1-based, as in the input table).
 */
import { QuadratInputError, listNames } from '../model/errors';
import type { ResolvedModel } from '../model/types';
import type { Columns } from './columns';
import { numericValues } from './column-kind';

export interface CountColumns {
  /** Binomial trials per used row. */
  trials?: Float64Array;
  /** Offset per used row. */
  offset?: Float64Array;
}

function requireColumn(data: Columns, column: string, field: string): void {
  if (!Object.prototype.hasOwnProperty.call(data, column)) {
    throw new QuadratInputError(`${field}: column "${column}" not found; available columns: ${listNames(Object.keys(data))}`, { field, column });
  }
}

function badRow(message: string, column: string, row: number): never {
  throw new QuadratInputError(message, { column, row });
}

/** Check the response of a non-normal family and read its trials and offset (nothing for gaussian). */
export function countResponseColumns(data: Columns, model: ResolvedModel, rowIds: Int32Array, y: Float64Array): CountColumns {
  const family = model.family;
  if (family === 'gaussian') return {};
  const out: CountColumns = {};
  const column = model.response;
  const n = y.length;
  if (family === 'binomial') {
    const t = model.trials ?? 1;
    let trials: Float64Array;
    if (typeof t === 'string') {
      requireColumn(data, t, 'model.trials');
      trials = numericValues(data[t], rowIds, t, 'trials column');
      for (let r = 0; r < n; r++) {
        if (!Number.isInteger(trials[r]) || trials[r] < 1) {
          badRow(`trials column "${t}": expected whole numbers of at least 1, row ${rowIds[r] + 1} has ${trials[r]}`, t, rowIds[r] + 1);
        }
      }
    } else {
      trials = new Float64Array(n).fill(t);
    }
    for (let r = 0; r < n; r++) {
      const v = y[r];
      if (!Number.isInteger(v) || v < 0 || v > trials[r]) {
        const what = typeof t === 'string' ? `its trials (column "${t}": ${trials[r]})` : `the trials (${t})`;
        badRow(`response column "${column}": a binomial response counts successes, a whole number from 0 to ${what}; row ${rowIds[r] + 1} has ${v}`, column, rowIds[r] + 1);
      }
    }
    out.trials = trials;
  } else {
    let onlyZeroOne = true;
    for (let r = 0; r < n; r++) {
      const v = y[r];
      if (!Number.isInteger(v) || v < 0) {
        badRow(`response column "${column}": the "${family}" family needs counts (whole numbers ≥ 0); row ${rowIds[r] + 1} has ${v}`, column, rowIds[r] + 1);
      }
      if (v > 1) onlyZeroOne = false;
    }
    if (onlyZeroOne && family === 'poisson') {
      throw new QuadratInputError(
        `response column "${column}": every value is 0 or 1, which reads as presence/absence (detections), not counts; use "family": "binomial" (trials 1), or keep "poisson" for rare counts by adding a count above 1 only if the data have one`,
        { column, field: 'model.family' },
      );
    }
  }
  if (model.offset !== undefined) {
    requireColumn(data, model.offset, 'model.offset');
    out.offset = numericValues(data[model.offset], rowIds, model.offset, 'offset column');
  }
  return out;
}
