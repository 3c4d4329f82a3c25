/**
 * Library fit options checked with the messages of the model JSON and the command line
 * (model/option-checks), so `{ level: 2 }` or `{ estimation: 'reml' }` never runs.
 */
import { QuadratInputError, describeValue } from '../model/errors';
import { checkChoice, checkLevel, checkWholeNumber } from '../model/option-checks';
import { INTERVAL_METHODS, type IntervalMethod } from './interval-methods';

/** What checkFitOptions reads (a subset of FitOptions, typed loosely: the values come from callers). */
export interface CheckedFitOptions {
  estimation?: unknown;
  level?: unknown;
  interval?: unknown;
  bootstrap?: { resamples?: unknown };
  start?: ArrayLike<unknown>;
}

export function checkFitOptions(options: CheckedFitOptions, path = 'options'): void {
  if (typeof options !== 'object' || options === null) {
    throw new QuadratInputError(`${path}: expected an object of fit options, got ${describeValue(options)}`, { field: path });
  }
  if (options.estimation !== undefined) checkChoice(options.estimation, ['REML', 'ML'], `${path}.estimation`);
  if (options.level !== undefined) checkLevel(options.level, `${path}.level`);
  if (options.interval !== undefined) checkInterval(options.interval, `${path}.interval`);
  if (options.bootstrap?.resamples !== undefined) checkWholeNumber(options.bootstrap.resamples, `${path}.bootstrap.resamples`, 1);
  if (options.start !== undefined) {
    for (let i = 0; i < options.start.length; i++) {
      const v = options.start[i];
      if (typeof v !== 'number' || !Number.isFinite(v)) {
        throw new QuadratInputError(`${path}.start[${i}]: expected a finite number, got ${describeValue(v)}`, { field: `${path}.start[${i}]` });
      }
    }
  }
}

/** An interval method name, checked against what the engine provides. */
export function checkInterval(name: unknown, field = 'model.interval'): IntervalMethod {
  if (!(INTERVAL_METHODS as readonly unknown[]).includes(name)) {
    throw new QuadratInputError(`${field}: interval method ${describeValue(name)} is not available; expected one of: ${INTERVAL_METHODS.join(', ')}`, { field });
  }
  return name as IntervalMethod;
}
