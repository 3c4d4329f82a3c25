import { describe, expect, it } from 'vitest';
import { gridFields, scenarioFieldName, withScenarioFields } from '../../kernel-lib/study/scenario-fields';

// Vega-Lite reads a dot in a field name as nested access (Vega-Lite v5 docs, "Field": use \\. to
// escape), so grid paths become dot-free names (module contract, examples from its comment).
describe('scenarioFieldName', () => {
  it('drops the section prefix and joins the rest with spaces', () => {
    expect(scenarioFieldName('factors.year.levels')).toBe('year levels');
    expect(scenarioFieldName('truth.sd.site')).toBe('sd site');
    expect(scenarioFieldName('covariates.rain.mean')).toBe('rain mean');
    expect(scenarioFieldName('perCell')).toBe('perCell');
    expect(scenarioFieldName('variants.level')).toBe('variants level');
    expect(scenarioFieldName('factors.site.levels')).not.toContain('.');
  });
});

describe('withScenarioFields and gridFields', () => {
  const scenarios = [
    { index: 0, key: 's1', values: { 'factors.site.levels': 6, 'truth.sd.site': 0.5 } },
    { index: 1, key: 's2', values: { 'factors.site.levels': 12, 'truth.sd.site': 1 } },
  ];

  it("adds each row's grid values under readable names, without changing the input rows", () => {
    const rows = [{ scenario: 's2', value: 0.9 }, { scenario: 's1', value: 0.8 }, { scenario: 'unknown', value: 0.1 }];
    const out = withScenarioFields(rows, scenarios);
    expect(out[0]).toEqual({ scenario: 's2', value: 0.9, 'site levels': 12, 'sd site': 1 });
    expect(out[1]).toEqual({ scenario: 's1', value: 0.8, 'site levels': 6, 'sd site': 0.5 });
    expect(out[2]).toEqual({ scenario: 'unknown', value: 0.1 });
    expect(rows[0]).toEqual({ scenario: 's2', value: 0.9 });
  });

  it('lists the grid fields in grid order, none for a study without scenarios', () => {
    expect(gridFields(scenarios)).toEqual(['site levels', 'sd site']);
    expect(gridFields([])).toEqual([]);
  });
});
