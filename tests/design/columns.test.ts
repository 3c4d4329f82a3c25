import { describe, expect, it } from 'vitest';
import { allColumns, columnCatalog } from '../../kernel-lib/design/columns';
import type { ResolvedCovariate, ResolvedFactor } from '../../kernel-lib/design/types';

const factors: ResolvedFactor[] = [
  { name: 'site', levels: 2, totalLevels: 2, labels: ['site1', 'site2'] },
  { name: 'plot', levels: 2, totalLevels: 4, within: 'site', labels: ['plot1', 'plot2', 'plot3', 'plot4'] },
];
const covariates = [
  { kind: 'normal', name: 'rain', varies: 'site', mean: 0, sd: 1 },
  { kind: 'categorical', name: 'grazing', varies: 'site', levels: ['grazed', 'ungrazed'] },
  { kind: 'uniform', name: 'slope', varies: 'plot', min: 0, max: 30 },
] as ResolvedCovariate[];

// What a simulated data set's columns are, by kind (module contract; listed by hand).
describe('columnCatalog and allColumns', () => {
  it('factors and categorical covariates are text columns with their levels; the rest are numeric', () => {
    const cat = columnCatalog('cover', factors, covariates);
    expect(cat.response).toBe('cover');
    expect(cat.factors).toEqual(['site', 'plot']);
    expect(cat.numeric).toEqual(['rain', 'slope']);
    expect([...cat.text.entries()]).toEqual([
      ['site', ['site1', 'site2']],
      ['plot', ['plot1', 'plot2', 'plot3', 'plot4']],
      ['grazing', ['grazed', 'ungrazed']],
    ]);
  });

  it('lists every column once: factors, other text columns, then numeric ones', () => {
    expect(allColumns(columnCatalog('cover', factors, covariates))).toEqual(['site', 'plot', 'grazing', 'rain', 'slope']);
    expect(allColumns(columnCatalog('cover', [], []))).toEqual([]);
  });
});
