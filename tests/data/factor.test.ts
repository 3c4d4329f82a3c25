import { describe, expect, it } from 'vitest';
import { codeColumn, nestFactor, sortFactor } from '../../kernel-lib/data/factor';
import { inputError } from '../helpers/input-error';

const all = (n: number) => Int32Array.from({ length: n }, (_, i) => i);

// Integer coding of a factor: level codes index the sorted level list (common practice, no source;
// the "1" = 1 rule and the "/" labels are this module's documented contract).
describe('codeColumn', () => {
  it('codes levels in order of first appearance over the used rows', () => {
    const f = codeColumn(['wet', 'dry', 'wet', 'bog', 'dry'], all(5));
    expect(Array.from(f.codes)).toEqual([0, 1, 0, 2, 1]);
    expect(f.parts).toEqual([['wet'], ['dry'], ['bog']]);
    const g = codeColumn(['wet', 'dry', 'bog'], Int32Array.from([2, 0]));
    expect(g.parts).toEqual([['bog'], ['wet']]);
  });

  it('treats the number 1 and the text "1" as the same level', () => {
    const f = codeColumn([1, '1', 2, '2', 1], all(5));
    expect(Array.from(f.codes)).toEqual([0, 0, 1, 1, 0]);
    expect(f.parts).toEqual([['1'], ['2']]);
  });
});

describe('nestFactor', () => {
  it('makes one level per (outer, inner) pair: plot 1 of site A differs from plot 1 of site B', () => {
    const site = codeColumn(['A', 'A', 'B', 'B', 'A'], all(5));
    const plot = codeColumn(['1', '2', '1', '2', '1'], all(5));
    const nested = nestFactor(site, plot);
    expect(Array.from(nested.codes)).toEqual([0, 1, 2, 3, 0]);
    expect(nested.parts).toEqual([['A', '1'], ['A', '2'], ['B', '1'], ['B', '2']]);
    // nesting again keeps all parts, outer first
    const quadrat = codeColumn(['q', 'q', 'q', 'q', 'r'], all(5));
    expect(nestFactor(nested, quadrat).parts.at(-1)).toEqual(['A', '1', 'r']);
  });
});

describe('sortFactor', () => {
  it('sorts levels by their parts, outer part first, and recodes the rows', () => {
    const f = { codes: Int32Array.from([0, 1, 2, 0]), parts: [['B', '1'], ['A', '2'], ['A', '1']] };
    const s = sortFactor(f, 'plot');
    expect(s.levels).toEqual(['A/1', 'A/2', 'B/1']);
    expect(Array.from(s.codes)).toEqual([2, 1, 0, 2]);
  });

  it('refuses two nested levels whose labels read the same, naming the factor', () => {
    // ("A/1", "x") and ("A", "1/x") would both read "A/1/x"
    const f = { codes: Int32Array.from([0, 1]), parts: [['A/1', 'x'], ['A', '1/x']] };
    const e = inputError(() => sortFactor(f, 'plot'));
    expect(e.column).toBe('plot');
    expect(e.message).toMatch(/both read "A\/1\/x"/);
  });
});
