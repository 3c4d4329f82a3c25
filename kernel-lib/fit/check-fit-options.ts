/**
 * Library fit options checked with the messages of the model JSON and the command line
 * (model/option-checks), so `{ level: 2 }` or `{ estimation: 'reml' }` never runs. The interval
 * method is checked with the family and estimation it goes with (model/interval-rule, by fitDesign).
 */
import { QuadratInputError, describeValue } from '../model/errors';
import { checkChoice, checkLevel, expectInteger, expectObject } from '../model/option-checks';

/** What checkFitOptions reads (a subset of FitOptions, typed loosely: the values come from callers). */
export interface CheckedFitOptions {
  estimation?: unknown;
  level?: unknown;
  interval?: unknown;
  bootstrap?: { resamples?: unknown };
  start?: ArrayLike<unknown>;
}

export function checkFitOptions(options: CheckedFitOptions, path = 'options'): void {
  expectObject(options, path);
  if (options.estimation !== undefined) checkChoice(options.estimation, ['REML', 'ML'], `${path}.estimation`);
  if (options.level !== undefined) checkLevel(options.level, `${path}.level`);
  if (options.bootstrap?.resamples !== undefined) expectInteger(options.bootstrap.resamples, `${path}.bootstrap.resamples`, 1);
  if (options.start !== undefined) {
    for (let i = 0; i < options.start.length; i++) {
      const v = options.start[i];
      if (typeof v !== 'number' || !Number.isFinite(v)) {
        throw new QuadratInputError(`${path}.start[${i}]: expected a finite number, got ${describeValue(v)}`, { field: `${path}.start[${i}]` });
      }
    }
  }
}
