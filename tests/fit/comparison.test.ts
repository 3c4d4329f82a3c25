import { describe, expect, it } from 'vitest';
import { remlComparisonCaution } from '../../kernel-lib/fit/comparison';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { formatComparison } from '../../kernel-lib/cli/compare-fits';
import { fitStatusRows } from '../../kernel-lib/notebook/fit-tables';
import type { ModelSpec } from '../../kernel-lib/model/types';

// Invented table (not field data): 4 sites x 3 years, one quadrat each.
const site = ['A', 'B', 'C', 'D'].flatMap((s) => [s, s, s]);
const year = site.map((_, i) => String(2020 + (i % 3)));
const rain = site.map((_, i) => Math.sin(i * 1.7) + 0.1 * i);
const height = site.map((_, i) => 10 + 0.8 * rain[i] + ((i * 7) % 5) * 0.6 + (i % 3) * 0.9);
const data = { site, year, rain, height };

const base: ModelSpec = { response: 'height', fixed: ['rain'], groups: [{ factor: 'site', as: 'random' }], interval: 'wald' };
const yearFixed: ModelSpec = { ...base, groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'fixed' }] };

// REML likelihoods are of error contrasts that depend on X (Verbeke and Molenberghs 2000, §6.2.1)
describe('remlComparisonCaution', () => {
  it('cautions when REML fits differ in their fixed part', () => {
    const fits = [fitModel(data, base), fitModel(data, yearFixed)];
    expect(remlComparisonCaution(fits)).toMatch(/not comparable.*"estimation": "ML"/);
    expect(formatComparison([{ name: 'year random', fit: fits[0] }, { name: 'year fixed', fit: fits[1] }])).toContain('Caution:');
    const rows = fitStatusRows([{ name: 'a', fit: fits[0] }, { name: 'b', fit: fits[1] }]);
    expect(rows.every((r) => String(r.warnings).includes('AIC not comparable'))).toBe(true);
    expect(rows[0].AIC).toBe(fits[0].aic);
  });

  it('is silent for ML fits, for REML fits with the same fixed part, and for one fit', () => {
    const ml = [fitModel(data, { ...base, estimation: 'ML' }), fitModel(data, { ...yearFixed, estimation: 'ML' })];
    expect(remlComparisonCaution(ml)).toBeUndefined();
    const sameFixed = [fitModel(data, base), fitModel(data, { ...base, groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'random' }] })];
    expect(remlComparisonCaution(sameFixed)).toBeUndefined();
    expect(formatComparison([{ name: 'a', fit: sameFixed[0] }, { name: 'b', fit: sameFixed[1] }])).not.toContain('Caution:');
    expect(remlComparisonCaution([fitModel(data, base)])).toBeUndefined();
  });
});
