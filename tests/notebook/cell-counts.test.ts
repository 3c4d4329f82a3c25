import { describe, expect, it } from 'vitest';
import { cellCountChart, cellCounts } from '../../kernel-lib/notebook/cell-counts';
import { schemaErrors } from '../helpers/vega-lite-checks';

// Invented survey: sites × years with one empty cell (site B in 2022), one missing response and
// plots nested in sites. Counts below are tallied by hand.
const data = {
  site: ['A', 'A', 'A', 'B', 'B', 'C', 'C', null],
  year: ['2021', '2022', '2022', '2021', '2021', '2021', '2022', '2021'],
  plot: ['1', '1', '2', '1', '1', '2', '2', '1'],
  cover: [12, 15, null, 20, 22, 8, 9, 10],
};

describe('cellCounts', () => {
  it('lists every site × year combination, empty ones with 0, and counts recorded responses', () => {
    expect(cellCounts(data, 'site', 'year', 'cover')).toEqual([
      { site: 'A', year: '2021', rows: 1, recorded: 1 },
      { site: 'A', year: '2022', rows: 2, recorded: 1 },
      { site: 'B', year: '2021', rows: 2, recorded: 2 },
      { site: 'B', year: '2022', rows: 0, recorded: 0 },
      { site: 'C', year: '2021', rows: 1, recorded: 1 },
      { site: 'C', year: '2022', rows: 1, recorded: 1 },
    ]);
  });

  it('labels a nested factor through its outer factor: plot 1 of A and plot 1 of B differ', () => {
    const rows = cellCounts(data, 'plot', 'year', 'cover', { plot: 'site' });
    expect(rows.map((r) => r.plot)).toEqual(['A/1', 'A/1', 'A/2', 'A/2', 'B/1', 'B/1', 'C/2', 'C/2']);
    expect(rows.find((r) => r.plot === 'A/2' && r.year === '2022')).toEqual({ plot: 'A/2', year: '2022', rows: 1, recorded: 0 });
  });

  it('orders numbered levels naturally (2 before 10)', () => {
    const d = { g: ['10', '2', '1'], h: ['x', 'x', 'x'], y: [1, 2, 3] };
    expect(cellCounts(d, 'g', 'h', 'y').map((r) => r.g)).toEqual(['1', '2', '10']);
  });
});

describe('cellCountChart', () => {
  it('is a valid Vega-Lite v5 spec (schema shipped with vega-lite) carrying the rows', () => {
    const rows = cellCounts(data, 'site', 'year', 'cover');
    const spec = cellCountChart(rows, 'site', 'year', 'cover') as { data: { values: unknown[] } };
    expect(schemaErrors(spec)).toEqual([]);
    expect(spec.data.values).toEqual(rows);
  });
});
