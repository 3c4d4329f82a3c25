import { describe, expect, it } from 'vitest';
import { planCurve, type PlanCurvePoint } from '../../kernel-lib/plots/plan-curve';
import { expectSpecSnapshot, expectValidAndRendered, renderSpec } from '../helpers/vega-lite-checks';

// Invented plan points (not from any run): power against the number of sites, goal 0.8.
const points: PlanCurvePoint[] = [
  { value: 32, estimate: 0.839, mcse: 0.013, replicates: 800, verdict: 'meets' },
  { value: 4, estimate: 0.15, mcse: 0.0357, replicates: 100, verdict: 'fails' },
  { value: 28, estimate: 0.777, mcse: 0.0074, replicates: 3200, verdict: 'fails' },
  { value: 30, estimate: 0.812, mcse: 0.0069, replicates: 3200, verdict: 'undecided' },
  { value: 60, estimate: 0.99, mcse: 0.00995, replicates: 100, verdict: 'meets' },
];
const options = { threshold: 0.8, answer: 32, xTitle: 'site levels', yTitle: 'power of treatment=unburned' };

describe('planCurve(points, options)', () => {
  const spec = planCurve(points, options);

  it('matches the snapshot, validates against the Vega-Lite schema and renders', async () => {
    await expectSpecSnapshot(spec, 'plan-curve');
    await expectValidAndRendered(spec, ['<path', '<text']);
  });

  it('sorts the points, spans ±1.96 MCSE and marks the goal and the answer', async () => {
    const data = (spec as { data: { values: Record<string, number>[] } }).data.values;
    expect(data.map((r) => r.value)).toEqual([4, 28, 30, 32, 60]);
    // 0.839 ± 1.96·0.013 (95% normal quantile, common practice, no source)
    expect(data[3].low).toBeCloseTo(0.839 - 0.02548, 10);
    expect(data[3].high).toBeCloseTo(0.839 + 0.02548, 10);
    const { svg } = await renderSpec(spec);
    expect(svg).toContain('answer: 32');
    const none = await renderSpec(planCurve(points, { ...options, answer: null }));
    expect(none.svg).not.toContain('answer:');
  });

  it('refuses empty points and a missing threshold', () => {
    expect(() => planCurve([], options)).toThrow(/at least one evaluated point/);
    expect(() => planCurve(points, { ...options, threshold: NaN })).toThrow(/threshold/);
  });
});
