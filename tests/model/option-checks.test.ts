import { describe, expect, it } from 'vitest';
import { checkChoice, checkLevel, checkShard, checkWholeNumber, parseWholeNumber } from '../../kernel-lib/model/option-checks';
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
    expect(inputError(() => checkFitOptions({ estimation: 'reml' })).message).toBe('options.estimation: expected "REML" or "ML", got "reml"');
    expect(inputError(() => parseModel({ response: 'y', estimation: 'reml' })).message).toBe('model.estimation: expected "REML" or "ML", got "reml"');
    expect(checkChoice('ML', ['REML', 'ML'], 'f')).toBe('ML');
  });

  it('whole numbers and shards', () => {
    expect(inputError(() => checkWholeNumber(-1, 'options.batchSize', 1)).message).toBe('options.batchSize: expected a whole number ≥ 1, got -1');
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

  it('fit options: interval names, bootstrap resamples, start values', () => {
    expect(inputError(() => checkFitOptions({ interval: 'Wald' })).field).toBe('options.interval');
    expect(inputError(() => checkFitOptions({ bootstrap: { resamples: 0 } })).field).toBe('options.bootstrap.resamples');
    expect(inputError(() => checkFitOptions({ start: [1, NaN] })).field).toBe('options.start[1]');
    expect(() => checkFitOptions({ level: 0.9, estimation: 'ML', interval: 'wald' })).not.toThrow();
  });
});
