import { describe, expect, it } from 'vitest';
import { groupData } from '../../kernel-lib/plots';
import { expectSpecSnapshot, expectValidAndRendered, markItems, scaled } from '../helpers/vega-lite-checks';

// Invented quadrat rows (not field data): sedge height (cm) at three sites, soil moisture as a
// covariate; one height is missing.
const ROWS = Object.freeze(
  [
    { site: 'A', moisture: 0.1, height: 10 },
    { site: 'A', moisture: 0.4, height: 12 },
    { site: 'A', moisture: 0.9, height: 14 },
    { site: 'B', moisture: 0.2, height: 20 },
    { site: 'B', moisture: 0.7, height: 22 },
    { site: 'C', moisture: 0.3, height: 5 },
    { site: 'C', moisture: 0.5, height: 7 },
    { site: 'C', moisture: 0.6, height: null },
    { site: 'C', moisture: 0.8, height: 9 },
  ].map((r) => Object.freeze(r)),
);
// Group means by hand: A (10+12+14)/3 = 12, B (20+22)/2 = 21, C (5+7+9)/3 = 7.
const MEANS: Record<string, number> = { A: 12, B: 21, C: 7 };

describe('groupData(rows, { response, group })', () => {
  const spec = groupData(ROWS, { response: 'height', group: 'site', fieldTitles: { height: 'Sedge height (cm)' } });

  it('matches the snapshot, validates against the Vega-Lite schema and renders', async () => {
    await expectSpecSnapshot(spec, 'group-data');
    await expectValidAndRendered(spec, ['<path']);
    expect(JSON.stringify(groupData(ROWS, { response: 'height', group: 'site', fieldTitles: { height: 'Sedge height (cm)' } }))).toBe(
      JSON.stringify(spec),
    );
  });

  it('keeps the groups in their natural order (not by mean) and marks each mean', async () => {
    const { view } = await expectValidAndRendered(spec, []);
    // C has the lowest mean; the order stays that of the data
    expect((view.scale('x') as unknown as { domain(): string[] }).domain()).toEqual(['A', 'B', 'C']);
    const ticks = markItems(view, 'group_means');
    expect(ticks).toHaveLength(3);
    for (const t of ticks) {
      const group = t.datum.site as string;
      expect(t.datum.groupMean).toBeCloseTo(MEANS[group], 12);
      expect(t.y! + t.height! / 2).toBeCloseTo(scaled(view, 'y', MEANS[group]), 6);
    }
    expect(markItems(view, 'observations')).toHaveLength(8);
  });

  it('reports the row with a missing response', () => {
    expect((spec.title as { subtitle: string[] }).subtitle).toContain("1 row with a missing 'height' left out.");
  });
});

describe('groupData(rows, { response, group, x })', () => {
  it('draws one panel per group with its mean (snapshot, schema, render)', async () => {
    const spec = groupData(ROWS, { response: 'height', group: 'site', x: 'moisture', columns: 2 });
    await expectSpecSnapshot(spec, 'group-data-covariate');
    const s = spec as { facet?: { field: string }; columns?: number };
    expect(s.facet?.field).toBe('site');
    expect(s.columns).toBe(2);
    const { view, svg } = await expectValidAndRendered(spec, ['<path', '<line']);
    for (const g of ['A', 'B', 'C']) expect(svg).toContain(`>${g}</text>`);
    const rules = markItems(view, 'group_means');
    expect(rules).toHaveLength(3);
    for (const r of rules) {
      expect(r.datum.groupMean).toBeCloseTo(MEANS[r.datum.site as string], 12);
      expect(r.y).toBeCloseTo(scaled(view, 'y', MEANS[r.datum.site as string]), 6);
    }
  });
});

describe('groupData errors', () => {
  it('names the row and field of a missing group', () => {
    const rows = [...ROWS, { moisture: 0.5, height: 3 }];
    expect(() => groupData(rows, { response: 'height', group: 'site' })).toThrow(
      /groupData: row 9: field 'site' must be a string or a finite number, got undefined \(missing\)/,
    );
  });

  it('names the row and field of a response that is not a number', () => {
    const rows = [...ROWS, { site: 'A', moisture: 0.5, height: '3 cm' }];
    expect(() => groupData(rows, { response: 'height', group: 'site' })).toThrow(
      /row 9: field 'height' must be a number \(null or NaN when missing\), got '3 cm'/,
    );
  });

  it('says when no row has the response (e.g. a misspelt field)', () => {
    expect(() => groupData(ROWS, { response: 'hieght', group: 'site' })).toThrow(/no row has a finite 'hieght'/);
  });

  it('requires the response option', () => {
    expect(() => groupData(ROWS, { group: 'site' } as never)).toThrow(
      /^groupData: options\.response: expected a non-empty field name \(required\)$/,
    );
  });
});

describe('groupData level order', () => {
  it('orders years in time order whatever their means or row order', () => {
    // invented heights: 2024 lowest, rows not in time order
    const rows = [
      { year: '2023', height: 5 }, { year: '2021', height: 9 }, { year: '2024', height: 1 }, { year: '2022', height: 7 }, { year: '2010', height: 4 },
    ];
    const spec = groupData(rows, { response: 'height', group: 'year' }) as { layer: { encoding: { x?: { sort?: unknown } } }[] };
    const sorts = spec.layer.map((l) => l.encoding.x?.sort).filter((v) => v !== undefined);
    expect(sorts[0]).toEqual(['2010', '2021', '2022', '2023', '2024']);
  });
});
