import { describe, expect, it } from 'vitest';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { groupEffectRows } from '../../kernel-lib/notebook/tables';
import { predictedGroupEffects, type GroupEffectRow } from '../../kernel-lib/plots';
import { createStream } from '../../kernel-lib/random/stream';
import { expectValidAndRendered, markItems } from '../helpers/vega-lite-checks';

// A balanced one-way layout drawn from a seeded stream: 8 groups × 5 observations.
function balancedOneWay() {
  const s = createStream('predicted-group-effects', 1);
  const group: string[] = [];
  const y: number[] = [];
  for (let g = 0; g < 8; g++) {
    const effect = 2 * s.normal();
    for (let j = 0; j < 5; j++) {
      group.push(`g${g + 1}`);
      y.push(10 + effect + s.normal());
    }
  }
  return { group, y };
}

describe('groupEffectRows: raw deviations and predicted effects', () => {
  it('balanced one-way: predicted = raw × σb² / (σb² + σ²/n) and raw = group mean − grand mean', () => {
    // Shrinkage of the BLUP in the balanced one-way random model: Searle, Casella and McCulloch
    // (1992), Variance Components, §3.4 (the predictor λ(ȳ_g − ȳ) with λ = σa²/(σa² + σ²/n)).
    const data = balancedOneWay();
    const model = { response: 'y', groups: [{ factor: 'group', as: 'random' as const }] };
    const fit = fitModel(data, model);
    const sb2 = fit.random.find((r) => r.factor === 'group')!.variance;
    const s2 = fit.random.find((r) => r.factor === 'residual')!.variance;
    const lambda = sb2 / (sb2 + s2 / 5);
    const grand = data.y.reduce((a, b) => a + b, 0) / data.y.length;
    const rows = groupEffectRows(fit, data, model);
    expect(rows).toHaveLength(8);
    for (const r of rows) {
      const own = data.y.filter((_, i) => data.group[i] === r.level);
      const mean = own.reduce((a, b) => a + b, 0) / own.length;
      expect(r.n).toBe(5);
      expect(r.raw).toBeCloseTo(mean - grand, 8);
      expect(r.predicted).toBeCloseTo(lambda * r.raw, 6);
      expect(Math.abs(r.predicted)).toBeLessThan(Math.abs(r.raw));
    }
  });
});

describe('predictedGroupEffects(rows, { factor })', () => {
  // Invented rows (not from a fit): levels with numeric labels to check the natural order.
  const ROWS: GroupEffectRow[] = [
    { factor: 'year', level: '2010', term: 'intercept', predicted: 0.4, lower: -0.2, upper: 1.0, raw: 0.9, n: 3 },
    { factor: 'year', level: '2009', term: 'intercept', predicted: -0.6, lower: -1.1, upper: -0.1, raw: -0.7, n: 30 },
    { factor: 'year', level: '2011', term: 'intercept', predicted: 0.1, lower: -0.5, upper: 0.7, raw: NaN, n: 0 },
    { factor: 'site', level: 'a', term: 'intercept', predicted: 0, lower: -1, upper: 1, raw: 0, n: 4 },
  ];

  it('validates, renders, keeps levels in natural order and draws raw, predicted, pull and interval marks', async () => {
    const spec = predictedGroupEffects(ROWS, { factor: 'year' });
    const { view } = await expectValidAndRendered(spec, ['<line', '<path']);
    expect((view.scale('y') as unknown as { domain(): string[] }).domain()).toEqual(['2009 (30)', '2010 (3)', '2011 (0)']);
    expect(markItems(view, 'predicted')).toHaveLength(3);
    expect(markItems(view, 'raw')).toHaveLength(2); // 2011 has no raw deviation
    expect(markItems(view, 'pull')).toHaveLength(2);
    expect(markItems(view, 'intervals')).toHaveLength(3);
    expect(JSON.stringify(spec)).not.toMatch(/conditional mode|caterpillar/i);
  });

  it('names the factors present when the factor has no rows', () => {
    expect(() => predictedGroupEffects(ROWS, { factor: 'plot' })).toThrow(/no rows for factor 'plot' \(intercept\); factors present: 'year', 'site'/);
  });
});
