import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildDesign } from '../../kernel-lib/data/build-design';
import type { Columns } from '../../kernel-lib/data/columns';
import type { DesignMatrices } from '../../kernel-lib/data/design-matrices';
import { fillDesign, planDesign } from '../../kernel-lib/data/design-plan';
import { parseDesign } from '../../kernel-lib/design/parse';
import { simulateColumns } from '../../kernel-lib/design/simulate';
import { parseModel } from '../../kernel-lib/model/parse';
import type { ModelSpec } from '../../kernel-lib/model/types';
import { createStream } from '../../kernel-lib/random/stream';

/** Everything buildDesign returns, as plain JSON-able values (typed arrays as arrays). */
function plain(d: DesignMatrices): unknown {
  const { revision: _ignored, ...rest } = d;
  return JSON.parse(JSON.stringify(rest, (_k, v) => (ArrayBuffer.isView(v) ? Array.from(v as Float64Array) : v)));
}

// The invented demo survey (data/demo-study.json): nested plots, 3% missing rows (so n varies per
// replicate), a per-observation covariate and a balanced site-level category; the variants add
// slopes, a within-between split, interactions and a model without intercept.
const demo = JSON.parse(readFileSync(join(__dirname, '..', '..', 'data', 'demo-study.json'), 'utf8'));
const groups = [
  { factor: 'site', as: 'random' }, { factor: 'plot', within: 'site', as: 'random' }, { factor: 'year', as: 'random' },
];
const models: Record<string, ModelSpec> = {
  demo: { response: 'sedge_height', fixed: ['soil_moisture', 'grazing'], groups } as ModelSpec,
  'year fixed, slope': {
    response: 'sedge_height', fixed: ['soil_moisture', 'grazing'],
    groups: [{ factor: 'site', as: 'random', slopes: ['soil_moisture'] }, { factor: 'year', as: 'fixed', slopes: ['soil_moisture'] }],
  } as ModelSpec,
  'split and interaction': {
    response: 'sedge_height', fixed: ['soil_moisture', 'grazing', 'soil_moisture:grazing'],
    groups: [{ factor: 'site', as: 'random', split: ['soil_moisture'] }, { factor: 'plot', within: 'site', as: 'fixed' }],
  } as ModelSpec,
  'no intercept': { response: 'sedge_height', intercept: false, fixed: ['grazing', 'soil_moisture'], groups: [{ factor: 'year', as: 'random' }] } as ModelSpec,
  'site in a fixed term': { response: 'sedge_height', fixed: ['site', 'soil_moisture'], groups: [{ factor: 'year', as: 'random' }] } as ModelSpec,
};

describe('design plan: a refill gives exactly what buildDesign gives', () => {
  for (const [name, spec] of Object.entries(models)) {
    it(`${name}: 40 simulated replicates, identical to buildDesign (common practice, no source: the plan is a cache)`, () => {
      const design = parseDesign({ ...demo, grid: undefined });
      const model = parseModel(spec);
      let plan = null;
      let refilled = 0;
      for (let r = 0; r < 40; r++) {
        const data = simulateColumns(design, createStream(11, 'plan', r));
        const columns = data.columns as Columns;
        const built = buildDesign(columns, model);
        if (plan === null) {
          plan = planDesign(columns, model, built, data.n + data.dropped);
          continue;
        }
        const filled = fillDesign(plan, columns);
        if (filled === null) continue;
        refilled++;
        expect(plain(filled)).toEqual(plain(built));
      }
      expect(plan).not.toBeNull();
      expect(refilled).toBeGreaterThan(30);
    });
  }
});

describe('design plan: revision and refusals', () => {
  const spec = models.demo;
  const design = parseDesign({ ...demo, missing: 0, grid: undefined });
  const model = parseModel(spec);
  const first = simulateColumns(design, createStream(3, 'rev', 0));
  const plan = planDesign(first.columns as Columns, model, undefined, first.n)!;

  it('keeps the revision when only y changes, and changes it when X changes', () => {
    const a = fillDesign(plan, first.columns as Columns)!;
    const rev = a.revision;
    const sameX = { ...first.columns, sedge_height: (first.columns.sedge_height as Float64Array).map((v) => v + 1) };
    const b = fillDesign(plan, sameX as Columns)!;
    expect(b).toBe(a);
    expect(b.revision).toBe(rev);
    expect(b.y[0]).toBe((first.columns.sedge_height as Float64Array)[0] + 1);
    const other = simulateColumns(design, createStream(3, 'rev', 1));
    const c = fillDesign(plan, other.columns as Columns)!;
    expect(c.revision).not.toBe(rev);
    expect(plain(c)).toEqual(plain(buildDesign(other.columns as Columns, model)));
  });

  it('refuses data of another shape: a missing value, an unknown or absent level, text in a numeric column', () => {
    const cols = first.columns as Record<string, unknown[] | Float64Array>;
    const withNaN = { ...cols, soil_moisture: Float64Array.from(cols.soil_moisture as Float64Array, (v, i) => (i === 3 ? NaN : v)) };
    expect(fillDesign(plan, withNaN as Columns)).toBeNull();
    const unknownLevel = { ...cols, grazing: (cols.grazing as string[]).map((v, i) => (i === 0 ? 'mown' : v)) };
    expect(fillDesign(plan, unknownLevel as Columns)).toBeNull();
    const oneLevel = { ...cols, grazing: (cols.grazing as string[]).map(() => 'grazed') };
    expect(fillDesign(plan, oneLevel as Columns)).toBeNull();
    const text = { ...cols, soil_moisture: Array.from(cols.soil_moisture as Float64Array, (v, i) => (i === 2 ? 'wet' : v)) };
    expect(fillDesign(plan, text as Columns)).toBeNull();
    // and the plan still refills good data afterwards
    expect(plain(fillDesign(plan, first.columns as Columns)!)).toEqual(plain(buildDesign(first.columns as Columns, model)));
  });

  it('gives no plan when the first data set drops rows for missing values', () => {
    const cols = first.columns as Record<string, unknown[] | Float64Array>;
    const withNaN = { ...cols, soil_moisture: Float64Array.from(cols.soil_moisture as Float64Array, (v, i) => (i === 3 ? NaN : v)) };
    expect(planDesign(withNaN as Columns, model)).toBeNull();
  });
});
