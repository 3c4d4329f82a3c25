import { describe, expect, it } from 'vitest';
import { modelToJson, parseModel } from '../../kernel-lib/model/parse';
import type { ModelSpec } from '../../kernel-lib/model/types';
import { inputError } from '../helpers/input-error';

// The validation rules below are the project's own contract (kernel-lib/model/parse.ts);
// field-path messages and rejecting unknown keys are common practice, no source.


function deepFreeze<T>(value: T): T {
  if (typeof value === 'object' && value !== null) {
    for (const v of Object.values(value)) deepFreeze(v);
    Object.freeze(value);
  }
  return value;
}

describe('parseModel: defaults', () => {
  it('fills every default for a response-only model', () => {
    expect(parseModel({ response: 'cover' })).toEqual({
      response: 'cover',
      family: 'gaussian',
      fixed: [],
      intercept: true,
      groups: [],
      estimation: 'REML',
      categorical: [],
      missing: 'drop',
      interval: 'satterthwaite',
      level: 0.95,
    });
  });

  it('fills slopes [] always and correlated true only when slopes are given', () => {
    const m = parseModel({
      response: 'y',
      fixed: ['x'],
      groups: [
        { factor: 'site', as: 'random', slopes: ['x'] },
        { factor: 'plot', as: 'random', within: 'site' },
        { factor: 'year', as: 'random', slopes: ['x'], correlated: false },
      ],
    });
    expect(m.groups).toEqual([
      { factor: 'site', as: 'random', slopes: ['x'], correlated: true },
      { factor: 'plot', as: 'random', within: 'site', slopes: [] },
      { factor: 'year', as: 'random', slopes: ['x'], correlated: false },
    ]);
  });

  it('accepts JSON text and does not modify a frozen input', () => {
    const spec = deepFreeze({
      response: 'y',
      fixed: ['x', { column: 'habitat', reference: 'wet' }, 'x:habitat'],
      groups: [{ factor: 'site', as: 'fixed', slopes: ['x'], reference: 'B' }],
      estimation: 'ML',
      categorical: ['year'],
      missing: 'reject',
      interval: 'satterthwaite',
      level: 0.9,
    }) as ModelSpec;
    const fromObject = parseModel(spec);
    expect(parseModel(JSON.stringify(spec))).toEqual(fromObject);
    expect(fromObject.estimation).toBe('ML');
    expect(fromObject.level).toBe(0.9);
    expect(fromObject.groups[0]).toEqual({ factor: 'site', as: 'fixed', slopes: ['x'], correlated: true, reference: 'B' });
  });

  it('stores a numeric reference level as text', () => {
    const m = parseModel({ response: 'y', fixed: [{ column: 'year', reference: 2021 }] });
    expect(m.fixed).toEqual([{ column: 'year', reference: '2021' }]);
  });

  it('allows within to name a column that is not a group', () => {
    const m = parseModel({ response: 'y', groups: [{ factor: 'plot', as: 'random', within: 'site' }] });
    expect(m.groups[0].within).toBe('site');
  });

  it('allows a group factor inside an interaction', () => {
    expect(() => parseModel({ response: 'y', fixed: ['x', 'x:site'], groups: [{ factor: 'site', as: 'random' }] })).not.toThrow();
  });
});

describe('modelToJson', () => {
  it('round-trips through parseModel and JSON text', () => {
    const m = parseModel({
      response: 'y',
      fixed: ['x', { column: 'habitat' }, 'x:habitat'],
      groups: [
        { factor: 'site', as: 'random', slopes: ['x'], correlated: false, reference: 'A' },
        { factor: 'plot', as: 'fixed', within: 'site' },
      ],
      categorical: ['habitat'],
      level: 0.8,
    });
    const json = modelToJson(m);
    expect(parseModel(json)).toEqual(m);
    expect(parseModel(JSON.parse(JSON.stringify(json)))).toEqual(m);
    // Every default is written out.
    expect(Object.keys(json).sort()).toEqual(
      ['categorical', 'estimation', 'fixed', 'groups', 'intercept', 'interval', 'level', 'missing', 'response'].sort(),
    );
  });

  it('returns a copy that shares no arrays with the model', () => {
    const m = parseModel({ response: 'y', fixed: ['x'], groups: [{ factor: 's', as: 'random', slopes: ['x'] }] });
    const json = modelToJson(m);
    json.fixed!.push('z');
    json.groups![0].slopes!.push('z');
    expect(m.fixed).toEqual(['x']);
    expect(m.groups[0].slopes).toEqual(['x']);
  });
});

describe('parseModel: errors name the field', () => {
  const base = { response: 'y' };

  it('rejects a bad group role with the exact field path', () => {
    const e = inputError(() =>
      parseModel({ ...base, groups: [{ factor: 'site', as: 'random' }, { factor: 'plot', as: 'rand' }] }),
    );
    expect(e.message).toBe('model.groups[1].as: expected "random" or "fixed", got "rand"');
    expect(e.field).toBe('model.groups[1].as');
    expect(e.name).toBe('QuadratInputError');
  });

  it('requires as', () => {
    expect(inputError(() => parseModel({ ...base, groups: [{ factor: 'site' }] })).message).toBe(
      'model.groups[0].as: expected "random" or "fixed" (required)',
    );
  });

  it('names the slope index', () => {
    const e = inputError(() =>
      parseModel({
        ...base,
        groups: [
          { factor: 'a', as: 'random' },
          { factor: 'b', as: 'random' },
          { factor: 'c', as: 'random', slopes: [3] },
        ],
      }),
    );
    expect(e.message).toBe('model.groups[2].slopes[0]: expected a column name, got 3');
  });

  it('lists allowed keys for an unknown key', () => {
    const top = inputError(() => parseModel({ ...base, fixd: ['x'] }));
    expect(top.message).toBe(
      'model: unknown key "fixd" (did you mean "fixed"?); allowed keys: response, fixed, intercept, groups, estimation, categorical, missing, interval, level, family, trials, offset, integration, nodes',
    );
    const group = inputError(() => parseModel({ ...base, groups: [{ factor: 's', as: 'random', nested: 'x' }] }));
    expect(group.message).toBe(
      'model.groups[0]: unknown key "nested"; allowed keys: factor, as, within, slopes, split, correlated, reference',
    );
    const term = inputError(() => parseModel({ ...base, fixed: [{ column: 'h', ref: 'a' }] }));
    expect(term.message).toBe('model.fixed[0]: unknown key "ref"; allowed keys: column, reference');
  });

  it('checks intercept: true or false, and false only with a fixed term', () => {
    expect(parseModel({ response: 'y', fixed: ['x'], intercept: false }).intercept).toBe(false);
    expect(inputError(() => parseModel({ response: 'y', fixed: ['x'], intercept: 0 })).message).toBe(
      'model.intercept: expected true or false, got 0',
    );
    const e = inputError(() => parseModel({ response: 'y', intercept: false }));
    expect(e.message).toBe('model.intercept: a model without an intercept needs at least one fixed term');
    expect(e.field).toBe('model.intercept');
  });

  it('checks split: names fixed main-effect terms', () => {
    const m = parseModel({ response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random', split: ['x'] }] });
    expect(m.groups[0].split).toEqual(['x']);
    expect(modelToJson(m).groups?.[0].split).toEqual(['x']);
    expect(parseModel({ response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }] }).groups[0]).not.toHaveProperty('split');
    const e = inputError(() => parseModel({ response: 'y', fixed: ['x:z'], groups: [{ factor: 'site', as: 'random', split: ['x'] }] }));
    expect(e.field).toBe('model.groups[0].split[0]');
    expect(e.message).toMatch(/"x" must also be a fixed term/);
  });

  it('requires a response and an object', () => {
    expect(inputError(() => parseModel({})).message).toBe('model.response: expected a column name (required)');
    expect(inputError(() => parseModel({ response: '' })).message).toBe('model.response: expected a column name, got ""');
    expect(inputError(() => parseModel([1])).message).toBe('model: expected an object, got an array');
    expect(inputError(() => parseModel('{"response":')).message).toMatch(/^model: not valid JSON \(/);
    expect(inputError(() => parseModel(null, 'study.variants[2]')).message).toBe(
      'study.variants[2]: expected an object, got null',
    );
  });

  it('rejects duplicate grouping factors', () => {
    const e = inputError(() =>
      parseModel({ ...base, groups: [{ factor: 'site', as: 'random' }, { factor: 'site', as: 'fixed' }] }),
    );
    expect(e.message).toBe('model.groups[1].factor: duplicate grouping factor "site" (same as model.groups[0])');
  });

  it('checks within: not itself, not a cycle', () => {
    expect(inputError(() => parseModel({ ...base, groups: [{ factor: 'plot', as: 'random', within: 'plot' }] })).message).toBe(
      'model.groups[0].within: "plot" cannot be nested within itself',
    );
    const cycle = inputError(() =>
      parseModel({
        ...base,
        groups: [
          { factor: 'a', as: 'random', within: 'b' },
          { factor: 'b', as: 'random', within: 'a' },
        ],
      }),
    );
    expect(cycle.message).toBe('model.groups[0].within: nesting loops back ("a" within "b" within "a"); the outermost factor must have no within');
  });

  it('checks interaction terms: exactly two distinct non-empty names', () => {
    for (const bad of ['a:b:c', 'a:', ':b', ':']) {
      expect(inputError(() => parseModel({ ...base, fixed: ['x', bad] })).message).toBe(
        `model.fixed[1]: an interaction is "a:b" with exactly two non-empty column names, got ${JSON.stringify(bad)}`,
      );
    }
    expect(inputError(() => parseModel({ ...base, fixed: ['a:a'] })).message).toBe(
      'model.fixed[0]: interaction of "a" with itself; name two different columns',
    );
    expect(inputError(() => parseModel({ ...base, fixed: [{ column: 'a:b' }] })).message).toMatch(/^model\.fixed\[0\]\.column: expected one column name/);
  });

  it('rejects duplicate terms, including swapped interactions', () => {
    expect(inputError(() => parseModel({ ...base, fixed: ['a', 'b', 'a:b', 'b:a'] })).message).toBe(
      'model.fixed[3]: duplicate term "b:a" (same as model.fixed[2])',
    );
    expect(inputError(() => parseModel({ ...base, fixed: ['h', { column: 'h' }] })).message).toBe(
      'model.fixed[1]: duplicate term "h" (same as model.fixed[0])',
    );
  });

  it('rejects the response inside the model', () => {
    expect(inputError(() => parseModel({ ...base, fixed: ['x:y'] })).message).toBe(
      'model.fixed[0]: the response "y" cannot be a fixed term',
    );
    expect(inputError(() => parseModel({ ...base, groups: [{ factor: 'y', as: 'random' }] })).message).toBe(
      'model.groups[0].factor: the response "y" cannot be a grouping factor',
    );
    expect(inputError(() => parseModel({ ...base, categorical: ['y'] })).message).toBe(
      'model.categorical[0]: the response "y" cannot be categorical',
    );
  });

  it('rejects a grouping factor that is also a fixed main effect', () => {
    const e = inputError(() => parseModel({ ...base, fixed: ['x', 'site'], groups: [{ factor: 'site', as: 'random' }] }));
    expect(e.message).toBe(
      'model.groups[0].factor: "site" is also a fixed term (model.fixed[1]); to estimate its level effects as fixed use as: "fixed" and remove the fixed term',
    );
  });

  it('checks slopes', () => {
    expect(inputError(() => parseModel({ ...base, groups: [{ factor: 's', as: 'random', slopes: ['x', 'x'] }] })).message).toBe(
      'model.groups[0].slopes[1]: duplicate "x" (same as model.groups[0].slopes[0])',
    );
    expect(inputError(() => parseModel({ ...base, groups: [{ factor: 's', as: 'random', slopes: ['s'] }] })).message).toBe(
      'model.groups[0].slopes[0]: "s" is the grouping factor itself; a slope needs a numeric column',
    );
    expect(inputError(() => parseModel({ ...base, groups: [{ factor: 's', as: 'random', slopes: 'x' }] })).message).toBe(
      'model.groups[0].slopes: expected an array, got "x"',
    );
    expect(inputError(() => parseModel({ ...base, groups: [{ factor: 's', as: 'random', correlated: 'yes' }] })).message).toBe(
      'model.groups[0].correlated: expected true or false, got "yes"',
    );
  });

  it('checks level, estimation, missing, interval', () => {
    for (const bad of [0, 1, 1.5, -0.1, Number.NaN, '0.95']) {
      expect(inputError(() => parseModel({ ...base, level: bad })).message).toMatch(
        /^model\.level: expected a number strictly between 0 and 1 \(e\.g\. 0\.95\), got /,
      );
    }
    expect(inputError(() => parseModel({ ...base, estimation: 'reml' })).message).toBe(
      'model.estimation: expected "REML" or "ML", got "reml" (did you mean "REML"?)',
    );
    expect(inputError(() => parseModel({ ...base, missing: 'keep' })).message).toBe(
      'model.missing: expected "drop" or "reject", got "keep"',
    );
    expect(inputError(() => parseModel({ ...base, interval: '' })).message).toBe(
      'model.interval: interval method "" is not available; expected one of: wald, residual-t, satterthwaite, kenward-roger, profile, bootstrap',
    );
  });

  it('checks fixed and categorical entries', () => {
    expect(inputError(() => parseModel({ ...base, fixed: 'x' })).message).toBe('model.fixed: expected an array, got "x"');
    expect(inputError(() => parseModel({ ...base, fixed: [''] })).message).toBe(
      'model.fixed[0]: expected a column name, got an empty string',
    );
    expect(inputError(() => parseModel({ ...base, fixed: [null] })).message).toBe(
      'model.fixed[0]: expected a column name, "a:b", or { column, reference }, got null',
    );
    expect(inputError(() => parseModel({ ...base, fixed: [{ column: 'h', reference: true }] })).message).toBe(
      'model.fixed[0].reference: expected a level label (text), got true',
    );
    expect(inputError(() => parseModel({ ...base, categorical: ['h', 'h'] })).message).toBe(
      'model.categorical[1]: duplicate "h" (same as model.categorical[0])',
    );
  });
});
