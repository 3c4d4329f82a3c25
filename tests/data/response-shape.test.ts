import { describe, expect, it } from 'vitest';
import { responseShapeWarning } from '../../kernel-lib/data/response-shape';
import { buildDesign } from '../../kernel-lib/data/build-design';
import { parseModel } from '../../kernel-lib/model/parse';

// Invented table (not field data): six quadrats at three sites.
const table = {
  site: ['A', 'A', 'B', 'B', 'C', 'C'],
  x: [0.5, 1.2, -0.3, 0.8, 1.9, 0.1],
  count: [0, 3, 1, 7, 2, 0],
  seen: [0, 1, 1, 0, 1, 0],
  height: [12.5, 14.1, 9.8, 11.0, 15.2, 10.4],
};
const model = (response: string) => parseModel({ response, fixed: ['x'], groups: [{ factor: 'site', as: 'random' }] });

describe('responseShapeWarning', () => {
  // common practice, no source: counts and 0/1 data call for a count or detection family
  it('names the column and the count families for non-negative whole numbers', () => {
    const w = responseShapeWarning([0, 3, 1, 7], 'sedge_count');
    expect(w).toContain('"sedge_count"');
    expect(w).toContain('"poisson"');
    expect(w).toContain('"negative-binomial"');
  });

  it('names the detection family for 0/1 data', () => {
    const w = responseShapeWarning([0, 1, 1, 0], 'seen');
    expect(w).toContain('"seen"');
    expect(w).toContain('"binomial"');
    expect(w).not.toContain('poisson');
  });

  it('stays quiet for measurements, negative whole numbers and empty data', () => {
    expect(responseShapeWarning([12.5, 14.1, 9.8], 'height')).toBeUndefined();
    expect(responseShapeWarning([-2, 0, 3], 'change')).toBeUndefined();
    expect(responseShapeWarning([0, 1, 0.5], 'share')).toBeUndefined();
    expect(responseShapeWarning([], 'y')).toBeUndefined();
  });
});

describe('buildDesign carries the warning of a normal-family fit', () => {
  it('warns for counts and detections, not for a measurement', () => {
    expect(buildDesign(table, model('count')).warnings.some((w) => w.includes('"count"') && w.includes('"poisson"'))).toBe(true);
    expect(buildDesign(table, model('seen')).warnings.some((w) => w.includes('"seen"') && w.includes('"binomial"'))).toBe(true);
    expect(buildDesign(table, model('height')).warnings).toEqual([]);
  });

  it('stays quiet when the model names a count family', () => {
    const poisson = parseModel({ response: 'count', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }], family: 'poisson', estimation: 'ML', interval: 'wald' });
    expect(buildDesign(table, poisson).warnings.some((w) => w.includes('"count"'))).toBe(false);
  });
});
