import { describe, expect, it } from 'vitest';
import { buildDesign } from '../../kernel-lib/data/build-design';
import { parseModel } from '../../kernel-lib/model/parse';
import type { ModelSpec } from '../../kernel-lib/model/types';
import { inputError } from '../helpers/input-error';

const base = { site: ['a', 'a', 'b', 'b'], x: [0.1, 0.4, 0.2, 0.9] };
const build = (data: Record<string, unknown[]>, model: ModelSpec) => buildDesign(data as never, parseModel(model));

describe('count and detection responses in the design', () => {
  it('reads trials and offset for the used rows', () => {
    const d = build({ ...base, seen: [1, 0, 3, 2], visits: [2, 1, 4, 2], eff: [0, 0.5, -0.2, 1] }, { response: 'seen', family: 'binomial', trials: 'visits', offset: 'eff', fixed: ['x'] });
    expect(Array.from(d.trials!)).toEqual([2, 1, 4, 2]);
    expect(Array.from(d.offset!)).toEqual([0, 0.5, -0.2, 1]);
    expect(Array.from(build({ ...base, seen: [1, 0, 1, 1] }, { response: 'seen', family: 'binomial' }).trials!)).toEqual([1, 1, 1, 1]);
    expect(build({ ...base, n: [0, 3, 5, 2] }, { response: 'n', family: 'poisson' }).trials).toBeUndefined();
  });

  it('names the column and first offending row of every bad value (rows 1-based)', () => {
    let e = inputError(() => build({ ...base, n: [0, 3, -1, 2] }, { response: 'n', family: 'poisson' }));
    expect([e.column, e.row]).toEqual(['n', 3]);
    e = inputError(() => build({ ...base, n: [0, 2.5, 1, 2] }, { response: 'n', family: 'negative-binomial' }));
    expect([e.column, e.row]).toEqual(['n', 2]);
    e = inputError(() => build({ ...base, n: [0, 1, 1, 0] }, { response: 'n', family: 'poisson' }));
    expect(e.message).toMatch(/binomial/);
    e = inputError(() => build({ ...base, s: [1, 3, 1, 0], m: [2, 2, 2, 2] }, { response: 's', family: 'binomial', trials: 'm' }));
    expect([e.column, e.row]).toEqual(['s', 2]);
    e = inputError(() => build({ ...base, s: [1, 1, 1, 0], m: [2, 2, 0, 2] }, { response: 's', family: 'binomial', trials: 'm' }));
    expect([e.column, e.row]).toEqual(['m', 3]);
    e = inputError(() => build({ ...base, s: [1, 1, 1, 0], m: [2, null, 2, 2] }, { response: 's', family: 'binomial', trials: 'm' }));
    expect([e.column, e.row]).toEqual(['m', 2]);
    e = inputError(() => build({ ...base, s: [1, 2, 1, 0] }, { response: 's', family: 'binomial' }));
    expect([e.column, e.row]).toEqual(['s', 2]);
    e = inputError(() => build({ ...base, n: [0, 3, 5, 2], eff: [0, Infinity, 1, 1] }, { response: 'n', family: 'poisson', offset: 'eff' }));
    expect([e.column, e.row]).toEqual(['eff', 2]);
    e = inputError(() => build({ ...base, n: [0, 3, 5, 2] }, { response: 'n', family: 'poisson', offset: 'effort' }));
    expect(e.field).toBe('model.offset');
  });

  it('covers the rest of the bad-input list: each family, each kind of bad trials and offset', () => {
    // counts: non-integer for Poisson, negative for the negative binomial
    let e = inputError(() => build({ ...base, n: [0, 3, 1.5, 2] }, { response: 'n', family: 'poisson' }));
    expect([e.column, e.row]).toEqual(['n', 3]);
    expect(e.message).toMatch(/whole numbers ≥ 0/);
    e = inputError(() => build({ ...base, n: [0, 3, 1, -2] }, { response: 'n', family: 'negative-binomial' }));
    expect([e.column, e.row]).toEqual(['n', 4]);
    // a 0/1 response given to Poisson is refused, naming the family field and the column
    e = inputError(() => build({ ...base, n: [0, 1, 1, 0] }, { response: 'n', family: 'poisson' }));
    expect([e.column, e.field]).toEqual(['n', 'model.family']);
    // but a negative binomial of 0/1 counts is left alone (the check is Poisson's)
    expect(build({ ...base, n: [0, 1, 1, 0] }, { response: 'n', family: 'negative-binomial' }).n).toBe(4);
    // trials: negative, fractional, absent column, text
    e = inputError(() => build({ ...base, s: [1, 1, 1, 0], m: [2, 2, 2, -1] }, { response: 's', family: 'binomial', trials: 'm' }));
    expect([e.column, e.row]).toEqual(['m', 4]);
    e = inputError(() => build({ ...base, s: [1, 1, 1, 0], m: [2, 2.5, 2, 2] }, { response: 's', family: 'binomial', trials: 'm' }));
    expect([e.column, e.row]).toEqual(['m', 2]);
    e = inputError(() => build({ ...base, s: [1, 1, 1, 0] }, { response: 's', family: 'binomial', trials: 'visits' }));
    expect([e.field, e.column]).toEqual(['model.trials', 'visits']);
    e = inputError(() => build({ ...base, s: [1, 1, 1, 0], m: [2, 2, 'two', 2] }, { response: 's', family: 'binomial', trials: 'm' }));
    expect([e.column, e.row]).toEqual(['m', 3]);
    // a fixed number of trials below 1 is a model error
    e = inputError(() => build({ ...base, s: [1, 1, 1, 0] }, { response: 's', family: 'binomial', trials: 0 }));
    expect(e.field).toBe('model.trials');
    // offsets: NaN, −Infinity, text
    for (const bad of [NaN, -Infinity, 'long']) {
      e = inputError(() => build({ ...base, n: [0, 3, 5, 2], eff: [0, 0, bad, 1] }, { response: 'n', family: 'poisson', offset: 'eff' }));
      expect([e.column, e.row]).toEqual(['eff', 3]);
    }
  });
});
