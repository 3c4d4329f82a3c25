import { describe, expect, it } from 'vitest';
import { normalQuantilePlot, residualsVsFitted } from '../../kernel-lib/plots';
import { normalQuantilePairs } from '../../kernel-lib/plots/normal-quantile';
import { expectSpecSnapshot, expectValidAndRendered, markItems, scaled } from '../helpers/vega-lite-checks';

// Invented fitted values and residuals (not from a fit); one residual is NaN.
const FIT = Object.freeze({
  fitted: Float64Array.from([10.2, 11.5, 12.1, 13.8, 14.4, 15.0]),
  residuals: Float64Array.from([-2, 1, NaN, 0, 4, -1]),
  rowIds: Int32Array.from([0, 1, 2, 4, 5, 7]),
});

describe('residualsVsFitted(fit)', () => {
  const spec = residualsVsFitted(FIT);

  it('matches the snapshot, validates against the Vega-Lite schema and renders', async () => {
    await expectSpecSnapshot(spec, 'residuals-vs-fitted');
    const { view } = await expectValidAndRendered(spec, ['<path', '<line']);
    const points = markItems(view, 'residual_points');
    expect(points).toHaveLength(5);
    const row5 = points.find((p) => p.datum.row === 5)!;
    expect(row5.x).toBeCloseTo(scaled(view, 'x', 14.4), 6);
    expect(row5.y).toBeCloseTo(scaled(view, 'y', 4), 6);
    expect(markItems(view, 'zero_rule')[0].y).toBeCloseTo(scaled(view, 'y', 0), 6);
    expect((spec.title as { subtitle: string[] }).subtitle).toContain('1 observation with a non-finite value left out.');
  });

  it('rejects fitted and residuals of different lengths, naming both', () => {
    expect(() => residualsVsFitted({ fitted: [1, 2, 3], residuals: [0, 1] } as never)).toThrow(
      /residualsVsFitted: 'fitted' has 3 values but 'residuals' has 2; expected equal lengths/,
    );
    expect(() => residualsVsFitted({ residuals: [0, 1] } as never)).toThrow(/field 'fitted' must be an array of numbers/);
  });
});

describe('normalQuantilePlot(fit)', () => {
  it('pairs sorted residuals with normal quantiles at (i - 0.5)/n', () => {
    // scipy.stats.norm.ppf([(i - 0.5) / 5 for i in 1..5]) (scipy 1.10):
    // [-1.2815515655446004, -0.5244005127080409, 0, 0.5244005127080407, 1.2815515655446004].
    const pairs = normalQuantilePairs([-2, 1, 0, 4, -1]);
    const scipy = [-1.2815515655446004, -0.5244005127080409, 0, 0.5244005127080407, 1.2815515655446004];
    scipy.forEach((q, i) => expect(pairs.theoretical[i]).toBeCloseTo(q, 12));
    expect(Array.from(pairs.sample)).toEqual([-2, -1, 0, 1, 4]);
    expect(Array.from(pairs.source)).toEqual([0, 4, 2, 1, 3]);
    // numpy.percentile([-2, -1, 0, 1, 4], [25, 75]) = [-1, 1]; scipy.stats.norm.ppf(0.75) = 0.6744897501960817:
    // line through the quartiles has slope 2 / (2 × 0.6744897501960817) and passes through 0.
    expect(pairs.slope).toBeCloseTo(1 / 0.6744897501960817, 12);
    expect(pairs.intercept).toBeCloseTo(0, 12);
  });

  it('matches the snapshot, validates against the Vega-Lite schema and renders', async () => {
    const spec = normalQuantilePlot(FIT);
    await expectSpecSnapshot(spec, 'normal-quantile');
    const { view } = await expectValidAndRendered(spec, ['<path']);
    const points = markItems(view, 'quantile_points');
    expect(points).toHaveLength(5);
    // The largest residual (4, input row 5) sits at the largest quantile, scipy norm.ppf(0.9).
    const top = points.find((p) => p.datum.row === 5)!;
    expect(top.x).toBeCloseTo(scaled(view, 'x', 1.2815515655446004), 6);
    expect(top.y).toBeCloseTo(scaled(view, 'y', 4), 6);
    expect((spec.title as { subtitle: string[] }).subtitle).toContain('1 residual is not finite: left out.');
  });

  it('draws the reference line with the quartile slope', async () => {
    const { view } = await expectValidAndRendered(normalQuantilePlot(FIT), []);
    const line = markItems(view, 'quartile_line');
    expect(line).toHaveLength(2);
    for (const end of line) {
      const t = end.datum.theoretical as number;
      expect(end.y).toBeCloseTo(scaled(view, 'y', t / 0.6744897501960817), 6);
    }
  });

  it('rejects residuals without a finite value', () => {
    expect(() => normalQuantilePlot({ residuals: Float64Array.from([NaN]) })).toThrow(
      /normalQuantilePlot: 'residuals' holds no finite value \(length 1\)/,
    );
  });
});
