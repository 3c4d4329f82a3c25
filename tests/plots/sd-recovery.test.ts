import { describe, expect, it } from 'vitest';
import type { ReplicateRow } from '../../kernel-lib/study/replicate-row';
import { sdRecovery } from '../../kernel-lib/plots';
import { compositeItems, expectSpecSnapshot, expectValidAndRendered, markItems, scaled } from '../helpers/vega-lite-checks';

// Invented replicate rows (not from any study): site SD estimates for two variants at 3 and 10
// sites, true SD 0.8; a residual SD row per replicate that must be filtered away; one failed fit.
type Row = ReplicateRow & { levels: number };

const ESTIMATES: Record<string, Record<number, number[]>> = {
  'site random': { 3: [0.2, 0.35, 0.5, 0.8, 1.1, 0, 0, 0.6], 10: [0.7, 0.75, 0.8, 0.85, 0.9, 0.95, 0.65, 0.82] },
  'site fixed': { 3: [0.1, 0.3, 0.45, 0.7, 1.0, 0, 0.55, 0.5], 10: [0.6, 0.7, 0.75, 0.8, 0.85, 0.9, 0.7, 0.78] },
};

function replicateRows(): readonly Row[] {
  const rows: Row[] = [];
  for (const levels of [3, 10]) {
    for (const variant of ['site random', 'site fixed']) {
      ESTIMATES[variant][levels].forEach((estimate, replicate) => {
        const base = { scenario: `sites${levels}`, variant, replicate, levels, se: NaN, lower: NaN, upper: NaN, df: NaN, reason: '' };
        const status = estimate === 0 ? 'singular' : 'ok';
        rows.push({ ...base, parameter: 'site', kind: 'sd', truth: 0.8, estimate, status });
        rows.push({ ...base, parameter: 'residual', kind: 'sd', truth: 1.5, estimate: 1.5, status });
        rows.push({ ...base, parameter: '(intercept)', kind: 'fixed', truth: 10, estimate: 10, status });
      });
    }
  }
  rows.push({
    scenario: 'sites3',
    variant: 'site fixed',
    replicate: 8,
    levels: 3,
    parameter: 'site',
    kind: 'sd',
    truth: 0.8,
    estimate: NaN,
    se: NaN,
    lower: NaN,
    upper: NaN,
    df: NaN,
    status: 'failed',
    reason: 'invented failure',
  });
  for (const r of rows) Object.freeze(r);
  return Object.freeze(rows);
}

describe('sdRecovery(replicates, { x, parameter })', () => {
  const rows = replicateRows();
  const spec = sdRecovery(rows, { x: 'levels', parameter: 'site', fieldTitles: { levels: 'Sites in the survey' } });

  it('matches the snapshot, validates against the Vega-Lite schema and renders', async () => {
    await expectSpecSnapshot(spec, 'sd-recovery');
    await expectValidAndRendered(spec, ['<path', '<text']);
    expect(JSON.stringify(sdRecovery(rows, { x: 'levels', parameter: 'site', fieldTitles: { levels: 'Sites in the survey' } }))).toBe(
      JSON.stringify(spec),
    );
  });

  it('keeps only the SD rows of the parameter and counts the failed fit', () => {
    const values = (spec as { data: { values: Record<string, unknown>[] } }).data.values;
    expect(values).toHaveLength(32);
    expect(values.every((v) => v.parameter === 'site')).toBe(true);
    expect((spec.title as { subtitle: string[] }).subtitle).toContain(
      '1 replicate without an estimate (failed or aliased) left out.',
    );
  });

  it('draws the box at the quartiles', async () => {
    // numpy.percentile([0.2, 0.35, 0.5, 0.8, 1.1, 0, 0, 0.6], [25, 50, 75]) (linear, Hyndman and
    // Fan 1996 definition 7) = [0.15, 0.425, 0.65].
    const { view } = await expectValidAndRendered(spec, []);
    // The box rects carry the quartiles; the median ticks (also rects) are 1 px high.
    const boxes = compositeItems(view, 'sd_boxes', 'rect').filter((b) => Math.abs(b.height!) > 1);
    expect(boxes).toHaveLength(4);
    const box = boxes.find((b) => b.datum.variant === 'site random' && b.datum.levels === 3)!;
    expect(box.datum.lower_box_estimate).toBeCloseTo(0.15, 12);
    expect(box.datum.mid_box_estimate).toBeCloseTo(0.425, 12);
    expect(box.datum.upper_box_estimate).toBeCloseTo(0.65, 12);
    const top = Math.min(box.y!, box.y! + box.height!);
    const bottom = Math.max(box.y!, box.y! + box.height!);
    expect(top).toBeCloseTo(scaled(view, 'y', 0.65), 6);
    expect(bottom).toBeCloseTo(scaled(view, 'y', 0.15), 6);
  });

  it('marks the true SD once per x value', async () => {
    const { view } = await expectValidAndRendered(spec, []);
    const ticks = markItems(view, 'true_sd');
    expect(ticks).toHaveLength(2);
    // A tick is a thin rect centred on the value.
    for (const t of ticks) expect(t.y! + t.height! / 2).toBeCloseTo(scaled(view, 'y', 0.8), 6);
  });

  it('writes the share of zero estimates per box', async () => {
    // Counted by hand from the invented rows: site random at 3 sites 2 of 8 zeros, site fixed 1 of 8
    // (its failed ninth replicate is left out).
    const { view, svg } = await expectValidAndRendered(spec, []);
    const labels = markItems(view, 'zero_share');
    expect(labels).toHaveLength(4);
    const share = (variant: string, levels: number) =>
      labels.find((l) => l.datum.variant === variant && l.datum.levels === levels)!.datum.zeroShare;
    expect(share('site random', 3)).toBeCloseTo(2 / 8, 12);
    expect(share('site fixed', 3)).toBeCloseTo(1 / 8, 12);
    expect(share('site random', 10)).toBe(0);
    expect(svg).toContain('>25%</text>');
    expect(svg).toContain('>0%</text>');
  });

  it('counts estimates up to zeroTolerance as zero', async () => {
    const tolerant = sdRecovery(rows, { x: 'levels', parameter: 'site', zeroTolerance: 0.2 });
    const { view } = await expectValidAndRendered(tolerant, []);
    const label = markItems(view, 'zero_share').find((l) => l.datum.variant === 'site random' && l.datum.levels === 3)!;
    expect(label.datum.zeroShare).toBeCloseTo(3 / 8, 12);
  });

  it('facets by parameter when asked', async () => {
    const faceted = sdRecovery(rows, { x: 'levels', facet: 'parameter' });
    expect((faceted as { facet?: { column?: { field: string } } }).facet?.column?.field).toBe('parameter');
    const { svg } = await expectValidAndRendered(faceted, ['<path']);
    expect(svg).toContain('>residual</text>');
  });
});

describe('sdRecovery errors', () => {
  const rows = replicateRows();

  it('refuses to pool two SD parameters into one box', () => {
    expect(() => sdRecovery(rows, { x: 'levels' })).toThrow(
      /rows \d+ and \d+ fall into the same box \(variant 'site random', levels=3\) but their 'parameter' differs \('site' vs 'residual'\)/,
    );
  });

  it('names the missing scenario field', () => {
    expect(() => sdRecovery(rows, { x: 'sites', parameter: 'site' })).toThrow(
      /sdRecovery: row 0: field 'sites' must be a string or a finite number, got undefined \(missing\)/,
    );
  });

  it('lists the SD parameters present for an unknown one', () => {
    expect(() => sdRecovery(rows, { x: 'levels', parameter: 'plot' })).toThrow(
      /options\.parameter: no SD rows for 'plot'; SD parameters present: 'site', 'residual'/,
    );
  });

  it('says when there is no SD row at all', () => {
    const fixedOnly = rows.filter((r) => r.kind === 'fixed');
    expect(() => sdRecovery(fixedOnly, { x: 'levels' })).toThrow(/no rows of kind 'sd'/);
  });

  it('rejects a true SD that changes between variants at one x', () => {
    const changed = rows.map((r, i) => (i === 3 ? { ...r, truth: 0.9 } : r));
    expect(() => sdRecovery(changed, { x: 'levels', parameter: 'site' })).toThrow(
      /have different true SDs \(0\.8 vs 0\.9\); expected one true SD per x value/,
    );
  });
});

describe('sdRecovery colours across the charts of a study', () => {
  // An SD that only one variant estimates (the other enters the factor as fixed) keeps that
  // variant's colour from the study's variant order (common practice, no source: one colour per
  // series across the figures of a report).
  const only = replicateRows().filter((r) => r.variant === 'site fixed');
  const colourScale = (spec: unknown) =>
    (spec as { layer: { name: string; encoding: { color: { scale: { domain: string[]; range: string[] } } } }[] }).layer.find(
      (l) => l.name === 'sd_boxes',
    )!.encoding.color.scale;

  it('gives a variant the colour of its place in options.variants, listing only the variants drawn', () => {
    const all = colourScale(sdRecovery(replicateRows(), { x: 'levels', parameter: 'site', variants: ['site random', 'site fixed'] }));
    const one = colourScale(sdRecovery(only, { x: 'levels', parameter: 'site', variants: ['site random', 'site fixed'] }));
    expect(one.domain).toEqual(['site fixed']);
    expect(one.range).toEqual([all.range[all.domain.indexOf('site fixed')]]);
    expect(one.range[0]).not.toBe(all.range[0]);
  });
});
