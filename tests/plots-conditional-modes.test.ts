import { describe, expect, it } from 'vitest';
import type { ConditionalModeRow } from '../kernel-lib/fit/result';
import { conditionalModes } from '../kernel-lib/plots';
import { expectSpecSnapshot, expectValidAndRendered, markItems, scaled } from './helpers/vega-lite-checks';

// Invented conditional modes (not from a fit): five sites with an intercept, two with a slope, and
// one site whose conditional SD could not be computed.
const MODES: readonly ConditionalModeRow[] = Object.freeze(
  [
    { factor: 'site', level: 'ashpool', term: 'intercept', mode: 1.2, sd: 0.4 },
    { factor: 'site', level: 'bogend', term: 'intercept', mode: -0.8, sd: 0.5 },
    { factor: 'site', level: 'carrside', term: 'intercept', mode: 0.1, sd: 0.3 },
    { factor: 'site', level: 'dunmere', term: 'intercept', mode: -2.1, sd: 0.6 },
    { factor: 'site', level: 'eelmoor', term: 'intercept', mode: 0.5, sd: NaN },
    { factor: 'site', level: 'ashpool', term: 'moisture', mode: 0.05, sd: 0.02 },
    { factor: 'site', level: 'bogend', term: 'moisture', mode: -0.03, sd: 0.02 },
    { factor: 'year', level: '2021', term: 'intercept', mode: 0.3, sd: 0.2 },
  ].map((r) => Object.freeze(r)),
);

describe('conditionalModes(modes, { factor })', () => {
  const spec = conditionalModes(MODES, { factor: 'site' });

  it('matches the snapshot, validates against the Vega-Lite schema and renders', async () => {
    await expectSpecSnapshot(spec, 'conditional-modes');
    await expectValidAndRendered(spec, ['<path', '<line']);
    expect(JSON.stringify(conditionalModes(MODES, { factor: 'site' }))).toBe(JSON.stringify(spec));
  });

  it('sorts levels by mode, largest at the top, and spans mode ± 1.96 SD', async () => {
    // 1.96: normal 0.975 quantile, common practice, no source.
    const { view } = await expectValidAndRendered(spec, []);
    expect((view.scale('y') as unknown as { domain(): string[] }).domain()).toEqual([
      'ashpool',
      'eelmoor',
      'carrside',
      'bogend',
      'dunmere',
    ]);
    const bars = markItems(view, 'mode_intervals');
    expect(bars).toHaveLength(4); // eelmoor has no conditional SD
    const ashpool = bars.find((b) => b.datum.level === 'ashpool')!;
    expect(Math.min(ashpool.x!, ashpool.x2!)).toBeCloseTo(scaled(view, 'x', 1.2 - 1.96 * 0.4), 6);
    expect(Math.max(ashpool.x!, ashpool.x2!)).toBeCloseTo(scaled(view, 'x', 1.2 + 1.96 * 0.4), 6);
    expect(markItems(view, 'modes')).toHaveLength(5);
    const zero = markItems(view, 'zero_rule');
    expect(zero).toHaveLength(1);
    expect(zero[0].x).toBeCloseTo(scaled(view, 'x', 0), 6);
  });

  it('reports the level without a conditional SD', () => {
    expect((spec.title as { subtitle: string[] }).subtitle).toContain('1 level has no finite conditional SD: drawn without a bar.');
  });

  it('plots a slope term when asked', async () => {
    const slope = conditionalModes(MODES, { factor: 'site', term: 'moisture' });
    const { view } = await expectValidAndRendered(slope, ['<line']);
    expect(markItems(view, 'modes')).toHaveLength(2);
  });
});

describe('conditionalModes errors', () => {
  it('lists the factors present for an unknown factor', () => {
    expect(() => conditionalModes(MODES, { factor: 'plot' })).toThrow(
      /conditionalModes: options\.factor 'plot' has no rows; factors present: 'site', 'year'/,
    );
  });

  it('lists the terms present for an unknown term', () => {
    expect(() => conditionalModes(MODES, { factor: 'site', term: 'grazing' })).toThrow(
      /options\.term 'grazing' is not a term of factor 'site'; terms present: 'intercept', 'moisture'/,
    );
  });

  it('rejects a level given twice', () => {
    expect(() => conditionalModes([...MODES, MODES[0]], { factor: 'site' })).toThrow(/row 8: level 'ashpool' of 'site' \(intercept\) appears twice/);
  });
});
