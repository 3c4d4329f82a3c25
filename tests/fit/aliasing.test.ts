import { describe, expect, it } from 'vitest';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { aliasingFromCrossProducts, estimabilityOrder, restrictColumns } from '../../kernel-lib/fit/aliasing';
import type { ColumnRole } from '../../kernel-lib/data/design-matrices';
import { handDesign } from '../helpers/simple-design';

/** XᵀX of a row-major n×p list of rows. */
function crossProducts(rows: number[][]): Float64Array {
  const p = rows[0].length;
  const out = new Float64Array(p * p);
  for (const r of rows) for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) out[a * p + b] += r[a] * r[b];
  return out;
}
/** Numerical rank from ml-matrix's SVD (general-purpose library; Golub and Van Loan 2013, §2.4). */
const svdRank = (rows: number[][]) => new SingularValueDecomposition(new Matrix(rows)).rank;

// 3 sites × 2 plots: intercept, site=B, site=C, elevation (constant within site), rain, rain2 = 2·rain − 1
const site = [0, 0, 1, 1, 2, 2];
const elevation = [120, 120, 340, 340, 90, 90];
const rain = [1.1, 0.4, 2.3, 1.7, 0.2, 0.9];
const rows = site.map((s, i) => [1, s === 1 ? 1 : 0, s === 2 ? 1 : 0, elevation[i], rain[i], 2 * rain[i] - 1]);

describe('aliasingFromCrossProducts', () => {
  it('finds as many estimable columns as the rank of X, keeping the earlier ones', () => {
    // elevation is a combination of intercept and site dummies; rain2 of intercept and rain
    const r = aliasingFromCrossProducts(crossProducts(rows), 6, 6);
    expect(r.estimable).toHaveLength(svdRank(rows));
    expect(r.estimable).toEqual([0, 1, 2, 4]);
    expect(r.aliased).toEqual([3, 5]);
  });

  it('follows the priority order: the column visited later is the one reported aliased', () => {
    // visiting elevation before the site dummies: elevation stays, the last site dummy goes
    const r = aliasingFromCrossProducts(crossProducts(rows), 6, 6, [0, 3, 4, 5, 1, 2]);
    expect(r.estimable).toEqual([0, 1, 3, 4]);
    expect(r.aliased).toEqual([2, 5]);
  });

  it('is not fooled by column scale, but keeps nearly collinear columns that are not aliased', () => {
    // the same design with elevation in millimetres (× 1e6) and rain2 perturbed by 1e-3 in one row
    const scaled = rows.map((r, i) => [r[0], r[1], r[2], r[3] * 1e6, r[4], r[5] + (i === 2 ? 1e-3 : 0)]);
    const a = aliasingFromCrossProducts(crossProducts(scaled), 6, 6);
    expect(a.aliased).toEqual([3]);
    expect(a.estimable).toHaveLength(svdRank(scaled));
  });

  it('reports an all-zero column as aliased and reads a leading block of a larger matrix', () => {
    // [X y]ᵀ[X y] layout: stride p + 1, with X = (1, 0, x)
    const x = [[1, 0, 2], [1, 0, 3], [1, 0, 5]];
    const y = [1, 2, 4];
    const full = crossProducts(x.map((r, i) => [...r, y[i]]));
    const r = aliasingFromCrossProducts(full, 3, 4);
    expect(r).toEqual({ estimable: [0, 2], aliased: [1] });
  });

  it('drops the last dummy of a factor coded with all its levels next to an intercept (dummy trap)', () => {
    // intercept + indicator of every level: the indicators sum to the intercept (common practice, no source)
    const dummies = site.map((s) => [1, s === 0 ? 1 : 0, s === 1 ? 1 : 0, s === 2 ? 1 : 0]);
    expect(aliasingFromCrossProducts(crossProducts(dummies), 4, 4)).toEqual({ estimable: [0, 1, 2], aliased: [3] });
  });
});

describe('estimabilityOrder', () => {
  it('puts the intercept first, then columns of fixed grouping factors, then the rest, each in column order', () => {
    const roles: ColumnRole[] = [
      { kind: 'covariate', sources: ['elevation'] },
      { kind: 'intercept', sources: [] },
      { kind: 'factor-level', sources: ['site'], fixedGroup: 'site' },
      { kind: 'interaction', sources: ['rain', 'grazing'] },
      { kind: 'factor-level', sources: ['site'], fixedGroup: 'site' },
    ];
    expect(estimabilityOrder(roles)).toEqual([1, 2, 4, 0, 3]);
  });
});

describe('restrictColumns', () => {
  it('keeps the chosen columns of X with their names and roles, and returns the design itself when all are kept', () => {
    const d = handDesign([[1, 2, 3], [1, 5, 7]], ['intercept', 'a', 'b'], [0.5, 1.5]);
    const r = restrictColumns(d, [0, 2]);
    expect(r.p).toBe(2);
    expect(Array.from(r.X)).toEqual([1, 3, 1, 7]);
    expect(r.fixedNames).toEqual(['intercept', 'b']);
    expect(r.roles.map((x) => x.kind)).toEqual(['intercept', 'covariate']);
    expect(Array.from(d.X)).toEqual([1, 2, 3, 1, 5, 7]);
    expect(restrictColumns(d, [0, 1, 2])).toBe(d);
  });
});
