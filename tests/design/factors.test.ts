import { describe, expect, it } from 'vitest';
import { isNestedWithin, labelsForLevels, levelLabels, levelMap, parseFactors } from '../../kernel-lib/design/factors';
import { inputError } from '../helpers/input-error';

// Nesting arithmetic of a survey: a factor nested in another has levels × (outer total) levels in
// all, level g lying in outer level floor(g / levels) (common practice, no source); expected
// totals and maps worked by hand.
describe('levelLabels', () => {
  it('labels sort in level order as text, for any count', () => {
    for (const count of [1, 9, 10, 12, 100, 101]) {
      const labels = levelLabels('site', count);
      expect(labels).toHaveLength(count);
      expect([...labels].sort()).toEqual(labels);
      expect(new Set(labels).size).toBe(count);
      expect(labels.every((l) => l.startsWith('site'))).toBe(true);
    }
  });
});

describe('parseFactors', () => {
  const survey = [
    { name: 'region', levels: 2 },
    { name: 'site', levels: 3, within: 'region' },
    { name: 'plot', levels: 4, within: 'site' },
    { name: 'year', levels: 5 },
  ];

  it('counts nested levels through all outer factors', () => {
    const f = parseFactors(survey, 'design.factors');
    expect(f.map((x) => x.totalLevels)).toEqual([2, 6, 24, 5]);
    expect(f[2].labels).toHaveLength(24);
    expect(f[3].within).toBeUndefined();
    // plot 13 (0-based 12) lies in site floor(12 / 4) = 3, which lies in region floor(3 / 3) = 1
    expect(f[2].outerLevel![12]).toBe(3);
    expect(f[1].outerLevel![3]).toBe(1);
  });

  it('maps levels of an inner factor to any outer one, and says which factors are nested', () => {
    const f = parseFactors(survey, 'design.factors');
    expect(isNestedWithin(f, 'plot', 'region')).toBe(true);
    expect(isNestedWithin(f, 'plot', 'site')).toBe(true);
    expect(isNestedWithin(f, 'site', 'plot')).toBe(false);
    expect(isNestedWithin(f, 'year', 'region')).toBe(false);
    expect(Array.from(levelMap(f, 'plot', 'region'))).toEqual([...Array(12).fill(0), ...Array(12).fill(1)]);
    expect(Array.from(levelMap(f, 'site', 'site'))).toEqual([0, 1, 2, 3, 4, 5]);
  });

  it('refuses duplicates, unknown or circular nesting, and empty lists, naming the field', () => {
    expect(inputError(() => parseFactors([], 'design.factors')).field).toBe('design.factors');
    const dup = inputError(() => parseFactors([{ name: 'a', levels: 2 }, { name: 'a', levels: 3 }], 'design.factors'));
    expect(dup.field).toBe('design.factors[1].name');
    expect(inputError(() => parseFactors([{ name: 'a', levels: 2, within: 'b' }], 'design.factors')).message).toMatch(/unknown factor "b"/);
    expect(inputError(() => parseFactors([{ name: 'a', levels: 2, within: 'a' }], 'design.factors')).message).toMatch(/within itself/);
    const loop = inputError(() => parseFactors([{ name: 'a', levels: 2, within: 'b' }, { name: 'b', levels: 2, within: 'a' }], 'design.factors'));
    expect(loop.message).toMatch(/loops back/);
    expect(inputError(() => parseFactors([{ name: 'a', levels: 0 }], 'design.factors')).field).toBe('design.factors[0].levels');
    expect(inputError(() => parseFactors([{ name: 'a', levels: 2, colour: 'red' }], 'design.factors')).field).toMatch(/design\.factors\[0\]/);
  });

  it('applies the size limit to the total of a nested factor', () => {
    // 1000 sites × 2000 plots each = 2,000,000 plots, beyond the 1,000,000-level limit
    const e = inputError(() => parseFactors([{ name: 'site', levels: 1000 }, { name: 'plot', levels: 2000, within: 'site' }], 'design.factors'));
    expect(e.field).toBe('design.factors[1].levels');
  });

  it('takes level labels for a crossed factor, validated like category labels (field named)', () => {
    const [year] = parseFactors([{ name: 'year', levels: 3, labels: [2021, '2022', 2023] }], 'design.factors');
    expect(year.labels).toEqual(['2021', '2022', '2023']);
    expect(inputError(() => parseFactors([{ name: 'year', levels: 2, labels: ['a', 'a'] }], 'design.factors')).field).toBe('design.factors[0].labels[1]');
    expect(inputError(() => parseFactors([{ name: 'year', levels: 2, labels: ['a', 'b=c'] }], 'design.factors')).field).toBe('design.factors[0].labels[1]');
    expect(inputError(() => parseFactors([{ name: 'year', levels: 2, labels: [] }], 'design.factors')).field).toBe('design.factors[0].labels');
    expect(inputError(() => parseFactors([{ name: 'year', levels: 2, labels: [true] }], 'design.factors')).field).toBe('design.factors[0].labels[0]');
    const nested = inputError(() => parseFactors([{ name: 'site', levels: 2 }, { name: 'plot', levels: 2, within: 'site', labels: ['1', '2'] }], 'design.factors'));
    expect(nested.field).toBe('design.factors[1].labels');
  });

  it('fits the labels to the number of levels a grid asks for', () => {
    // the first labels when fewer levels; a whole-number series continued with its step and width
    expect(labelsForLevels('year', ['2021', '2022', '2023'], 2)).toEqual(['2021', '2022']);
    expect(labelsForLevels('year', ['2021', '2023'], 4)).toEqual(['2021', '2023', '2025', '2027']);
    expect(labelsForLevels('plot', ['08', '09'], 3)).toEqual(['08', '09', '10']);
    // other labels: the factor's name and number, skipping a name already taken
    expect(labelsForLevels('site', ['ashpool', 'site3'], 4)).toEqual(['ashpool', 'site3', 'site4', 'site5']);
  });
});
