import { describe, expect, it } from 'vitest';
import type { ModelSpec } from '../../kernel-lib/model/types';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { DF_FLOOR } from '../../kernel-lib/fit/df-floor';
import { testRandom } from '../helpers/simple-design';

/** Sites of 5 plots each; `grazed` sites get a site-level covariate; values from a seeded generator. */
function sites(count: number, grazed: number, seed: number) {
  const rng = testRandom(seed);
  const rows: { site: string; grazing: string; cover: number }[] = [];
  for (let s = 0; s < count; s++) {
    const effect = 2 * rng.normal();
    for (let i = 0; i < 5; i++) rows.push({ site: `s${s}`, grazing: s < grazed ? 'grazed' : 'open', cover: 10 + effect + rng.normal() });
  }
  return rows;
}
const model = (interval: string): ModelSpec => ({ response: 'cover', fixed: ['grazing'], groups: [{ factor: 'site', as: 'random' }], interval });

describe('df floor of small-sample intervals', () => {
  it('with two sites and a site-level covariate the df collapse and the interval is not available, with the reason', () => {
    // Identity: in a balanced nested layout the Satterthwaite (and Kenward-Roger) df of a site-level
    // contrast are the between-site df, sites − site-level parameters = 2 − 2 = 0 (Kenward and Roger 1997, §5).
    for (const interval of ['satterthwaite', 'kenward-roger']) {
      const fit = fitModel(sites(2, 1, 3), model(interval));
      const g = fit.fixed.find((r) => r.term.startsWith('grazing'))!;
      expect(g.df).toBeLessThan(1e-3);
      expect(Number.isFinite(g.estimate) && Number.isFinite(g.se)).toBe(true);
      expect(Number.isNaN(g.lower) && Number.isNaN(g.upper)).toBe(true);
      expect(g.note).toMatch(new RegExp(`^interval not available: ${interval} df .* is below the floor of ${DF_FLOOR}$`));
      expect(fit.warnings.some((w) => w.startsWith(`${g.term}: interval not available`))).toBe(true);
    }
  });

  it('at exactly one df (three sites) the interval is given, with t(0.975, 1) = 12.706', () => {
    // Same identity: 3 − 2 = 1 df. scipy.stats.t.ppf(0.975, 1) = 12.706204736432095.
    const fit = fitModel(sites(3, 1, 5), model('satterthwaite'));
    const g = fit.fixed.find((r) => r.term.startsWith('grazing'))!;
    expect(g.df).toBeCloseTo(1, 3);
    expect(g.note).toBeUndefined();
    expect((g.upper - g.estimate) / g.se).toBeCloseTo(12.706204736432095, 2);
  });
});

describe('rows left without an interval always say why', () => {
  it('a Kenward-Roger df that cannot be computed gives a note, not a silent NaN', () => {
    const fit = fitModel(sites(2, 1, 11), model('kenward-roger'));
    const g = fit.fixed.find((r) => r.term.startsWith('grazing'))!;
    expect(Number.isNaN(g.df)).toBe(true);
    expect(g.note).toBe('interval not available: kenward-roger df could not be computed (see warnings)');
  });
});
