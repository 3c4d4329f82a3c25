import { describe, expect, it } from 'vitest';
import { fitModel } from '../../kernel-lib/analyse/fit-model';

/** Habitat × season counts with one cell left empty. */
function cells(skip: [string, string] | null) {
  const rows: { habitat: string; season: string; site: string; y: number }[] = [];
  let k = 0;
  for (const habitat of ['dry', 'wet']) {
    for (const season of ['autumn', 'spring']) {
      if (skip && habitat === skip[0] && season === skip[1]) continue;
      for (let i = 0; i < 3; i++) rows.push({ habitat, season, site: `s${k % 4}`, y: (habitat === 'wet' ? 2 : 0) + (season === 'spring' ? 1 : 0) + Math.sin(++k) });
    }
  }
  return rows;
}

describe('messages about coefficients that cannot be estimated name the real cause', () => {
  it('an empty cell of an interaction, whichever cell it is', () => {
    // A two-way treatment-coded model with an empty cell has one fewer estimable cell mean than
    // columns, so the interaction column is a combination of the others (Searle 1987, Linear Models
    // for Unbalanced Data, on two-way classifications with empty cells; from memory).
    const model = { response: 'y', fixed: ['habitat', 'season', 'habitat:season'], interval: 'wald' };
    const fit = fitModel(cells(['wet', 'autumn']), model);
    const term = fit.aliased[0];
    expect(fit.aliased).toHaveLength(1);
    expect(fit.aliasReasons[term]).toMatch(/^no row used has .*wet.* together with the reference level of season \(an empty cell of the interaction habitat:season\)/);
    expect(fit.warnings.find((w) => w.startsWith(`not estimable: ${term}: no row used has`))).toBeDefined();
    // the reference cell empty (dry, autumn): the missing combination named is the pair of reference levels
    const ref = fitModel(cells(['dry', 'autumn']), model);
    expect(ref.aliasReasons[ref.aliased[0]]).toContain('no row used has the reference level of habitat together with the reference level of season');
    // no empty cell: nothing aliased
    expect(fitModel(cells(null), model).aliased).toEqual([]);
  });

  it('a covariate constant within the levels of a fixed grouping factor names the columns it combines', () => {
    const rows = cells(null).map((r) => ({ ...r, wetness: Number(r.site.slice(1)) * 0.5 }));
    const fit = fitModel(rows, { response: 'y', fixed: ['wetness'], groups: [{ factor: 'site', as: 'fixed' }] });
    expect(fit.aliased).toEqual(['wetness']);
    expect(fit.aliasReasons.wetness).toMatch(/^equals a combination of .*site.* in the rows used$/);
    expect(fit.aliasReasons.wetness).not.toContain('empty cell');
  });
});
