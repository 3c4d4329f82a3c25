/**
 * The interval methods a count fit takes (kernel-lib/fit/inference/count-intervals.ts): profile and
 * bootstrap through the model's `interval`, the normal-model t methods refused with the field named,
 * and the bootstrap context rebuilt from a finished fit equal to the one inside the fit.
 */
import { describe, expect, it } from 'vitest';
import { fitModel } from '../../../kernel-lib/analyse/fit-model';
import { parseModel } from '../../../kernel-lib/model/parse';
import { buildDesign } from '../../../kernel-lib/data/build-design';
import { toColumns, type Columns } from '../../../kernel-lib/data/columns';
import { fitDesign } from '../../../kernel-lib/fit/fit-design';
import { estimateCountModel } from '../../../kernel-lib/fit/estimate/count-model';
import { countBootstrapModel, countContext, countContextFromFit } from '../../../kernel-lib/fit/inference/count-intervals';
import { QuadratInputError } from '../../../kernel-lib/model/errors';
import type { ModelSpec } from '../../../kernel-lib/model/types';

// invented counts: 6 sites × 4 visits, survey effort varying by visit
const site = Array.from({ length: 24 }, (_, i) => `s${i % 6}`);
const cover = Array.from({ length: 24 }, (_, i) => ((i * 7) % 11) / 10 - 0.5);
const log_effort = Array.from({ length: 24 }, (_, i) => Math.log(1 + (i % 4) / 2));
const nests = [2, 5, 1, 7, 3, 4, 6, 2, 8, 3, 1, 5, 4, 9, 2, 3, 6, 4, 3, 7, 1, 2, 5, 6];
const data = { site, cover, log_effort, nests };
const model: ModelSpec = { response: 'nests', family: 'poisson', offset: 'log_effort', fixed: ['cover'], groups: [{ factor: 'site', as: 'random' }] };

describe('count interval methods', () => {
  it('refuses Satterthwaite, Kenward-Roger and residual-t for a count fit, naming model.interval', () => {
    for (const interval of ['satterthwaite', 'kenward-roger', 'residual-t']) {
      let caught: unknown;
      try { fitModel(data, { ...model, interval: interval as ModelSpec['interval'] }); } catch (e) { caught = e; }
      expect(caught).toBeInstanceOf(QuadratInputError);
      expect((caught as QuadratInputError).field).toBe('model.interval');
    }
  });

  it('the bootstrap model rebuilt from a finished fit equals the one built inside the fit', () => {
    const design = buildDesign(toColumns(data as unknown as Columns), parseModel(model));
    const fit = fitDesign(design, { family: 'poisson' });
    const est = estimateCountModel(design, { family: 'poisson', offset: design.offset });
    const inside = countBootstrapModel(countContext(design, { family: 'poisson', offset: design.offset }, est), 3);
    const after = countBootstrapModel(countContextFromFit(design, fit), 3);
    expect(Array.from(after.beta)).toEqual(Array.from(inside.beta));
    expect(Array.from(after.theta)).toEqual(Array.from(inside.theta));
    expect(after.count!.options.family).toBe('poisson');
    expect(after.count!.options.offset).toBe(design.offset);
    expect(after.design.p).toBe(inside.design.p);
  });

  it('profile and bootstrap rows carry their method and surround the estimate', () => {
    for (const interval of ['profile', 'bootstrap'] as const) {
      const fit = fitModel(data, { ...model, interval }, { bootstrap: { resamples: 40, seed: 2 } });
      for (const r of fit.fixed) {
        expect(r.method).toBe(interval);
        expect(r.lower).toBeLessThan(r.estimate);
        expect(r.upper).toBeGreaterThan(r.estimate);
      }
      // random-effect SD rows get an interval too (no residual row for a count family)
      expect(fit.random).toHaveLength(1);
      expect(Number.isFinite(fit.random[0].upper!)).toBe(true);
    }
  });
});
