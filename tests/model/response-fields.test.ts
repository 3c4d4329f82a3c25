import { describe, expect, it } from 'vitest';
import { modelToJson, parseModel } from '../../kernel-lib/model/parse';
import { QuadratInputError } from '../../kernel-lib/model/errors';

function fieldOf(f: () => unknown): string | undefined {
  try { f(); } catch (e) { expect(e).toBeInstanceOf(QuadratInputError); return (e as QuadratInputError).field; }
  throw new Error('expected a QuadratInputError');
}

const site = { factor: 'site', as: 'random' as const };

describe('model response fields (family, trials, offset, integration, nodes)', () => {
  it('a normal model is unchanged and writes no new JSON fields', () => {
    const m = parseModel({ response: 'y' });
    expect(m.family).toBe('gaussian');
    expect(m.estimation).toBe('REML');
    expect(modelToJson(m)).not.toHaveProperty('family');
  });

  it('count and detection families default to ML, Wald intervals and the Laplace approximation', () => {
    // defaults of this project (common practice, no source): REML and small-sample df are normal-model methods
    const m = parseModel({ response: 'nests', family: 'poisson', offset: 'log_effort', groups: [site] });
    expect(m).toMatchObject({ family: 'poisson', estimation: 'ML', interval: 'wald', integration: 'laplace', offset: 'log_effort' });
    expect(parseModel({ response: 'seen', family: 'binomial' }).trials).toBe(1);
    expect(parseModel({ response: 'seen', family: 'binomial', trials: 'visits' }).trials).toBe('visits');
    const q = parseModel({ response: 'n', family: 'negative-binomial', integration: 'quadrature', groups: [site] });
    expect(q.nodes).toBe(9);
    expect(parseModel(modelToJson(q))).toEqual(q);
  });

  it('count and detection families also take profile-likelihood and bootstrap intervals, kept in the JSON', () => {
    for (const interval of ['profile', 'bootstrap']) {
      const m = parseModel({ response: 'n', family: 'poisson', interval, groups: [site] });
      expect(m.interval).toBe(interval);
      expect(parseModel(modelToJson(m))).toEqual(m);
    }
  });

  it('names the field of every misuse', () => {
    expect(fieldOf(() => parseModel({ response: 'n', family: 'gamma' }))).toBe('model.family');
    expect(fieldOf(() => parseModel({ response: 'n', family: 'poisson', estimation: 'REML' }))).toBe('model.estimation');
    expect(fieldOf(() => parseModel({ response: 'n', family: 'poisson', interval: 'satterthwaite' }))).toBe('model.interval');
    expect(fieldOf(() => parseModel({ response: 'n', family: 'poisson', trials: 3 }))).toBe('model.trials');
    expect(fieldOf(() => parseModel({ response: 'n', family: 'binomial', trials: 0 }))).toBe('model.trials');
    expect(fieldOf(() => parseModel({ response: 'n', offset: 'e' }))).toBe('model.offset');
    expect(fieldOf(() => parseModel({ response: 'n', family: 'poisson', integration: 'quadrature', groups: [site, { factor: 'year', as: 'random' }] }))).toBe('model.integration');
    expect(fieldOf(() => parseModel({ response: 'n', family: 'poisson', integration: 'quadrature', groups: [{ ...site, slopes: ['x'] }], fixed: ['x'] }))).toBe('model.integration');
    expect(fieldOf(() => parseModel({ response: 'n', family: 'poisson', integration: 'quadrature', nodes: 0, groups: [site] }))).toBe('model.nodes');
    expect(fieldOf(() => parseModel({ response: 'n', family: 'poisson', nodes: 5, groups: [site] }))).toBe('model.nodes');
  });
});
