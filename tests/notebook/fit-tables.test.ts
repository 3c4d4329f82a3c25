import { describe, expect, it } from 'vitest';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { fitStatusRows, fixedEffectRows, varianceRows } from '../../kernel-lib/notebook/fit-tables';

// Invented table: 4 sites × 3 years, one quadrat each, cover against rain.
const site = ['A', 'B', 'C', 'D'].flatMap((s) => [s, s, s]);
const year = site.map((_, i) => String(2020 + (i % 3)));
const rain = site.map((_, i) => Math.cos(i * 1.3) + 0.05 * i);
const cover = site.map((s, i) => 20 + 2 * rain[i] + 'ABCD'.indexOf(s) * 1.5 + ((i * 7) % 5) * 0.4);
const data = { site, year, rain, cover };
const random = fitModel(data, { response: 'cover', fixed: ['rain'], groups: [{ factor: 'site', as: 'random' }] });
const fixed = fitModel(data, { response: 'cover', fixed: ['rain'], groups: [{ factor: 'site', as: 'fixed' }] });
const fits = [{ name: 'site random', fit: random }, { name: 'site fixed', fit: fixed }];

// Table layout rules of the module (terms in first-seen order, fits in the order given);
// the numbers are the fits' own, so only placement and notes are checked here.
describe('fit tables for notebooks', () => {
  it('fixed effects: one row per term and fit, site levels hidden, the shifted intercept noted and its truth left empty', () => {
    const rows = fixedEffectRows(fits, { fixedFactors: ['site'], truth: { intercept: 20, rain: 2 } });
    expect(rows.map((r) => `${r.term} | ${r.fit}`)).toEqual(['intercept | site random', 'intercept | site fixed', 'rain | site random', 'rain | site fixed']);
    expect(rows[1].note).toBe('refers to the reference level of site');
    expect(rows[1].truth).toBeNaN();
    expect(rows[0].truth).toBe(20);
    expect(rows[2].estimate).toBe(random.fixed.find((r) => r.term === 'rain')!.estimate);
    expect(rows[2].width).toBeCloseTo(rows[2].upper - rows[2].lower, 15);
    const all = fixedEffectRows(fits, { fixedFactors: ['site'], includeGroupLevels: true });
    expect(all.some((r) => r.term === 'site=B')).toBe(true);
  });

  it('variance components: SDs per fit, "fixed" where the factor is fixed, the residual last', () => {
    const rows = varianceRows(fits, { site: 1.5, residual: 0.8 });
    expect(rows.map((r) => r.component)).toEqual(['sd(site)', 'sd(residual)']);
    expect(rows[0]['site random']).toBe(random.random.find((r) => r.factor === 'site')!.sd);
    expect(rows[0]['site fixed']).toBe('fixed');
    expect(rows[0].truth).toBe(1.5);
    expect(rows[1].truth).toBe(0.8);
  });

  it('status rows: one per fit, with the AIC caution when REML fits differ in their fixed part', () => {
    const rows = fitStatusRows(fits);
    expect(rows.map((r) => r.fit)).toEqual(['site random', 'site fixed']);
    expect(rows[0].observations).toBe(12);
    expect(String(rows[0].warnings)).toContain('AIC not comparable');
    expect(fitStatusRows([fits[0]])[0].warnings).toBe(random.warnings.join('; ') || 'none');
  });
});
