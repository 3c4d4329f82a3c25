import { describe, expect, it } from 'vitest';
import type { FixedEffectRow } from '../../kernel-lib/fit/result';
import { fixedEffectsCompare } from '../../kernel-lib/plots';
import { NOT_ESTIMABLE, NOT_IN_MODEL, NO_ESTIMATE } from '../../kernel-lib/plots/fixed-effects-compare';
import { expectSpecSnapshot, expectValidAndRendered, markItems } from '../helpers/vega-lite-checks';

// Invented fixed-effect tables (not from fits): 'site random' estimates everything; in 'site fixed'
// the site-level term 'grazed' is aliased with the site columns; 'site fixed' has a 'year2022'
// term the other lacks; 'failed' is a fit that produced no estimates.
function row(term: string, estimate: number, halfWidth: number, method: string, aliased = false): FixedEffectRow {
  return {
    term,
    estimate: aliased ? NaN : estimate,
    se: aliased ? NaN : halfWidth / 2,
    df: method === 'Wald' ? Infinity : 12,
    lower: aliased ? NaN : estimate - halfWidth,
    upper: aliased ? NaN : estimate + halfWidth,
    method,
    aliased,
  };
}

const FITS = Object.freeze([
  Object.freeze({
    name: 'site random',
    fit: { fixed: [row('(intercept)', 42.1, 1.8, 'Satterthwaite'), row('moisture', 1.9, 0.4, 'Satterthwaite'), row('grazed', -4.2, 2.5, 'Satterthwaite')] },
  }),
  Object.freeze({
    name: 'site fixed',
    fit: {
      fixed: [
        row('(intercept)', 41.7, 1.1, 'Wald'),
        row('moisture', 1.85, 0.35, 'Wald'),
        row('grazed', 0, 0, 'Wald', true),
        row('year2022', 0.6, 0.9, 'Wald'),
      ],
    },
  }),
  Object.freeze({
    name: 'failed',
    fit: { fixed: [row('(intercept)', NaN, NaN, ''), row('moisture', NaN, NaN, '')], failure: 'invented failure' },
  }),
]);

describe('fixedEffectsCompare(fits)', () => {
  const spec = fixedEffectsCompare(FITS);
  const values = (spec as { data: { values: Record<string, unknown>[] } }).data.values;

  it('matches the snapshot, validates against the Vega-Lite schema and renders', async () => {
    await expectSpecSnapshot(spec, 'fixed-effects-compare');
    await expectValidAndRendered(spec, ['<path', '<line']);
    expect(JSON.stringify(fixedEffectsCompare(FITS))).toBe(JSON.stringify(spec));
  });

  it('keeps every variant × term cell, writing out why a cell has no estimate', async () => {
    expect(values).toHaveLength(3 * 4);
    const status = (variant: string, term: string) => values.find((v) => v.variant === variant && v.term === term)!.status;
    expect(status('site fixed', 'grazed')).toBe(NOT_ESTIMABLE);
    expect(status('site random', 'year2022')).toBe(NOT_IN_MODEL);
    expect(status('failed', 'moisture')).toBe(NO_ESTIMATE);
    expect(status('site random', 'grazed')).toBe('estimated');
    const { view, svg } = await expectValidAndRendered(spec, []);
    expect(svg).toContain('not estimable (aliased)</text>');
    // By hand: 'site random' lacks year2022, 'site fixed' has grazed aliased, 'failed' has 2 terms
    // without estimates and lacks grazed and year2022: 6 cells written out, 6 estimated.
    expect(markItems(view, 'missing_estimates')).toHaveLength(6);
    expect(markItems(view, 'estimates')).toHaveLength(6);
    expect(markItems(view, 'intervals')).toHaveLength(6);
  });

  it('carries each interval as the fit reports it and names the methods', () => {
    const moisture = values.find((v) => v.variant === 'site fixed' && v.term === 'moisture')!;
    expect(moisture.lower).toBeCloseTo(1.5, 12);
    expect(moisture.upper).toBeCloseTo(2.2, 12);
    expect((spec.title as { subtitle: string[] }).subtitle[0]).toContain('(Satterthwaite, Wald)');
  });

  it('gives each term its own x scale, one panel row per term in the requested order', async () => {
    const picked = fixedEffectsCompare(FITS, { terms: ['moisture', 'grazed'] });
    const s = picked as { facet: { row: { field: string; sort: string[] } }; resolve: { scale: { x: string } } };
    expect(s.facet.row.field).toBe('term');
    expect(s.facet.row.sort).toEqual(['moisture', 'grazed']);
    expect(s.resolve.scale.x).toBe('independent');
    const { svg } = await expectValidAndRendered(picked, ['<line']);
    expect(svg).not.toContain('>year2022</text>');
  });
});

describe('fixedEffectsCompare errors', () => {
  it('names an unknown term and lists those present', () => {
    expect(() => fixedEffectsCompare(FITS, { terms: ['grazing'] })).toThrow(
      /options\.terms: unknown term\(s\) 'grazing'; terms present: '\(intercept\)', 'moisture', 'grazed', 'year2022'/,
    );
  });

  it('rejects a duplicated variant name', () => {
    expect(() => fixedEffectsCompare([FITS[0], FITS[0]])).toThrow(/fits\[1\]\.name 'site random' is used twice/);
  });

  it('names the fit, row and field of a malformed fixed-effect row', () => {
    const bad = { name: 'odd', fit: { fixed: [{ ...row('moisture', 1, 1, 'Wald'), aliased: 'no' }] } };
    expect(() => fixedEffectsCompare([bad as never])).toThrow(
      /fixedEffectsCompare \('odd'\): row 0: field 'aliased' must be true or false, got 'no'/,
    );
  });

  it('rejects an empty list', () => {
    expect(() => fixedEffectsCompare([])).toThrow(/fits must hold at least one \{ name, fit \}/);
  });
});
