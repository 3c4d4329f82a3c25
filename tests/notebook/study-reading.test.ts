import { describe, expect, it } from 'vitest';
import type { MetricRow } from '../../kernel-lib/study/metrics';
import { coverageVerdicts, favouredInterval, smallSampleMethod, withIntervalVariants } from '../../kernel-lib/notebook/study-reading';

const cov = (scenario: string, variant: string, parameter: string, value: number): MetricRow => ({
  scenario, variant, parameter, kind: 'fixed', metric: 'coverage', value, mcse: Math.sqrt((value * (1 - value)) / 1000), n: 1000, nominal: 0.95,
});
const scenarios = [
  { index: 0, key: 's1', values: { 'factors.site.levels': 4 } },
  { index: 1, key: 's2', values: { 'factors.site.levels': 12 } },
];
const model = { response: 'y', groups: [{ factor: 'site', as: 'random' as const }] };

// Clear-cut cases only: with n = 1000 replicates the binomial MCSE of a coverage near 0.95 is
// about 0.007 (Morris, White and Crowther 2019, Table 6), so 0.80 falls short of 0.95 and 0.95,
// 0.951 keep it under any reasonable rule; the rule itself is study/reading's (tested there).
describe('coverage reading helpers for notebooks', () => {
  it('smallSampleMethod picks the first preferred method on offer, else wald', () => {
    expect(smallSampleMethod(['wald', 'residual-t', 'satterthwaite', 'kenward-roger'])).toBe('satterthwaite');
    expect(smallSampleMethod(['wald'])).toBe('wald');
  });

  it('withIntervalVariants writes every interval out and adds one copy per variant with the method', () => {
    const design = { variants: [{ name: 'random', model }, { name: 'kr', model: { ...model, interval: 'kenward-roger' } }] } as never;
    const d = withIntervalVariants(design, 'satterthwaite') as { variants: { name: string; model: { interval: string } }[] };
    expect(d.variants.map((v) => [v.name, v.model.interval])).toEqual([
      ['random', 'wald'], ['kr', 'kenward-roger'], ['random, satterthwaite', 'satterthwaite'], ['kr, satterthwaite', 'satterthwaite'],
    ]);
    expect((withIntervalVariants(design, 'wald') as { variants: unknown[] }).variants).toHaveLength(2);
  });

  it('coverageVerdicts counts the cells where coverage was kept and names the lowest', () => {
    const rows = coverageVerdicts([
      cov('s1', 'wald', 'slope', 0.80), cov('s2', 'wald', 'slope', 0.95),
      cov('s1', 'satt', 'slope', 0.951), cov('s2', 'satt', 'slope', 0.95),
      { ...cov('s1', 'none', 'slope', NaN), n: 0 },
    ], scenarios);
    expect(rows.map((r) => [r.variant, r['coverage kept'], r.verdict])).toEqual([
      ['wald', '1 of 2', 'falls short'], ['satt', '2 of 2', 'kept everywhere'], ['none', '0 of 0', 'no intervals'],
    ]);
    expect(rows[0]['lowest coverage']).toBe(0.8);
    expect(rows[0].where).toBe('slope at site levels = 4');
  });

  it('favouredInterval prefers the method that fell short in fewer cells, and says why', () => {
    const variants = [{ name: 'wald', model: { ...model, interval: 'wald' } }, { name: 'satt', model: { ...model, interval: 'satterthwaite' } }];
    const choice = favouredInterval([cov('s1', 'wald', 'slope', 0.80), cov('s2', 'wald', 'slope', 0.95), cov('s1', 'satt', 'slope', 0.951), cov('s2', 'satt', 'slope', 0.95)], variants);
    expect(choice.method).toBe('satterthwaite');
    expect(choice.reason).toBe('satterthwaite intervals fell short of nominal coverage in 0 of 2 scenario × parameter cells (lowest 95.0%); wald: 1 of 2, lowest 80.0%.');
    expect(favouredInterval([], variants).method).toBe('wald');
    // a variant without an interval field takes the model default (model/parse: satterthwaite)
    expect(favouredInterval([cov('s1', 'plain', 'slope', 0.95)], [{ name: 'plain', model }]).method).toBe('satterthwaite');
  });
});
