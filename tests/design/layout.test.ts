import { describe, expect, it } from 'vitest';
import { buildLayout } from '../../kernel-lib/design/layout';
import type { ResolvedFactor } from '../../kernel-lib/design/types';

const factor = (name: string, levels: number, totalLevels: number, within?: string): ResolvedFactor => ({
  name, levels, totalLevels, within, labels: Array.from({ length: totalLevels }, (_, i) => `${name}${i + 1}`),
});

// A complete factorial layout lists every combination of levels once (mixed-radix counting, the
// last factor fastest; common practice, no source). Expected levels written out by hand.
describe('buildLayout', () => {
  it('crossed factors: every combination once, last factor changing fastest', () => {
    const l = buildLayout([factor('site', 3, 3), factor('year', 2, 2)], 1);
    expect(l.cells).toBe(6);
    expect(Array.from(l.cellLevel[0])).toEqual([0, 0, 1, 1, 2, 2]);
    expect(Array.from(l.cellLevel[1])).toEqual([0, 1, 0, 1, 0, 1]);
    const pairs = new Set(Array.from(l.cellLevel[0], (s, c) => `${s},${l.cellLevel[1][c]}`));
    expect(pairs.size).toBe(6);
  });

  it('a nested factor numbers its levels through the survey: plot 1 of site 2 is global level 2', () => {
    // 3 sites × 2 plots per site = 6 plots; each plot belongs to one site only
    const l = buildLayout([factor('site', 3, 3), factor('plot', 2, 6, 'site')], 1);
    expect(Array.from(l.cellLevel[1])).toEqual([0, 1, 2, 3, 4, 5]);
    for (let c = 0; c < l.cells; c++) expect(Math.floor(l.cellLevel[1][c] / 2)).toBe(l.cellLevel[0][c]);
  });

  it('resolves an outer factor declared after its nested one', () => {
    const l = buildLayout([factor('plot', 2, 4, 'site'), factor('site', 2, 2)], 1);
    // cells in declared order: plot digit slowest, site fastest
    expect(Array.from(l.cellLevel[1])).toEqual([0, 1, 0, 1]);
    expect(Array.from(l.cellLevel[0])).toEqual([0, 2, 1, 3]);
  });

  it('rows run cell by cell, perCell at a time, or with sizes by level of one factor', () => {
    const l = buildLayout([factor('site', 2, 2), factor('year', 2, 2)], 3);
    expect(l.rows).toBe(12);
    expect(Array.from(l.rowLevel[0])).toEqual([0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1]);
    expect(Array.from(l.rowLevel[1])).toEqual([0, 0, 0, 1, 1, 1, 0, 0, 0, 1, 1, 1]);
    const u = buildLayout([factor('site', 2, 2), factor('year', 2, 2)], 3, { factor: 'site', sizes: [1, 4] });
    expect(Array.from(u.cellSize)).toEqual([1, 1, 4, 4]);
    expect(u.rows).toBe(10);
    expect(Array.from(u.rowLevel[0])).toEqual([0, 0, 1, 1, 1, 1, 1, 1, 1, 1]);
  });

  it('no factors: one cell', () => {
    const l = buildLayout([], 5);
    expect(l.cells).toBe(1);
    expect(l.rows).toBe(5);
  });
});
