import { describe, expect, it } from 'vitest';
import { modelColumns, modelNesting, withGroupAs, withInterval } from '../../kernel-lib/notebook/model-variants';
import { inputError } from '../helpers/input-error';

// Invented model of the demo scenario: cover by grazing and soil moisture, plots nested in sites.
const model = {
  response: 'cover',
  fixed: ['soil_moisture', 'grazing', 'soil_moisture:grazing'],
  groups: [{ factor: 'site', as: 'random' as const }, { factor: 'plot', as: 'random' as const, within: 'site' }, { factor: 'year', as: 'fixed' as const }],
};

// One-field changes of a model, and the columns it reads (module contract; listed by hand).
describe('model variants for notebooks', () => {
  it('withGroupAs changes one factor\'s role and nothing else, without touching the input', () => {
    const v = withGroupAs(model, 'site', 'fixed');
    expect(v.groups.map((g) => g.as)).toEqual(['fixed', 'random', 'fixed']);
    expect(v.fixed).toBe(model.fixed);
    expect(model.groups[0].as).toBe('random');
    const e = inputError(() => withGroupAs(model, 'transect', 'fixed'));
    expect(e.field).toBe('model.groups');
    expect(e.message).toMatch(/no grouping factor "transect"; the model's factors are site, plot, year/);
  });

  it('withInterval sets the interval method', () => {
    expect(withInterval(model, 'kenward-roger')).toEqual({ ...model, interval: 'kenward-roger' });
  });

  it('modelColumns lists the response, the factors and the covariates once each; modelNesting the within fields', () => {
    expect(modelColumns(model)).toEqual({ response: 'cover', factors: ['site', 'plot', 'year'], covariates: ['soil_moisture', 'grazing'] });
    expect(modelNesting(model)).toEqual({ plot: 'site' });
  });
});
