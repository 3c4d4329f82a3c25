import { describe, expect, it } from 'vitest';
import { INTERVAL_METHODS, checkInterval, intervalProblem } from '../../kernel-lib/model/interval-rule';
import { parseModel } from '../../kernel-lib/model/parse';
import { parseDesign } from '../../kernel-lib/design/parse';
import { fitDesign } from '../../kernel-lib/fit/fit-design';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { buildDesign } from '../../kernel-lib/data/build-design';
import { contrastTest } from '../../kernel-lib/fit/inference/contrast-test';
import { inputError } from '../helpers/input-error';

const mixed = { family: 'gaussian', estimation: 'REML', random: true };

// Which method goes with which fit: Kenward-Roger is defined for REML (Kenward and Roger 1997,
// Biometrics 53(3), §2); a non-normal family is fitted by ML, where the t methods' df do not apply (project rule).
describe('interval rule', () => {
  it('every method with a normal REML mixed model; Kenward-Roger refused with ML unless the model has no random term', () => {
    for (const m of INTERVAL_METHODS) expect(intervalProblem(m, mixed)).toBe('');
    expect(intervalProblem('kenward-roger', { ...mixed, estimation: 'ML' })).toBe(
      'model.interval: "kenward-roger" is defined for REML fits only, but model.estimation is "ML"; use estimation "REML" or interval "satterthwaite"',
    );
    expect(intervalProblem('kenward-roger', { ...mixed, estimation: 'ML', random: false })).toBe('');
    expect(intervalProblem('satterthwaite', { ...mixed, estimation: 'ML' })).toBe('');
  });

  it('count and detection families: Wald, profile and bootstrap, no small-sample t methods', () => {
    for (const family of ['poisson', 'binomial', 'negative-binomial']) {
      for (const m of INTERVAL_METHODS) expect(intervalProblem(m, { family, estimation: 'ML', random: true }) === '').toBe(['wald', 'profile', 'bootstrap'].includes(m));
    }
  });

  it('an unknown name lists the methods and the nearest one', () => {
    const e = inputError(() => checkInterval('Wald', mixed, 'options.interval'));
    expect(e.message).toBe(
      'options.interval: interval method "Wald" is not available (did you mean "wald"?); expected one of: wald, residual-t, satterthwaite, kenward-roger, profile, bootstrap',
    );
    expect(e.field).toBe('options.interval');
  });

  it('the parser, the design parser, fitModel, fitDesign and the contrast tests all apply it', () => {
    const model = { response: 'y', fixed: ['x'], groups: [{ factor: 'g', as: 'random' }], estimation: 'ML', interval: 'kenward-roger' };
    expect(inputError(() => parseModel(model)).field).toBe('model.interval');
    expect(inputError(() => parseModel({ ...model, estimation: 'REML', family: 'poisson' })).message).toMatch(/^model\.estimation: the "poisson" family is fitted by maximum likelihood/);
    expect(inputError(() => parseModel({ response: 'n', family: 'poisson', interval: 'satterthwaite' })).message).toBe(
      'model.interval: the "poisson" family has "wald", "profile", "bootstrap" intervals; "satterthwaite" is a small-sample t method for normal responses only',
    );
    const design = {
      seed: 1, replicates: 2, factors: [{ name: 'g', levels: 4 }], perCell: 3,
      truth: { fixed: { intercept: 1 }, sd: { g: 1, residual: 1 } },
      variants: [{ name: 'a', model: { response: 'y', groups: [{ factor: 'g', as: 'random' }], estimation: 'ML', interval: 'kenward-roger' } }],
    };
    expect(inputError(() => parseDesign(design)).field).toBe('design.variants[0].model.interval');

    const g = ['a', 'a', 'a', 'b', 'b', 'b', 'c', 'c', 'c', 'd', 'd', 'd'];
    const x = g.map((_, i) => i % 3);
    const y = g.map((l, i) => l.charCodeAt(0) / 10 + 0.3 * x[i] + Math.sin(i));
    const reml = { response: 'y', fixed: ['x'], groups: [{ factor: 'g', as: 'random' as const }] };
    expect(inputError(() => fitModel({ g, x, y }, reml, { estimation: 'ML', interval: 'kenward-roger' })).message).toMatch(
      /^options\.interval: "kenward-roger" is defined for REML fits only, but options\.estimation is "ML"/,
    );
    const matrices = buildDesign({ g, x, y }, parseModel(reml));
    expect(inputError(() => fitDesign(matrices, { estimation: 'ML', interval: 'kenward-roger' })).field).toBe('options.interval');
    const mlFit = fitDesign(matrices, { estimation: 'ML' });
    expect(inputError(() => contrastTest(matrices, mlFit, [[0, 1]], 'kenward-roger')).field).toBe('method');
  });
});
