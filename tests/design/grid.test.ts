import { describe, expect, it } from 'vitest';
import { QuadratInputError } from '../../kernel-lib/model/errors';
import { BASE_SCENARIO_KEY, expandGrid } from '../../kernel-lib/design/grid';
import { parseDesign } from '../../kernel-lib/design/parse';

/** Invented survey: sites crossed with years, plots nested in sites. */
function base(): any {
  return {
    seed: 7,
    replicates: 10,
    factors: [
      { name: 'site', levels: 6 },
      { name: 'year', levels: 3 },
      { name: 'plot', levels: 4, within: 'site' },
    ],
    perCell: 2,
    covariates: [{ name: 'rain', varies: 'observation', normal: { mean: 0, sd: 1 } }],
    truth: { fixed: { intercept: 10, rain: 0.5 }, sd: { site: 1, year: 0.5, residual: 2 } },
    variants: [{ name: 'both random', model: { response: 'y', fixed: ['rain'], groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'random' }] } }],
  };
}

describe('expandGrid', () => {
  it('forms the cartesian product in key order, first key slowest', () => {
    const d = parseDesign({ ...base(), grid: { 'factors.year.levels': [3, 4, 5, 8], 'truth.sd.site': [0.5, 1] } });
    const scenarios = expandGrid(d);
    // 4 × 2 combinations (cartesian product, common practice, no source).
    expect(scenarios.map((s) => s.key)).toEqual([
      'factors.year.levels=3|truth.sd.site=0.5',
      'factors.year.levels=3|truth.sd.site=1',
      'factors.year.levels=4|truth.sd.site=0.5',
      'factors.year.levels=4|truth.sd.site=1',
      'factors.year.levels=5|truth.sd.site=0.5',
      'factors.year.levels=5|truth.sd.site=1',
      'factors.year.levels=8|truth.sd.site=0.5',
      'factors.year.levels=8|truth.sd.site=1',
    ]);
    const s = scenarios[5];
    expect(s.values).toEqual({ 'factors.year.levels': 5, 'truth.sd.site': 1 });
    expect(s.design.factors[1].labels).toEqual(['year1', 'year2', 'year3', 'year4', 'year5']);
    expect(s.design.truth.sd.site).toBe(1);
    expect(s.design.grid).toEqual([]);
    // The original design is untouched.
    expect(d.factors[1].levels).toBe(3);
  });

  it('addresses named array elements by name, not position', () => {
    const input = base();
    input.factors = [input.factors[1], input.factors[0], input.factors[2]];
    input.grid = { 'factors.year.levels': [2], 'covariates.rain.normal.sd': [3] };
    const [s] = expandGrid(parseDesign(input));
    expect(s.design.factors.find((f) => f.name === 'year')!.levels).toBe(2);
    expect(s.design.factors.find((f) => f.name === 'site')!.levels).toBe(6);
    expect(s.design.covariates[0]).toMatchObject({ kind: 'normal', sd: 3 });
  });

  it('gives keys that do not depend on the key order of the design object', () => {
    const a = base();
    a.grid = { perCell: [1, 3], missing: [0, 0.2] };
    const b: any = {};
    for (const k of Object.keys(a).reverse()) b[k] = a[k];
    b.truth = { sd: a.truth.sd, fixed: a.truth.fixed };
    expect(expandGrid(parseDesign(b)).map((s) => s.key)).toEqual(expandGrid(parseDesign(a)).map((s) => s.key));
    expect(expandGrid(parseDesign(a))[3].key).toBe('perCell=3|missing=0.2');
  });

  it('gives a single base scenario without a grid', () => {
    const scenarios = expandGrid(parseDesign(base()));
    expect(scenarios).toHaveLength(1);
    expect(scenarios[0].key).toBe(BASE_SCENARIO_KEY);
    expect(scenarios[0].values).toEqual({});
  });

  it('refuses a path that does not exist, naming it', () => {
    expect(() => parseDesign({ ...base(), grid: { 'factors.years.levels': [3] } })).toThrow(
      'design.grid["factors.years.levels"]: nothing at "factors.years" (names: site, year, plot)',
    );
    // A factor without an SD has no entry to vary; the message lists what is there.
    expect(() => parseDesign({ ...base(), grid: { 'truth.sd.plot': [1] } })).toThrow(/nothing at "truth.sd.plot"; keys there: site, year, residual/);
    expect(() => parseDesign({ ...base(), grid: { 'truth.fixed': [1] } })).toThrow(/"truth.fixed" holds an object, not a number or text/);
    expect(() => parseDesign({ ...base(), grid: { perCell: [] } })).toThrow(/design\.grid\.perCell: expected at least one value/);
    expect(() => parseDesign({ ...base(), grid: { perCell: [2, 2] } })).toThrow(/design\.grid\.perCell\[1\]: duplicate value 2/);
  });

  it('reports an invalid scenario with its key and field', () => {
    const input = base();
    input.truth.fixed['year=year3'] = 1;
    input.grid = { 'factors.year.levels': [3, 2] };
    const d = parseDesign(input);
    try {
      expandGrid(d);
      throw new Error('expected an error');
    } catch (e) {
      expect(e).toBeInstanceOf(QuadratInputError);
      expect((e as Error).message).toMatch(/^scenario factors\.year\.levels=2: design\.truth\.fixed\["year=year3"\]: column "year" has no level "year3"/);
      expect((e as QuadratInputError).field).toBe('design.truth.fixed["year=year3"]');
    }
  });
});
