import { describe, expect, it } from 'vitest';
import { QuadratInputError, describeValue, listNames } from '../../kernel-lib/model/errors';

// The project's bad-input contract (DEVELOPERS.md: a QuadratInputError naming the field, column or
// row; one-line messages). Expected texts written by hand.
describe('QuadratInputError', () => {
  it('is an Error with its own name, and carries only the details given', () => {
    const e = new QuadratInputError('column "y": expected numbers', { column: 'y', row: 4 });
    expect(e).toBeInstanceOf(Error);
    expect(e).toBeInstanceOf(QuadratInputError);
    expect(e.name).toBe('QuadratInputError');
    expect(e.message).toBe('column "y": expected numbers');
    expect(e.column).toBe('y');
    expect(e.row).toBe(4);
    expect(e.field).toBeUndefined();
    const f = new QuadratInputError('model.groups[1].as: unknown role', { field: 'model.groups[1].as' });
    expect(f.field).toBe('model.groups[1].as');
  });

  it('keeps instanceof across subclasses (prototype set explicitly)', () => {
    class Sub extends QuadratInputError {}
    const s = new Sub('sub');
    expect(s).toBeInstanceOf(Sub);
    expect(s).toBeInstanceOf(QuadratInputError);
  });
});

describe('describeValue', () => {
  it('quotes strings as JSON and names other kinds', () => {
    expect(describeValue('wet "bog"')).toBe('"wet \\"bog\\""');
    expect(describeValue(undefined)).toBe('undefined (missing)');
    expect(describeValue('wet', "'")).toBe("'wet'"); // the plot builders' quoting
    expect(describeValue(null)).toBe('null');
    expect(describeValue(NaN)).toBe('NaN');
    expect(describeValue(-2.5)).toBe('-2.5');
    expect(describeValue(true)).toBe('true');
    expect(describeValue(12n)).toBe('12n');
    expect(describeValue([1])).toBe('an array');
    expect(describeValue({ a: 1 })).toBe('an object');
    expect(describeValue(() => 1)).toBe('function');
  });
});

describe('listNames', () => {
  it('lists up to max names, then says how many more', () => {
    expect(listNames([])).toBe('(none)');
    expect(listNames(['site', 'year'])).toBe('site, year');
    const many = Array.from({ length: 23 }, (_, i) => `s${i + 1}`);
    expect(listNames(many)).toBe(`${many.slice(0, 20).join(', ')}, … and 3 more`);
    expect(listNames(['a', 'b', 'c'], 2)).toBe('a, b, … and 1 more');
    expect(listNames(['a', 'b'], 2)).toBe('a, b');
  });
});
