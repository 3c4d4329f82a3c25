import * as aq from 'arquero';
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { buildDesign, extractResponse } from '../../kernel-lib/data/build-design';
import { columnsFromRecords, columnsFromTable, toColumns, type Columns } from '../../kernel-lib/data/columns';
import type { DesignMatrices } from '../../kernel-lib/data/design-matrices';
import { parseModel } from '../../kernel-lib/model/parse';
import type { ModelSpec } from '../../kernel-lib/model/types';
import { inputError } from '../helpers/input-error';

// Invented example table (not field data): twelve quadrats.
const quadrats: Columns = {
  y: [3.1, 2.4, 5.0, 1.9, 4.2, 3.3, 2.8, 3.9, 2.2, 3.6, 4.4, 2.9],
  x: [1.5, 2.0, -0.5, 3.25, 0.0, 4.0, 1.0, 2.5, 0.75, -1.0, 2.25, 3.5],
  z: [10, 20, 30, 40, 50, 60, 70, 80, 90, 100, 110, 120],
  habitat: ['wet', 'dry', 'mid', 'dry', 'wet', 'mid', 'wet', 'dry', 'mid', 'wet', 'dry', 'mid'],
  season: ['spring', 'autumn', 'summer', 'spring', 'summer', 'autumn', 'autumn', 'spring', 'spring', 'summer', 'summer', 'autumn'],
  site: ['A', 'A', 'A', 'B', 'B', 'C', 'C', 'C', 'B', 'A', 'C', 'B'],
};

function design(data: Columns, spec: ModelSpec): DesignMatrices {
  return buildDesign(data, parseModel(spec));
}


/** Column `name` of X as a plain array. */
function column(d: DesignMatrices, name: string): number[] {
  const j = d.fixedNames.indexOf(name);
  if (j < 0) throw new Error(`no column ${name} in ${d.fixedNames.join(', ')}`);
  return Array.from({ length: d.n }, (_, i) => d.X[i * d.p + j]);
}

function rows(d: DesignMatrices): number[][] {
  return Array.from({ length: d.n }, (_, i) => Array.from(d.X.subarray(i * d.p, (i + 1) * d.p)));
}

/**
 * Compare X with a matrix from patsy 0.5.3 (a general-purpose formula library for Python),
 * column by column, after mapping patsy names ("Intercept", "habitat[T.wet]") to ours.
 */
function expectSameColumnsAsPatsy(d: DesignMatrices, patsyNames: string[], patsyRows: number[][]): void {
  const ours = patsyNames.map((nm) => nm.replace('Intercept', 'intercept').replace(/\[(?:T\.)?([^\]]+)\]/g, '=$1'));
  expect([...d.fixedNames].sort()).toEqual([...ours].sort());
  ours.forEach((nm, j) => {
    // Values are small decimals and 0/1: exact up to the sign of zero.
    expect(column(d, nm).map((v) => v + 0)).toEqual(patsyRows.map((r) => r[j] + 0));
  });
}

describe('buildDesign: treatment coding against patsy', () => {
  it('numeric, factor and numeric-by-factor interaction', () => {
    const d = design(quadrats, { response: 'y', fixed: ['x', 'habitat', 'x:habitat'] });
    expect(d.fixedNames).toEqual(['intercept', 'x', 'habitat=mid', 'habitat=wet', 'x:habitat=mid', 'x:habitat=wet']);
    // patsy.dmatrix("x + habitat + x:habitat", df) on the table above.
    expectSameColumnsAsPatsy(
      d,
      ['Intercept', 'habitat[T.mid]', 'habitat[T.wet]', 'x', 'x:habitat[T.mid]', 'x:habitat[T.wet]'],
      [
        [1.0, 0.0, 1.0, 1.5, 0.0, 1.5],
        [1.0, 0.0, 0.0, 2.0, 0.0, 0.0],
        [1.0, 1.0, 0.0, -0.5, -0.5, -0.0],
        [1.0, 0.0, 0.0, 3.25, 0.0, 0.0],
        [1.0, 0.0, 1.0, 0.0, 0.0, 0.0],
        [1.0, 1.0, 0.0, 4.0, 4.0, 0.0],
        [1.0, 0.0, 1.0, 1.0, 0.0, 1.0],
        [1.0, 0.0, 0.0, 2.5, 0.0, 0.0],
        [1.0, 1.0, 0.0, 0.75, 0.75, 0.0],
        [1.0, 0.0, 1.0, -1.0, -0.0, -1.0],
        [1.0, 0.0, 0.0, 2.25, 0.0, 0.0],
        [1.0, 1.0, 0.0, 3.5, 3.5, 0.0],
      ],
    );
  });

  it('without an intercept, the first categorical main effect gets one column per level, later factors stay reduced', () => {
    const d = design(quadrats, { response: 'y', fixed: ['habitat', 'season', 'x'], intercept: false });
    expect(d.fixedNames).toEqual(['habitat=dry', 'habitat=mid', 'habitat=wet', 'season=spring', 'season=summer', 'x']);
    // patsy.dmatrix("0 + habitat + season + x", df) on the table above.
    expectSameColumnsAsPatsy(
      d,
      ['habitat[dry]', 'habitat[mid]', 'habitat[wet]', 'season[T.spring]', 'season[T.summer]', 'x'],
      [
        [0, 0, 1, 1, 0, 1.5], [1, 0, 0, 0, 0, 2.0], [0, 1, 0, 0, 1, -0.5], [1, 0, 0, 1, 0, 3.25],
        [0, 0, 1, 0, 1, 0.0], [0, 1, 0, 0, 0, 4.0], [0, 0, 1, 0, 0, 1.0], [1, 0, 0, 1, 0, 2.5],
        [0, 1, 0, 1, 0, 0.75], [0, 0, 1, 0, 1, -1.0], [1, 0, 0, 0, 1, 2.25], [0, 1, 0, 0, 0, 3.5],
      ],
    );
    // the first categorical main effect gets every level wherever it stands: patsy.dmatrix("0 + x + habitat", df)
    // names habitat[dry], habitat[mid], habitat[wet], x (it puts factors first; we keep model order)
    const later = design(quadrats, { response: 'y', fixed: ['x', 'habitat'], intercept: false });
    expect(later.fixedNames).toEqual(['x', 'habitat=dry', 'habitat=mid', 'habitat=wet']);
    // no categorical main effect: regression through the origin; patsy.dmatrix("0 + x + x:habitat", df)
    const origin = design(quadrats, { response: 'y', fixed: ['x', 'x:habitat'], intercept: false });
    expect(origin.fixedNames).toEqual(['x', 'x:habitat=mid', 'x:habitat=wet']);
  });

  it('factor-by-factor interaction', () => {
    const d = design(quadrats, { response: 'y', fixed: ['habitat', 'season', 'habitat:season'] });
    // Ours: first factor outer in the product columns.
    expect(d.fixedNames.slice(5)).toEqual([
      'habitat=mid:season=spring',
      'habitat=mid:season=summer',
      'habitat=wet:season=spring',
      'habitat=wet:season=summer',
    ]);
    // patsy.dmatrix("habitat + season + habitat:season", df).
    expectSameColumnsAsPatsy(
      d,
      [
        'Intercept',
        'habitat[T.mid]',
        'habitat[T.wet]',
        'season[T.spring]',
        'season[T.summer]',
        'habitat[T.mid]:season[T.spring]',
        'habitat[T.wet]:season[T.spring]',
        'habitat[T.mid]:season[T.summer]',
        'habitat[T.wet]:season[T.summer]',
      ],
      [
        [1.0, 0.0, 1.0, 1.0, 0.0, 0.0, 1.0, 0.0, 0.0],
        [1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0],
        [1.0, 1.0, 0.0, 0.0, 1.0, 0.0, 0.0, 1.0, 0.0],
        [1.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0],
        [1.0, 0.0, 1.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0],
        [1.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0],
        [1.0, 0.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0],
        [1.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0],
        [1.0, 1.0, 0.0, 1.0, 0.0, 1.0, 0.0, 0.0, 0.0],
        [1.0, 0.0, 1.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0],
        [1.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 0.0],
        [1.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0],
      ],
    );
  });

  it('chosen reference level and numeric-by-numeric product', () => {
    const d = design(quadrats, { response: 'y', fixed: [{ column: 'habitat', reference: 'wet' }, 'x:z'] });
    expect(d.fixedNames).toEqual(['intercept', 'habitat=dry', 'habitat=mid', 'x:z']);
    // patsy.dmatrix("C(habitat, Treatment('wet')) + x:z", df), rows in order.
    expect(rows(d).map((r) => r.map((v) => v + 0))).toEqual([
      [1.0, 0.0, 0.0, 15.0],
      [1.0, 1.0, 0.0, 40.0],
      [1.0, 0.0, 1.0, -15.0],
      [1.0, 1.0, 0.0, 130.0],
      [1.0, 0.0, 0.0, 0.0],
      [1.0, 0.0, 1.0, 240.0],
      [1.0, 0.0, 0.0, 70.0],
      [1.0, 1.0, 0.0, 200.0],
      [1.0, 0.0, 1.0, 67.5],
      [1.0, 0.0, 0.0, -100.0],
      [1.0, 1.0, 0.0, 247.5],
      [1.0, 0.0, 1.0, 420.0],
    ]);
  });
});

describe('buildDesign: fixed grouping factors', () => {
  it('site as fixed with a slope equals the hand-built matrix', () => {
    const d = design(quadrats, { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'fixed', slopes: ['x'] }] });
    // Treatment coding, reference A (first in sorted order); Fox 2016, Applied Regression Analysis
    // and Generalized Linear Models, 3rd ed., ch. 7 (dummy regression and interactions with dummies).
    expect(d.fixedNames).toEqual(['intercept', 'x', 'site=B', 'site=C', 'x:site=B', 'x:site=C']);
    const x = quadrats.x as number[];
    const site = quadrats.site as string[];
    const hand = x.map((xi, i) => {
      const b = site[i] === 'B' ? 1 : 0;
      const c = site[i] === 'C' ? 1 : 0;
      return [1, xi, b, c, xi * b, xi * c];
    });
    const plusZero = (m: number[][]) => m.map((r) => r.map((v) => v + 0));
    expect(plusZero(rows(d))).toEqual(plusZero(hand));
    expect(d.p).toBe(6);
    expect(d.n).toBe(12);
    expect(d.random).toEqual([]);
    expect(d.levelCounts).toEqual({ site: 3 });
  });

  it('dummy coefficients are differences of group means (OLS identity)', () => {
    // Fox 2016, ch. 7: with one factor in treatment coding, the intercept is the mean of the
    // reference group and each dummy coefficient is that group's mean minus the reference mean.
    const d = design(quadrats, { response: 'y', groups: [{ factor: 'site', as: 'fixed', reference: 'B' }] });
    expect(d.fixedNames).toEqual(['intercept', 'site=A', 'site=C']);
    const X = new Matrix(rows(d));
    const beta = solve(X.transpose().mmul(X), X.transpose().mmul(Matrix.columnVector(Array.from(d.y)))).to1DArray();
    const y = quadrats.y as number[];
    const site = quadrats.site as string[];
    const mean = (level: string) => {
      const ys = y.filter((_, i) => site[i] === level);
      return ys.reduce((s, v) => s + v, 0) / ys.length;
    };
    const [mA, mB, mC] = [mean('A'), mean('B'), mean('C')];
    expect(beta[0]).toBeCloseTo(mB, 12);
    expect(beta[1]).toBeCloseTo(mA - mB, 12);
    expect(beta[2]).toBeCloseTo(mC - mB, 12);
  });

  it('nested fixed factor: level identity is (site, plot)', () => {
    const data = { y: [1, 2, 3, 4, 5, 6], site: ['A', 'A', 'B', 'B', 'B', 'A'], plot: [1, 2, 1, 2, 2, 1] };
    const d = design(data, { response: 'y', groups: [{ factor: 'plot', as: 'fixed', within: 'site' }] });
    expect(d.fixedNames).toEqual(['intercept', 'plot=A/2', 'plot=B/1', 'plot=B/2']);
    expect(rows(d)).toEqual([
      [1, 0, 0, 0],
      [1, 1, 0, 0],
      [1, 0, 1, 0],
      [1, 0, 0, 1],
      [1, 0, 0, 1],
      [1, 0, 0, 0],
    ]);
    expect(d.levelCounts).toEqual({ plot: 4 });
  });

  it('a fixed group reference applies to interactions with the same column', () => {
    const d = design(quadrats, {
      response: 'y',
      fixed: ['x', 'x:site'],
      groups: [{ factor: 'site', as: 'fixed', reference: 'C' }],
    });
    expect(d.fixedNames).toEqual(['intercept', 'x', 'x:site=A', 'x:site=B', 'site=A', 'site=B']);
  });

  it('each column carries its role, so the engine never reads names (definition of the coding above)', () => {
    const d = design(quadrats, {
      response: 'y',
      fixed: ['x', 'habitat', 'x:z', 'x:habitat'],
      groups: [{ factor: 'site', as: 'fixed', slopes: ['x'] }, { factor: 'season', as: 'random' }],
    });
    const named = Object.fromEntries(d.fixedNames.map((name, j) => [name, d.roles[j]]));
    expect(d.roles).toHaveLength(d.p);
    expect(named['intercept']).toEqual({ kind: 'intercept', sources: [] });
    expect(named['x']).toEqual({ kind: 'covariate', sources: ['x'] });
    expect(named['x:z']).toEqual({ kind: 'covariate', sources: ['x', 'z'] });
    expect(named['habitat=wet']).toEqual({ kind: 'factor-level', sources: ['habitat'] });
    expect(named['x:habitat=wet']).toEqual({ kind: 'interaction', sources: ['x', 'habitat'] });
    // columns of a grouping factor entered as fixed name it, wherever they come from
    expect(named['x:site=B']).toEqual({ kind: 'interaction', sources: ['x', 'site'], fixedGroup: 'site' });
    expect(named['site=C']).toEqual({ kind: 'factor-level', sources: ['site'], fixedGroup: 'site' });
  });
});

describe('buildDesign: random terms', () => {
  it('random intercept and slope: levels, index, observation-major values', () => {
    const d = design(quadrats, { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random', slopes: ['x'] }] });
    expect(d.fixedNames).toEqual(['intercept', 'x']);
    expect(d.random).toHaveLength(1);
    const t = d.random[0];
    expect(t.factor).toBe('site');
    expect(t.levels).toEqual(['A', 'B', 'C']);
    expect(Array.from(t.index)).toEqual([0, 0, 0, 1, 1, 2, 2, 2, 1, 0, 2, 1]);
    expect(t.terms).toEqual(['intercept', 'x']);
    expect(Array.from(t.values)).toEqual((quadrats.x as number[]).flatMap((x) => [1, x]));
    expect(t.correlated).toBe(true);
    expect(d.warnings).toEqual([]);
  });

  it('levels sort in plain code-unit order and equal text is one level', () => {
    // Documented rule: JavaScript `<` on strings, so "10" < "9"; the number 9 and the text "9" are one level.
    const d = design(
      { y: [1, 2, 3, 4, 5], g: [9, '10', 'b', 'B', '9'] },
      { response: 'y', groups: [{ factor: 'g', as: 'random' }] },
    );
    expect(d.random[0].levels).toEqual(['10', '9', 'B', 'b']);
    expect(Array.from(d.random[0].index)).toEqual([1, 0, 3, 2, 1]);
  });

  it('nested random factors: plot within site within region', () => {
    const data = {
      y: [1, 2, 3, 4, 5, 6, 7],
      region: ['N', 'N', 'N', 'S', 'S', 'S', 'N'],
      site: ['A', 'A', 'B', 'A', 'A', 'B', 'B'],
      plot: ['1', '2', '1', '1', '1', '1', '1'],
    };
    const d = design(data, {
      response: 'y',
      groups: [
        { factor: 'region', as: 'fixed' },
        { factor: 'site', as: 'random', within: 'region', correlated: false },
        { factor: 'plot', as: 'random', within: 'site' },
      ],
    });
    const [site, plot] = d.random;
    expect(site.levels).toEqual(['N/A', 'N/B', 'S/A', 'S/B']);
    expect(Array.from(site.index)).toEqual([0, 0, 1, 2, 2, 3, 1]);
    expect(site.correlated).toBe(false);
    expect(plot.levels).toEqual(['N/A/1', 'N/A/2', 'N/B/1', 'S/A/1', 'S/B/1']);
    expect(Array.from(plot.index)).toEqual([0, 1, 2, 3, 3, 4, 2]);
    expect(d.fixedNames).toEqual(['intercept', 'region=S']);
    expect(d.levelCounts).toEqual({ region: 2, site: 4, plot: 5 });
  });

  it('within may name a column that is not a group; labels that are already unique are fine', () => {
    const d = design(
      { y: [1, 2, 3, 4], site: ['A', 'A', 'B', 'B'], plot: ['a1', 'a2', 'b1', 'b2'] },
      { response: 'y', groups: [{ factor: 'plot', as: 'random', within: 'site' }] },
    );
    expect(d.random[0].levels).toEqual(['A/a1', 'A/a2', 'B/b1', 'B/b2']);
    expect(d.levelCounts).toEqual({ plot: 4 });
  });

  it('rejects nested labels that collide through "/"', () => {
    const e = inputError(() =>
      design(
        { y: [1, 2, 3], site: ['A/B', 'A', 'A'], plot: ['C', 'B/C', 'D'] },
        { response: 'y', groups: [{ factor: 'plot', as: 'random', within: 'site' }] },
      ),
    );
    expect(e.message).toBe(
      'factor "plot": levels ("A", "B/C") and ("A/B", "C") both read "A/B/C"; labels of nested factors must not contain "/"',
    );
  });

  it('warns about a slope without a fixed term and one level per observation', () => {
    const d = design(
      { y: [1.5, 2, 3, 4], x: [1, 2, 3, 5], id: ['a', 'b', 'c', 'd'] },
      { response: 'y', groups: [{ factor: 'id', as: 'random', slopes: ['x'] }] },
    );
    expect(d.warnings).toEqual([
      'group "id": slope "x" varies by id but "x" is not a fixed term, so its mean slope is held at 0',
      'group "id": 4 levels for 4 observations (one per level); its variance cannot be told apart from the residual variance',
    ]);
  });
});

describe('buildDesign: within-between split', () => {
  it('replaces x by its deviation from the site mean and adds the site mean after the fixed terms', () => {
    const d = design(quadrats, { response: 'y', fixed: ['x', 'habitat'], groups: [{ factor: 'site', as: 'random', split: ['x'] }] });
    expect(d.fixedNames).toEqual(['intercept', 'x', 'habitat=mid', 'habitat=wet', 'x_mean_site']);
    // site means of x by hand from the table: A (1.5, 2, -0.5, -1), B (3.25, 0, 0.75, 3.5), C (4, 1, 2.5, 2.25)
    const siteMean: Record<string, number> = { A: 0.5, B: 1.875, C: 2.4375 };
    const x = quadrats.x as number[];
    const site = quadrats.site as string[];
    expect(column(d, 'x_mean_site')).toEqual(site.map((s) => siteMean[s]));
    column(d, 'x').forEach((v, i) => expect(v).toBeCloseTo(x[i] - siteMean[site[i]], 14));
  });

  it('refuses to split a categorical column', () => {
    const e = inputError(() => design(quadrats, { response: 'y', fixed: ['habitat'], groups: [{ factor: 'site', as: 'random', split: ['habitat'] }] }));
    expect(e.field).toBe('model.groups[0].split[0]');
  });
});

describe('buildDesign: missing values', () => {
  const withGaps: Columns = {
    y: [1.5, 2, 3, 4, 5, 6, 7, 8],
    rain: [0.1, null, 0.3, Number.NaN, 0.5, 0.6, 0.7, 0.8],
    site: ['A', 'A', '', 'B', 'B', 'C', 'C', 'D'],
    extra: [null, null, null, null, null, null, null, null],
  };

  it('drops incomplete rows, lists them, and warns with the columns', () => {
    const d = design(withGaps, { response: 'y', fixed: ['rain'], groups: [{ factor: 'site', as: 'random' }] });
    expect(d.droppedRows).toEqual([1, 2, 3]);
    expect(Array.from(d.rowIds)).toEqual([0, 4, 5, 6, 7]);
    expect(d.n).toBe(5);
    expect(Array.from(d.y)).toEqual([1.5, 5, 6, 7, 8]);
    expect(column(d, 'rain')).toEqual([0.1, 0.5, 0.6, 0.7, 0.8]);
    expect(d.warnings).toEqual(['dropped 3 rows with missing values in columns: rain, site']);
    // Levels come from the rows used: all four sites remain here.
    expect(d.random[0].levels).toEqual(['A', 'B', 'C', 'D']);
  });

  it('a level seen only in dropped rows makes no dummy column', () => {
    const d = design(
      { y: [1, 2, 3, 4, 5], h: ['dry', 'wet', 'mid', 'wet', 'dry'], x: [1, 2, null, 4, 8] },
      { response: 'y', fixed: ['x', 'h'] },
    );
    expect(d.fixedNames).toEqual(['intercept', 'x', 'h=wet']);
  });

  it('reject policy names the first row and column', () => {
    const e = inputError(() =>
      design(withGaps, { response: 'y', fixed: ['rain'], groups: [{ factor: 'site', as: 'random' }], missing: 'reject' }),
    );
    expect(e.message).toBe(
      'row 2: column "rain" (model.fixed[0]) is missing and model.missing is "reject"; fill the value or use missing: "drop"',
    );
    expect(e.row).toBe(2);
    expect(e.column).toBe('rain');
  });

  it('an all-missing column is an error naming it', () => {
    const e = inputError(() => design(withGaps, { response: 'y', fixed: ['extra'] }));
    expect(e.message).toBe('column "extra" (model.fixed[0]): all values are missing');
  });

  it('no complete rows left', () => {
    const e = inputError(() => design({ y: [1, null], x: [null, 2] }, { response: 'y', fixed: ['x'] }));
    expect(e.message).toBe('data: no complete rows left after dropping rows with missing values in columns: y, x');
  });
});

describe('buildDesign: errors name the culprit', () => {
  it('missing column lists the available ones', () => {
    const e = inputError(() => design(quadrats, { response: 'y', fixed: ['x', 'rain'] }));
    expect(e.message).toBe('model.fixed[1]: column "rain" not found; available columns: y, x, z, habitat, season, site');
  });

  it('a missing within column is named with its field', () => {
    const e = inputError(() => design(quadrats, { response: 'y', groups: [{ factor: 'site', as: 'random', within: 'region' }] }));
    expect(e.message).toBe(
      'model.groups[0].within: column "region" not found; available columns: y, x, z, habitat, season, site',
    );
    expect(e.field).toBe('model.groups[0].within');
  });

  it('non-numeric response names the 1-based row', () => {
    const e = inputError(() => design({ y: [1, 2, 'three', 4], x: [1, 2, 3, 4] }, { response: 'y', fixed: ['x'] }));
    expect(e.message).toBe(
      'response column "y": expected numbers, row 3 has "three"; if "three" marks a missing value, add it to the missing-value markers (CSV option missing, --missing), else fix the value',
    );
    expect(e.row).toBe(3);
    // numbers held as text (e.g. a whole column read as text): the row named is the first cell that is not a number
    const t = inputError(() => design({ y: ['45.3', '41.8', '40', '39.9', '44', '?'] }, { response: 'y' }));
    expect(t.row).toBe(6);
    expect(t.message).toContain('row 6 has "?"');
    expect(inputError(() => design({ y: [1, Infinity, 3] }, { response: 'y' })).message).toBe(
      'response column "y": expected finite numbers, row 2 has Infinity',
    );
  });

  it('a fixed column mixing numbers and text', () => {
    const e = inputError(() => design({ y: [1, 2, 3], x: [1, '2,5', 3] }, { response: 'y', fixed: ['x'] }));
    expect(e.message).toBe(
      'column "x": mixes numbers (row 1) and text (row 2 is "2,5"); "2,5" looks like a decimal comma: read the file with decimal "," (--decimal ,) or fix the value, or list the column in model.categorical to treat every value as a level',
    );
  });

  it('categorical numbers when listed in categorical', () => {
    const d = design(
      { y: [1.5, 2, 3, 4], year: [2021, 2020, 2022, 2021] },
      { response: 'y', fixed: ['year'], categorical: ['year', 'unused'] },
    );
    expect(d.fixedNames).toEqual(['intercept', 'year=2021', 'year=2022']);
    expect(column(d, 'year=2021')).toEqual([1, 0, 0, 1]);
    expect(d.warnings).toEqual(['model.categorical: column "unused" is listed but not used by the model']);
  });

  it('slopes on a categorical column', () => {
    const e = inputError(() =>
      design(quadrats, { response: 'y', groups: [{ factor: 'site', as: 'random', slopes: ['habitat'] }] }),
    );
    expect(e.message).toBe(
      'model.groups[0].slopes[0]: slope column "habitat" of group "site" is categorical; a slope needs a numeric column',
    );
  });

  it('a grouping factor with one level', () => {
    const e = inputError(() =>
      design({ y: [1, 2, 3], site: ['A', 'A', 'A'] }, { response: 'y', groups: [{ factor: 'site', as: 'random' }] }),
    );
    expect(e.message).toBe(
      'model.groups[0].factor: grouping factor "site" has 1 level ("A") in the rows used; at least 2 are needed',
    );
  });

  it('a categorical fixed term with one level, and an unknown reference', () => {
    expect(inputError(() => design({ y: [1, 2], h: ['a', 'a'] }, { response: 'y', fixed: ['h'] })).message).toBe(
      'model.fixed[0]: column "h" has only one level ("a") in the rows used; a categorical term needs at least 2',
    );
    expect(
      inputError(() => design(quadrats, { response: 'y', fixed: [{ column: 'habitat', reference: 'moist' }] })).message,
    ).toBe('model.fixed[0]: reference level "moist" of "habitat" not found; levels: dry, mid, wet');
    expect(
      inputError(() => design(quadrats, { response: 'y', groups: [{ factor: 'site', as: 'fixed', reference: 'Z' }] })).message,
    ).toBe('model.groups[0].reference: reference level "Z" of "site" not found; levels: A, B, C');
  });

  it('fewer observations than fixed columns + 1', () => {
    const n = 12;
    const data = {
      y: Array.from({ length: n }, (_, i) => i),
      x: Array.from({ length: n }, (_, i) => i * i),
      z: Array.from({ length: n }, (_, i) => Math.sqrt(i)),
      f: Array.from({ length: n }, (_, i) => `q${String(i).padStart(2, '0')}`),
    };
    const e = inputError(() => design(data, { response: 'y', fixed: ['x', 'z', 'f'] }));
    expect(e.message).toBe(
      '12 observations but 14 fixed-effect columns; at least 15 observations are needed to estimate the residual variance',
    );
  });

  it('a coefficient name produced twice', () => {
    const e = inputError(() =>
      design(quadrats, { response: 'y', fixed: ['x', 'x:site'], groups: [{ factor: 'site', as: 'fixed', slopes: ['x'] }] }),
    );
    expect(e.message).toBe(
      'fixed-effect column "x:site=B" would appear twice; remove the fixed term or the grouping-factor slope that repeats it',
    );
  });

  it('columns of different lengths', () => {
    expect(inputError(() => design({ y: [1, 2], x: [1] }, { response: 'y' })).message).toBe(
      'column "x": has 1 values but column "y" has 2; all columns must have the same length',
    );
  });
});

describe('inputs: records, arquero tables, extractResponse', () => {
  const spec: ModelSpec = { response: 'y', fixed: ['x', 'habitat'], groups: [{ factor: 'site', as: 'random' }] };

  it('records and an arquero table give the same design as columns', () => {
    const records = (quadrats.y as number[]).map((_, i) =>
      Object.fromEntries(Object.keys(quadrats).map((k) => [k, (quadrats[k] as unknown[])[i]])),
    );
    const fromColumns = design(quadrats, spec);
    expect(design(columnsFromRecords(records), spec)).toEqual(fromColumns);
    expect(design(toColumns(records), spec)).toEqual(fromColumns);
    const table = aq.table(quadrats as Record<string, unknown[]>);
    expect(design(columnsFromTable(table), spec)).toEqual(fromColumns);
    expect(design(toColumns(table), spec)).toEqual(fromColumns);
  });

  it('records with absent keys give null cells', () => {
    expect(columnsFromRecords([{ a: 1 }, { b: 'x' }])).toEqual({ a: [1, null], b: [null, 'x'] });
    expect(inputError(() => columnsFromRecords([{ a: 1 }, 5 as unknown as object])).message).toBe(
      'data row 2: expected an object of column values, got 5',
    );
  });

  it('extractResponse refills y for the design rows', () => {
    const d = design({ y: [1, 2, 3, 4], x: [1, null, 3, 4] }, { response: 'y', fixed: ['x'] });
    const out = new Float64Array(3);
    const y = extractResponse({ y: [10, 20, 30, 40] }, 'y', d.rowIds, out);
    expect(y).toBe(out);
    expect(Array.from(out)).toEqual([10, 30, 40]);
    expect(inputError(() => extractResponse({ y: [10, null, null, 40] }, 'y', d.rowIds)).message).toBe(
      'response column "y": expected numbers, row 3 has null',
    );
  });
});
