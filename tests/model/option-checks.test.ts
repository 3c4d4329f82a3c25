import { describe, expect, it } from 'vitest';
import {
  checkChoice, checkLevel, checkShard, editDistance, expectInRange, expectInteger, expectNumber, expectPositive, expectText, nearestName,
  parseWholeNumber, rejectUnknownKeys,
} from '../../kernel-lib/model/option-checks';
import { checkFitOptions } from '../../kernel-lib/fit/check-fit-options';
import { checkStudyOptions } from '../../kernel-lib/study/check-study-options';
import { parseModel } from '../../kernel-lib/model/parse';
import { inputError } from '../helpers/input-error';

// Project rule: library options, model JSON and command line share one message per kind of value.
describe('option checks', () => {
  it('the model JSON and the library options give the same message body for a level', () => {
    const json = inputError(() => parseModel({ response: 'y', level: 2 }));
    const lib = inputError(() => checkFitOptions({ level: 2 }));
    expect(json.message).toBe('model.level: expected a number strictly between 0 and 1 (e.g. 0.95), got 2');
    expect(lib.message).toBe('options.level: expected a number strictly between 0 and 1 (e.g. 0.95), got 2');
    expect(checkLevel(0.9, 'x')).toBe(0.9);
  });

  it('choices are exact: "reml" is refused rather than run as something else', () => {
    expect(inputError(() => checkFitOptions({ estimation: 'reml' })).message).toBe('options.estimation: expected "REML" or "ML", got "reml" (did you mean "REML"?)');
    expect(inputError(() => parseModel({ response: 'y', estimation: 'reml' })).message).toBe('model.estimation: expected "REML" or "ML", got "reml" (did you mean "REML"?)');
    expect(checkChoice('ML', ['REML', 'ML'], 'f')).toBe('ML');
  });

  it('whole numbers and shards', () => {
    expect(inputError(() => expectInteger(-1, 'options.batchSize', 1)).message).toBe('options.batchSize: expected a whole number ≥ 1, got -1');
    expect(inputError(() => parseWholeNumber('-1', '--workers', 1)).message).toBe('--workers: expected a whole number ≥ 1, got "-1"');
    expect(inputError(() => parseWholeNumber('', '--workers', 1)).field).toBe('--workers');
    expect(parseWholeNumber('12', '--replicates', 1)).toBe(12);
    expect(inputError(() => checkShard({ index: 5, count: 3 }, 'options.shard')).message).toBe('options.shard.index: expected a whole number from 1 to 3, got 5');
    expect(checkShard({ index: 2, count: 3 }, 's')).toEqual({ index: 2, count: 3 });
  });

  it('study options: folder, batch size, workers capped at the cores', () => {
    expect(inputError(() => checkStudyOptions({})).field).toBe('options.out');
    expect(inputError(() => checkStudyOptions({ out: 'x', batchSize: 0 })).message).toBe('options.batchSize: expected a whole number from 1 to 100000, got 0');
    expect(inputError(() => checkStudyOptions({ out: 'x', workers: 0 })).field).toBe('options.workers');
    expect(inputError(() => checkStudyOptions({ out: 'x', onProgress: 3 })).field).toBe('options.onProgress');
    const capped = checkStudyOptions({ out: 'x', workers: 1000 }, 2);
    expect(capped.workers).toBe(2);
    expect(capped.warnings).toEqual(['1000 workers requested but 2 cores are available: using 2']);
    expect(checkStudyOptions({ out: 'x' }, 3).workers).toBe(3);
  });

  it('fit options: bootstrap resamples, start values (the interval method: tests/model/interval-rule)', () => {
    expect(inputError(() => checkFitOptions({ bootstrap: { resamples: 0 } })).field).toBe('options.bootstrap.resamples');
    expect(inputError(() => checkFitOptions({ start: [1, NaN] })).field).toBe('options.start[1]');
    expect(() => checkFitOptions({ level: 0.9, estimation: 'ML', interval: 'wald' })).not.toThrow();
  });

  it('nearest valid name for a typo: optimal string alignment distance (Damerau 1964; Levenshtein 1966)', () => {
    // distances by hand: one substitution, one deletion, one swap of neighbours, three edits
    expect(editDistance('fixed', 'fixes')).toBe(1);
    expect(editDistance('fixd', 'fixed')).toBe(1);
    expect(editDistance('fatcors', 'factors')).toBe(1);
    expect(editDistance('kitten', 'sitting')).toBe(3); // the classic example, value from memory
    expect(editDistance('', 'abc')).toBe(3);
    expect(nearestName('fatcors', ['seed', 'factors', 'perCell'])).toBe('factors');
    expect(nearestName('Estimation', ['estimation', 'level'])).toBe('estimation');
    expect(nearestName('colour', ['response', 'fixed', 'groups'])).toBeUndefined();
    // short names need a closer match: "as" is not a typo of "at"
    expect(nearestName('as', ['at'])).toBeUndefined();
  });

  it('unknown keys and choices name the nearest valid one, keys listed in full', () => {
    const e = inputError(() => rejectUnknownKeys({ factor: 'site', wihtin: 'region' }, ['factor', 'as', 'within'], 'design.factors[1]'));
    expect(e.message).toBe('design.factors[1]: unknown key "wihtin" (did you mean "within"?); allowed keys: factor, as, within');
    expect(e.field).toBe('design.factors[1].wihtin');
    expect(inputError(() => checkChoice('gausian', ['gaussian', 'poisson', 'binomial'], 'model.family')).message).toBe(
      'model.family: expected one of "gaussian", "poisson", "binomial", got "gausian" (did you mean "gaussian"?)',
    );
  });

  it('numbers: required, finite, whole, in range, positive, each naming the field', () => {
    expect(inputError(() => expectInteger(undefined, 'design.replicates', 1)).message).toBe('design.replicates: expected a whole number ≥ 1 (required)');
    expect(inputError(() => expectInteger(2.5, 'design.factors[1].levels', 1)).message).toBe('design.factors[1].levels: expected a whole number ≥ 1, got 2.5');
    expect(inputError(() => expectNumber('3', 'x')).message).toBe('x: expected a finite number, got "3"');
    expect(inputError(() => expectInRange(1, 'design.missing', 0, 1, 'a probability')).message).toBe('design.missing: expected a probability in [0, 1), got 1');
    expect(expectInRange(0, 'design.missing', 0, 1)).toBe(0);
    expect(inputError(() => expectPositive(0, 'options.width')).message).toBe('options.width: expected a finite number > 0, got 0');
    expect(inputError(() => expectText(undefined, 'model.response', 'a column name')).message).toBe('model.response: expected a column name (required)');
  });
});
