import { describe, expect, it } from 'vitest';
import { parseCovariates } from '../../kernel-lib/design/covariates';
import { parseFactors } from '../../kernel-lib/design/factors';
import { inputError } from '../helpers/input-error';

const factors = parseFactors([{ name: 'site', levels: 6 }, { name: 'plot', levels: 3, within: 'site' }, { name: 'year', levels: 2 }], 'design.factors');
const P = 'design.covariates';

// The covariate part of a survey design (module contract): one distribution each, the unit it varies
// by, categories with probabilities summing to 1 (rescaled exactly), a between-level share in [0, 1].
describe('parseCovariates', () => {
  it('reads normal, uniform and categorical covariates', () => {
    const c = parseCovariates([
      { name: 'rain', varies: 'plot', normal: { mean: 600, sd: 80 }, between: { factor: 'site', share: 0.5 } },
      { name: 'slope', varies: 'plot', uniform: { min: 0, max: 30 } },
      { name: 'grazing', varies: 'site', categories: { ungrazed: 0.4, grazed: 0.6 }, allocation: 'balanced' },
      { name: 'moisture', varies: 'observation', normal: { mean: 0, sd: 1 }, between: { factor: 'plot', share: 0.2, correlation: -0.5 } },
    ], P, factors);
    expect(c[0]).toEqual({ kind: 'normal', name: 'rain', varies: 'plot', mean: 600, sd: 80, between: { factor: 'site', share: 0.5, correlation: 0 } });
    expect(c[1]).toEqual({ kind: 'uniform', name: 'slope', varies: 'plot', min: 0, max: 30 });
    // categories in sorted order whatever the JSON order, so the reference level is stable
    expect(c[2]).toEqual({ kind: 'categorical', name: 'grazing', varies: 'site', levels: ['grazed', 'ungrazed'], probabilities: [0.6, 0.4], allocation: 'balanced' });
    expect(c[3]).toMatchObject({ between: { factor: 'plot', share: 0.2, correlation: -0.5 } });
    expect(parseCovariates(undefined, P, factors)).toEqual([]);
  });

  it('rescales probabilities that sum to 1 within 1e-6 so they sum to 1', () => {
    const [c] = parseCovariates([{ name: 'g', varies: 'site', categories: { a: 1 / 3, b: 1 / 3, c: 0.3333334 } }], P, factors);
    const probabilities = (c as { probabilities: number[] }).probabilities;
    expect(probabilities.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 15);
  });

  it('refuses bad covariates, naming the field', () => {
    const field = (spec: unknown) => inputError(() => parseCovariates([spec], P, factors)).field;
    expect(field({ name: 'site', varies: 'site', normal: { mean: 0, sd: 1 } })).toBe(`${P}[0].name`); // a factor's name
    expect(field({ name: 'x', normal: { mean: 0, sd: 1 } })).toBe(`${P}[0].varies`);
    expect(field({ name: 'x', varies: 'transect', normal: { mean: 0, sd: 1 } })).toBe(`${P}[0].varies`);
    expect(field({ name: 'x', varies: 'site', normal: { mean: 0, sd: 1 }, uniform: { min: 0, max: 1 } })).toBe(`${P}[0]`);
    expect(field({ name: 'x', varies: 'site', uniform: { min: 2, max: 2 } })).toBe(`${P}[0].uniform.max`);
    expect(field({ name: 'x', varies: 'site', normal: { mean: 0, sd: -1 } })).toBe(`${P}[0].normal.sd`);
    expect(field({ name: 'x', varies: 'site', categories: { a: 0.5, b: 0.4 } })).toBe(`${P}[0].categories`);
    expect(field({ name: 'x', varies: 'site', categories: { a: 1 } })).toBe(`${P}[0].categories`);
    expect(field({ name: 'x', varies: 'observation', categories: { a: 0.5, b: 0.5 }, allocation: 'balanced' })).toBe(`${P}[0].allocation`);
    expect(field({ name: 'x', varies: 'site', uniform: { min: 0, max: 1 }, between: { factor: 'site', share: 0.5 } })).toBe(`${P}[0].between`);
    // the share is between levels of a factor the covariate's unit lies within: not the unit itself, not below it
    expect(field({ name: 'x', varies: 'site', normal: { mean: 0, sd: 1 }, between: { factor: 'plot', share: 0.5 } })).toBe(`${P}[0].between.factor`);
    expect(field({ name: 'x', varies: 'site', normal: { mean: 0, sd: 1 }, between: { factor: 'site', share: 0.5 } })).toBe(`${P}[0].between.factor`);
    expect(field({ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 }, between: { factor: 'site', share: 1.5 } })).toBe(`${P}[0].between.share`);
    expect(field({ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 }, between: { factor: 'site', share: 0.5, correlation: 2 } })).toBe(`${P}[0].between.correlation`);
    expect(field({ name: 'x', varies: 'site', normal: { mean: 0, sd: 1 }, confounding: {} })).toBe(`${P}[0].confounding`);
    const dup = inputError(() => parseCovariates([{ name: 'x', varies: 'site', normal: { mean: 0, sd: 1 } }, { name: 'x', varies: 'site', normal: { mean: 0, sd: 1 } }], P, factors));
    expect(dup.field).toBe(`${P}[1].name`);
  });
});
