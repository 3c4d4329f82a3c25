import { describe, expect, it } from 'vitest';
import type { MetricName, MetricRow } from '../../kernel-lib/study/metrics';
import { metricVsScenario } from '../../kernel-lib/plots';
import { expectSpecSnapshot, expectValidAndRendered, markItems, scaled } from '../helpers/vega-lite-checks';

// Invented metric rows (not from any study): two variants, sites (levels) 3/5/10, quadrats per
// site (perCell) 2/5. Values and MCSEs are made up; n = 500 except 'site fixed' at 3 sites (400).
type Row = MetricRow & { levels: number; perCell: number };

function deepFreeze<T>(rows: T[]): readonly T[] {
  for (const r of rows) Object.freeze(r);
  return Object.freeze(rows);
}

const COVERAGE: Record<string, number[]> = { 'site random': [0.912, 0.936, 0.948], 'site fixed': [0.874, 0.93, 0.951] };

function metricRows(): readonly Row[] {
  const rows: Row[] = [];
  for (const perCell of [2, 5]) {
    for (const variant of ['site random', 'site fixed']) {
      [3, 5, 10].forEach((levels, i) => {
        const scenario = `sites${levels}-quadrats${perCell}`;
        const n = variant === 'site fixed' && levels === 3 ? 400 : 500;
        const base = { scenario, variant, parameter: 'slope', kind: 'fixed' as const, n, levels, perCell };
        const value = COVERAGE[variant][i] - (perCell === 2 ? 0.004 : 0);
        rows.push({ ...base, metric: 'coverage', value, mcse: 0.01, nominal: 0.95 });
        rows.push({ ...base, metric: 'bias', value: (variant === 'site fixed' ? 0.03 : -0.01) / levels, mcse: 0.005 });
        rows.push({ ...base, parameter: 'moisture', metric: 'bias', value: 0.001, mcse: 0.004 });
      });
    }
  }
  // A boundary case: an MCSE the summary could not compute.
  rows.push({
    scenario: 'sites3-quadrats2',
    variant: 'site random',
    parameter: '*',
    kind: 'fit',
    metric: 'singularShare',
    value: 0,
    mcse: NaN,
    n: 1,
    note: 'n < 2: MCSE needs at least 2 replicates',
    levels: 3,
    perCell: 2,
  });
  return deepFreeze(rows);
}

describe('metricVsScenario(rows, { metric: coverage, x, facet })', () => {
  const rows = metricRows();
  const spec = metricVsScenario(rows, { metric: 'coverage', x: 'levels', facet: 'perCell' });

  it('matches the snapshot, validates against the Vega-Lite schema and renders', async () => {
    await expectSpecSnapshot(spec, 'metric-vs-scenario-coverage');
    const { svg } = await expectValidAndRendered(spec, ['<path', '<line']);
    // Facet headers: one per perCell value.
    expect(svg).toContain('>2</text>');
    expect(svg).toContain('>5</text>');
  });

  it('is deterministic and leaves its input untouched (frozen rows)', () => {
    expect(JSON.stringify(metricVsScenario(rows, { metric: 'coverage', x: 'levels', facet: 'perCell' }))).toBe(
      JSON.stringify(spec),
    );
  });

  it('places the column facet on the requested field', () => {
    const s = spec as { facet?: { column?: { field: string }; row?: unknown } };
    expect(s.facet?.column?.field).toBe('perCell');
    expect(s.facet?.row).toBeUndefined();
  });

  it('draws Monte Carlo error bars at value ± 2 MCSE', async () => {
    // Common practice, no source: ± 2 MCSE bars; literal input 0.912 ± 2 × 0.01 (perCell 5).
    const values = (spec as { data: { values: Record<string, unknown>[] } }).data.values;
    const row = values.find((v) => v.variant === 'site random' && v.levels === 3 && v.perCell === 5)!;
    expect(row.mcLower).toBeCloseTo(0.892, 12);
    expect(row.mcUpper).toBeCloseTo(0.932, 12);
    const { view } = await expectValidAndRendered(spec, []);
    const bars = markItems(view, 'mc_error_bars');
    expect(bars).toHaveLength(12);
    const bar = bars.find((b) => b.datum.variant === 'site random' && b.datum.levels === 3 && b.datum.perCell === 5)!;
    const ends = [bar.y!, bar.y2!].sort((a, b) => a - b);
    expect(ends[0]).toBeCloseTo(scaled(view, 'y', 0.932), 6);
    expect(ends[1]).toBeCloseTo(scaled(view, 'y', 0.892), 6);
  });

  it('shades nominal ± 2 sqrt(0.95 × 0.05 / n), the widest band among the variants at each x', async () => {
    // Common practice, no source for the 2-MCSE band; binomial MCSE sqrt(p(1-p)/n) is from
    // Morris, White and Crowther (2019), Statistics in Medicine 38:2074, Table 6.
    const half500 = 2 * Math.sqrt((0.95 * 0.05) / 500);
    const half400 = 2 * Math.sqrt((0.95 * 0.05) / 400);
    const values = (spec as { data: { values: Record<string, unknown>[] } }).data.values;
    for (const v of values) {
      const half = v.n === 400 ? half400 : half500;
      expect(v.bandLower).toBeCloseTo(0.95 - half, 12);
      expect(v.bandUpper).toBeCloseTo(0.95 + half, 12);
    }
    const { view } = await expectValidAndRendered(spec, []);
    const rects = markItems(view, 'nominal_band');
    expect(rects).toHaveLength(6); // 3 levels × 2 perCell
    for (const r of rects) {
      const half = r.datum.levels === 3 ? half400 : half500;
      const top = Math.min(r.y!, r.y! + r.height!);
      const bottom = Math.max(r.y!, r.y! + r.height!);
      expect(top).toBeCloseTo(scaled(view, 'y', 0.95 + half), 6);
      expect(bottom).toBeCloseTo(scaled(view, 'y', 0.95 - half), 6);
    }
    const rules = markItems(view, 'reference_rule');
    expect(rules.length).toBeGreaterThan(0);
    for (const r of rules) expect(r.y).toBeCloseTo(scaled(view, 'y', 0.95), 6);
  });

  it('states the multiplier in the subtitle', () => {
    const subtitle = (spec.title as { subtitle: string[] }).subtitle.join(' ');
    expect(subtitle).toContain('± 2 × Monte Carlo SE');
    expect(subtitle).toContain('nominal 0.95 ± 2 × sqrt(p(1 − p)/n)');
  });
});

describe('metricVsScenario(rows, { metric: bias, … })', () => {
  const rows = metricRows();

  it('draws a rule at 0 and a row facet when asked (snapshot, schema, render)', async () => {
    const spec = metricVsScenario(rows, { metric: 'bias', x: 'levels', facetRow: 'perCell', parameter: 'slope' });
    await expectSpecSnapshot(spec, 'metric-vs-scenario-bias');
    const { view } = await expectValidAndRendered(spec, ['<path', '<line']);
    expect((spec as { facet?: { row?: { field: string } } }).facet?.row?.field).toBe('perCell');
    const rules = markItems(view, 'reference_rule');
    for (const r of rules) expect(r.y).toBeCloseTo(scaled(view, 'y', 0), 6);
    expect(markItems(view, 'reference_rule').length).toBe(2);
    expect(markItems(view, 'metric_points')).toHaveLength(12);
  });

  it('facets by parameter when several parameters are kept', async () => {
    const spec = metricVsScenario(rows, { metric: 'bias', x: 'levels', facet: 'parameter', facetRow: 'perCell' });
    await expectValidAndRendered(spec, ['<path']);
    expect((spec as { facet?: { column?: { field: string } } }).facet?.column?.field).toBe('parameter');
  });

  it('rejects two rows on the same point, naming the rows and the differing field', () => {
    expect(() => metricVsScenario(rows, { metric: 'bias', x: 'levels', facet: 'perCell' })).toThrow(
      /rows \d+ and \d+ both place variant 'site random' at levels=3, perCell=2 \(their 'parameter' differs: 'slope' vs 'moisture'\)/,
    );
  });

  it('reports points without an MCSE instead of dropping them silently', async () => {
    const spec = metricVsScenario(rows, { metric: 'singularShare', x: 'levels', facet: 'perCell' });
    expect((spec.title as { subtitle: string[] }).subtitle.join(' ')).toContain('1 point has no Monte Carlo SE');
    const { view } = await expectValidAndRendered(spec, ['<path']);
    expect(markItems(view, 'mc_error_bars')).toHaveLength(0);
    expect(markItems(view, 'metric_points')).toHaveLength(1);
  });
});

describe('metricVsScenario errors', () => {
  const rows = metricRows();

  it('names the option and the allowed values for an unknown metric', () => {
    const call = () => metricVsScenario(rows, { metric: 'covrage' as MetricName, x: 'levels' });
    expect(call).toThrow(/^metricVsScenario: options\.metric must be one of .*, got 'covrage'$/);
    for (const allowed of ['coverage', 'bias', 'rmse', 'width', 'power', 'typeIError']) expect(call).toThrow(`'${allowed}'`);
  });

  it('names the row and field when a scenario field is missing', () => {
    expect(() => metricVsScenario(rows, { metric: 'coverage', x: 'sites', facet: 'perCell' })).toThrow(
      /row 0: field 'sites' must be a string or a finite number, got undefined \(missing\)/,
    );
  });

  it('lists the metrics present when none match', () => {
    const onlyBias = rows.filter((r) => r.metric === 'bias');
    expect(() => metricVsScenario(onlyBias, { metric: 'power', x: 'levels' })).toThrow(
      /no rows with metric 'power'; metrics present: 'bias'/,
    );
  });

  it('rejects a nominal level that contradicts the rows', () => {
    expect(() => metricVsScenario(rows, { metric: 'coverage', x: 'levels', facet: 'perCell', nominal: 0.9 })).toThrow(
      /options\.nominal \(0\.9\) differs from the rows' nominal level 0\.95/,
    );
  });

  it('asks for a nominal level when coverage rows carry none', () => {
    const bare = rows.filter((r) => r.metric === 'coverage').map(({ nominal: _n, ...r }) => r);
    expect(() => metricVsScenario(bare, { metric: 'coverage', x: 'levels', facet: 'perCell' })).toThrow(
      /carry no 'nominal' field; pass options\.nominal/,
    );
    const spec = metricVsScenario(bare, { metric: 'coverage', x: 'levels', facet: 'perCell', nominal: 0.95 });
    expect((spec as { data: { values: { bandUpper: number }[] } }).data.values[0].bandUpper).toBeGreaterThan(0.95);
  });

  it('names an unknown parameter and lists those present', () => {
    expect(() => metricVsScenario(rows, { metric: 'bias', x: 'levels', parameter: 'slop' })).toThrow(
      /options\.parameter: no 'bias' rows for 'slop'; parameters present: 'slope', 'moisture'/,
    );
  });

  it('requires every variant in options.variants', () => {
    expect(() =>
      metricVsScenario(rows, { metric: 'coverage', x: 'levels', facet: 'perCell', variants: ['site random'] }),
    ).toThrow(/options\.variants must list every variant in the rows; missing 'site fixed'/);
  });

  it('fixes colours by the variant order, whatever the row order', () => {
    const reversed = [...rows].reverse();
    const colourOf = (s: unknown) =>
      ((s as { spec: { layer: { name: string; encoding: { color: { scale: { domain: string[]; range: string[] } } } }[] } })
        .spec.layer.find((l) => l.name === 'metric_points')!.encoding.color.scale);
    const a = colourOf(metricVsScenario(rows, { metric: 'coverage', x: 'levels', facet: 'perCell' }));
    const b = colourOf(metricVsScenario(reversed, { metric: 'coverage', x: 'levels', facet: 'perCell' }));
    expect(a).toEqual(b);
    expect(a.domain).toEqual(['site fixed', 'site random']);
  });
});

describe('metricVsScenario for a metric equal to 1 everywhere', () => {
  // Power of a strong effect: every replicate significant, so every point is 1 with MCSE 0.
  const power = metricRows()
    .filter((r) => r.metric === 'coverage')
    .map((r) => ({ ...r, metric: 'power' as MetricName, value: 1, mcse: 0, nominal: undefined }));
  const spec = metricVsScenario(power, { metric: 'power', x: 'levels', facet: 'perCell' }) as unknown as {
    title: { subtitle: string[] };
    spec: { layer: { name: string; encoding: { y: { scale: { domain?: number[]; zero?: boolean } } } }[] };
  };

  it('draws power on a fixed 0-1 axis and says in words that every replicate was significant', () => {
    const points = spec.spec.layer.find((l) => l.name === 'metric_points')!;
    expect(points.encoding.y.scale.domain).toEqual([0, 1]);
    expect(spec.title.subtitle.join(' ')).toContain('all replicates significant');
  });

  it('keeps the zoomed axis and no such note for coverage that varies', () => {
    const coverage = metricVsScenario(metricRows(), { metric: 'coverage', x: 'levels', facet: 'perCell' }) as unknown as typeof spec;
    const points = coverage.spec.layer.find((l) => l.name === 'metric_points')!;
    expect(points.encoding.y.scale.domain).toBeUndefined();
    expect(coverage.title.subtitle.join(' ')).not.toContain('Every point');
  });
});
